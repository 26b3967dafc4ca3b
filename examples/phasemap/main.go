// Command phasemap computes a map of mean-field ground states and gaps over carrier density n
// and displacement field D, streaming every finished point to a file so that nothing is lost when
// a run is interrupted, resuming where a previous run stopped, and splitting the map into shards
// for a cluster's job array. It is a template: copy it and change what you need.
//
// With no flags it maps an invented device of ours, a dual-gated Bernal bilayer in a dielectric
// with ε = 6 (bare exchange screened by gates 40 nm away, ħvΛ = 500 meV, 24-point k-grid), over
// n = −1..1 × 10¹² cm⁻² and D = 0..0.6 V/nm, writing phasemap.csv (with phasemap.csv.state, the
// continuation checkpoint) and phasemap.png, and a progress line per point on stderr:
//
//	go run ./examples/phasemap
//	go run ./examples/phasemap -nsteps 20 -dsteps 20 -o big.csv -resume
//	go run ./examples/phasemap -shard 3/8 -o map.shard3.csv           # one task of a job array
//	go run ./examples/phasemap -merge -o map.csv map.shard*.csv        # join the shards, check none is missing
//
// Without -shard, the job-array variables of a batch scheduler select the shard:
// SLURM_ARRAY_TASK_ID (minus SLURM_ARRAY_TASK_MIN, if set) of SLURM_ARRAY_TASK_COUNT.
//
// The output starts with the format and the full settings (one JSON line), then one line per
// point with the columns index, i_n, j_D, n_1e12_cm2, D_V_per_nm, state, pattern,
// degenerate_states, seed, energy_meV_per_nm2 (relative to the symmetric state), gap_meV,
// sigma_xy_e2_h, converged, states, failed_seeds, iterations.
package main

import (
	"bufio"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"strconv"
	"strings"

	"lamina/hartree"
	"lamina/lattice"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	err := run(ctx, os.Args[1:], os.Stdout, os.Stderr, os.Getenv)
	var ue usageError
	switch {
	case err == nil, errors.Is(err, flag.ErrHelp):
	case errors.As(err, &ue):
		fmt.Fprintln(os.Stderr, "phasemap:", err)
		os.Exit(2)
	default:
		fmt.Fprintln(os.Stderr, "phasemap:", err)
		os.Exit(1)
	}
}

type usageError struct{ error }

func usagef(format string, a ...any) error { return usageError{fmt.Errorf(format, a...)} }

// Settings is everything that determines the map; it is recorded in the output file and must
// match when a run resumes or shards are merged.
type Settings struct {
	Stacking     string         `json:"stacking"`
	Params       lattice.Params `json:"params"`
	Eps          float64        `json:"eps"`
	Gates        string         `json:"gates"`
	GateDistance float64        `json:"gate_distance_nm"`
	Screening    string         `json:"screening"`
	QTF          float64        `json:"qtf_1_per_nm"`
	Cutoff       float64        `json:"cutoff_meV"`
	Grid         int            `json:"grid"`
	T            float64        `json:"T_K"`
	Ns           []float64      `json:"n_1e12_cm2"`
	Ds           []float64      `json:"D_V_per_nm"`
	Continuation bool           `json:"continuation"`
	Random       int            `json:"random_seeds"`
	Seed         uint64         `json:"rng_seed"`
	Shards       int            `json:"shards"`
}

type config struct {
	set        Settings
	scan       hartree.Scan
	shard      int
	out        string
	format     string
	resume     bool
	png        string
	merge      []string
	quiet      bool
	checkpoint bool
}

func axis(lo, hi float64, steps int) []float64 {
	if steps == 1 {
		return []float64{lo}
	}
	out := make([]float64, steps)
	for i := range out {
		out[i] = lo + (hi-lo)*float64(i)/float64(steps-1)
	}
	return out
}

// parseShard reads "i/k" with 0 <= i < k.
func parseShard(s string) (int, int, error) {
	a, b, ok := strings.Cut(s, "/")
	i, err1 := strconv.Atoi(strings.TrimSpace(a))
	k, err2 := strconv.Atoi(strings.TrimSpace(b))
	if !ok || err1 != nil || err2 != nil || k < 1 || i < 0 || i >= k {
		return 0, 0, fmt.Errorf("shard %q is not i/k with 0 <= i < k", s)
	}
	return i, k, nil
}

func parse(args []string, stderr io.Writer, getenv func(string) string) (*config, error) {
	fs := flag.NewFlagSet("phasemap", flag.ContinueOnError)
	fs.SetOutput(stderr)
	stacking := fs.String("stacking", "AB", "stacking sequence")
	params := fs.String("params", "minimal", "parameter preset ("+strings.Join(lattice.PresetNames(), ", ")+") or JSON file")
	eps := fs.Float64("eps", 6, "background dielectric constant ε")
	gates := fs.String("gates", "two", "metal gates: none, one or two")
	gateDist := fs.Float64("gate-distance", 40, "gate distance in nm")
	screening := fs.String("screening", "bare", "exchange interaction: rpa, bare or thomas-fermi")
	qtf := fs.Float64("qtf", 0, "Thomas-Fermi wave vector in 1/nm")
	cutoff := fs.Float64("cutoff", 500, "momentum cutoff ħvΛ in meV")
	grid := fs.Int("grid", 24, "k-grid points across the disk")
	tK := fs.Float64("T", 0, "temperature in K")
	nmin := fs.Float64("nmin", -1, "lowest density in 10^12 cm^-2")
	nmax := fs.Float64("nmax", 1, "highest density in 10^12 cm^-2")
	nsteps := fs.Int("nsteps", 5, "number of densities")
	dmin := fs.Float64("dmin", 0, "lowest D/ε0 in V/nm")
	dmax := fs.Float64("dmax", 0.6, "highest D/ε0 in V/nm")
	dsteps := fs.Int("dsteps", 7, "number of fields")
	cont := fs.Bool("continuation", true, "seed each point from its neighbour's ground state too")
	random := fs.Int("random", 0, "random seeds per point")
	seed := fs.Uint64("seed", 1, "first RNG seed of the random seeds")
	shard := fs.String("shard", "", "this task's shard i/k (default: the job-array environment, else 0/1)")
	out := fs.String("o", "phasemap.csv", "output file (streamed; with -merge: the merged file)")
	format := fs.String("format", "csv", "output format: csv or jsonl")
	resume := fs.Bool("resume", false, "continue an interrupted run in the same output file")
	png := fs.String("png", "phasemap.png", "heat map of the ground states (empty: none)")
	merge := fs.Bool("merge", false, "merge the shard files given as arguments into -o")
	quiet := fs.Bool("quiet", false, "no progress lines on stderr")
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil, err
		}
		return nil, usageError{err}
	}
	c := &config{out: *out, format: *format, resume: *resume, png: *png, quiet: *quiet, checkpoint: true}
	if *merge {
		if fs.NArg() == 0 {
			return nil, usagef("-merge needs the shard files as arguments")
		}
		c.merge = fs.Args()
	} else if fs.NArg() > 0 {
		return nil, usagef("unexpected argument %q", fs.Arg(0))
	}
	if c.out == "" {
		return nil, usagef("-o must name the output file")
	}
	if *format != "csv" && *format != "jsonl" {
		return nil, usagef("-format %q is not csv or jsonl", *format)
	}
	for name, v := range map[string]float64{"-eps": *eps, "-gate-distance": *gateDist, "-qtf": *qtf, "-cutoff": *cutoff, "-T": *tK,
		"-nmin": *nmin, "-nmax": *nmax, "-dmin": *dmin, "-dmax": *dmax} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, usagef("%s %g is not a finite number", name, v)
		}
	}
	if *nsteps < 1 || *dsteps < 1 || *nsteps*(*dsteps) > 1000000 {
		return nil, usagef("need 1 <= -nsteps, -dsteps and at most 10^6 points")
	}
	if *eps <= 0 || *cutoff <= 0 || *tK < 0 || *grid < 4 || *grid > 1024 || *random < 0 {
		return nil, usagef("need -eps > 0, -cutoff > 0, -T >= 0, 4 <= -grid <= 1024, -random >= 0")
	}
	st, err := lattice.ParseStack(*stacking)
	if err != nil {
		return nil, usageError{err}
	}
	p, err := lattice.LoadParams(*params)
	if err != nil {
		return nil, usageError{err}
	}
	g, err := hartree.ParseGates(*gates)
	if err != nil {
		return nil, usageError{err}
	}
	scr, err := hartree.ParseScreening(*screening)
	if err != nil {
		return nil, usageError{err}
	}
	// Shard: the flag, else the job array, else the whole map.
	k, m := 0, 1
	switch {
	case *shard != "":
		if k, m, err = parseShard(*shard); err != nil {
			return nil, usageError{err}
		}
	case getenv("SLURM_ARRAY_TASK_ID") != "" && getenv("SLURM_ARRAY_TASK_COUNT") != "":
		id, err1 := strconv.Atoi(getenv("SLURM_ARRAY_TASK_ID"))
		cnt, err2 := strconv.Atoi(getenv("SLURM_ARRAY_TASK_COUNT"))
		lo := 0
		if v := getenv("SLURM_ARRAY_TASK_MIN"); v != "" {
			var err3 error
			if lo, err3 = strconv.Atoi(v); err3 != nil {
				return nil, usagef("SLURM_ARRAY_TASK_MIN %q is not a number", v)
			}
		}
		if err1 != nil || err2 != nil || id-lo < 0 || id-lo >= cnt {
			return nil, usagef("job array task %q of %q (min %d) is not a shard", getenv("SLURM_ARRAY_TASK_ID"), getenv("SLURM_ARRAY_TASK_COUNT"), lo)
		}
		k, m = id-lo, cnt
	}
	c.shard = k
	ns := axis(*nmin, *nmax, *nsteps)
	c.set = Settings{Stacking: st.String(), Params: p, Eps: *eps, Gates: *gates, GateDistance: *gateDist, Screening: scr.String(), QTF: *qtf,
		Cutoff: *cutoff, Grid: *grid, T: *tK, Ns: ns, Ds: axis(*dmin, *dmax, *dsteps), Continuation: *cont, Random: *random, Seed: *seed, Shards: m}
	in := hartree.Interaction{Eps: *eps, Gates: g, GateDistance: *gateDist, Screening: scr, QTF: *qtf}
	if g == hartree.NoGates {
		in.GateDistance = 0
	}
	nsNM := make([]float64, len(ns))
	for i, v := range ns {
		nsNM[i] = v * lattice.Per1e12cm2
	}
	c.scan = hartree.Scan{
		Base:         hartree.MeanField{Device: hartree.Device{Stack: st, Params: p}, Interaction: in, T: *tK, Cutoff: *cutoff * 1e-3, Grid: *grid},
		Ns:           nsNM,
		Ds:           c.set.Ds,
		Search:       hartree.SearchOptions{Random: *random, RandomSeed: *seed},
		Continuation: *cont,
	}
	if *random == 0 {
		c.scan.Search.Random = -1
	}
	if err := c.scan.Base.Validate(); err != nil {
		return nil, usageError{err}
	}
	return c, nil
}

func run(ctx context.Context, args []string, stdout, stderr io.Writer, getenv func(string) string) error {
	c, err := parse(args, stderr, getenv)
	if err != nil {
		return err
	}
	if c.merge != nil {
		// The grid comes from the shards' own settings, so merging needs no grid flags.
		set, err := readSettings(c.merge[0])
		if err != nil {
			return err
		}
		c.set = set
		f, err := os.Create(c.out)
		if err != nil {
			return err
		}
		defer f.Close()
		if err := hartree.MergeScans(f, c.merge, len(set.Ns)*len(set.Ds)); err != nil {
			os.Remove(c.out)
			return err
		}
		if err := f.Close(); err != nil {
			return err
		}
		return c.plot(c.out)
	}
	pts, err := c.scan.Shard(c.shard, c.set.Shards)
	if err != nil {
		return usageError{err}
	}
	o, err := hartree.OpenScanOutput(c.out, c.format, c.set, c.resume)
	if err != nil {
		return err
	}
	defer o.Close()
	// The continuation checkpoint: the ground state of the last finished point, tagged with its
	// index, so that a resumed run continues the same chain.
	ckpt := c.out + ".state"
	var start *hartree.HFState
	if c.resume && o.Last >= 0 && c.set.Continuation {
		if s, err := hartree.NewHFSolver(c.scan.Base, c.scan.Options); err == nil {
			if st, err := s.LoadState(ckpt); err == nil && st.Tag == int64(o.Last) {
				start = st
			} else if !c.quiet {
				fmt.Fprintf(stderr, "phasemap: no checkpoint for point %d; the continuation chain restarts\n", o.Last)
			}
		}
	}
	sink := func(r hartree.ScanRecord) error { return o.Write(r) }
	checkpoint := func(p hartree.ScanPoint, st *hartree.HFState) error {
		st.Tag = int64(p.Index)
		return hartree.SaveState(ckpt, st)
	}
	progress := func(p hartree.ScanProgress) {
		if c.quiet {
			return
		}
		state := "no converged state"
		if p.Last.Ground != nil {
			state = p.Last.Ground.Class
		}
		fmt.Fprintf(stderr, "phasemap: %d/%d points, n = %.3g x 1e12 cm^-2, D = %.3g V/nm: %s; %.1f points/min, %s left\n",
			p.Done, p.Total, p.Last.N/lattice.Per1e12cm2, p.Last.D, state, p.PerMinute, p.Remaining.Round(1e9))
	}
	if !c.set.Continuation {
		checkpoint = nil
	}
	runErr := c.scan.Run(ctx, pts, o.Done, start, sink, checkpoint, progress)
	if err := o.Close(); err != nil && runErr == nil {
		runErr = err
	}
	if runErr != nil {
		return runErr
	}
	if c.set.Shards == 1 {
		return c.plot(c.out)
	}
	return nil
}

// readSettings reads the settings line of a scan file.
func readSettings(path string) (Settings, error) {
	var set Settings
	f, err := os.Open(path)
	if err != nil {
		return set, err
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 1<<20), 1<<24)
	for i := 0; i < 3 && sc.Scan(); i++ {
		line := sc.Text()
		switch {
		case strings.HasPrefix(line, "# settings "):
			err = json.Unmarshal([]byte(strings.TrimPrefix(line, "# settings ")), &set)
			return set, err
		case strings.HasPrefix(line, "{"):
			var h struct {
				Settings Settings `json:"settings"`
			}
			err = json.Unmarshal([]byte(line), &h)
			return h.Settings, err
		}
	}
	return set, fmt.Errorf("%s: no scan settings found", path)
}
