// Command evenodd computes the mean-field ground state of Bernal (ABAB...) stacks of N layers
// under one interaction setting and reports, per N, the state, its gap, the gaps of its
// bilayer-like and monolayer-like sectors, the Hall conductivity and, with -tc, the mean-field
// transition temperature. It lets a user test, for their parameters, whether even N insulate
// and odd N conduct; it does not assume the answer. It is a template: copy it and change what
// you need.
//
// With no flags it takes N = 1..6 of an invented suspended device of ours (minimal parameter
// set, ε = 1, metal gates 40 nm above and below, the library's default screened exchange (static
// RPA), ħvΛ = 150 meV, 48-point grid), writes CSV to stdout and a plot of the gaps versus N to
// evenodd.png:
//
//	go run ./examples/evenodd
//	go run ./examples/evenodd -screening bare -eps 6 -cutoff 500 -layers 1-4 -tc
//	go run ./examples/evenodd -params graphite -layers 3,5 -format json
//
// Columns (CSV; JSON keys are the same):
//
//	layers, stacking, state, gap_meV, sector_gaps_meV (bilayer-like sectors by decreasing
//	coupling λ, then the monolayer-like one for odd N; ';'-separated in CSV), sector_kinds,
//	sigma_xy_e2_h, converged, energy_meV_per_nm2 (relative to the symmetric state),
//	degenerate_states (the classes with the ground-state energy), and with -tc:
//	Tc_K (0 when the ground state is symmetric), Tc_tol_K, gap_over_kTc (the BCS-like ratio
//	2Δ(0)/(k_B Tc), 3.53 in weak-coupling mean-field theory).
package main

import (
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

	"lamina/bands"
	"lamina/hartree"
	"lamina/lattice"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	err := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	var ue usageError
	switch {
	case err == nil, errors.Is(err, flag.ErrHelp):
	case errors.As(err, &ue):
		fmt.Fprintln(os.Stderr, "evenodd:", err)
		os.Exit(2)
	default:
		fmt.Fprintln(os.Stderr, "evenodd:", err)
		os.Exit(1)
	}
}

type usageError struct{ error }

func usagef(format string, a ...any) error { return usageError{fmt.Errorf(format, a...)} }

type config struct {
	layers []int
	params lattice.Params
	in     hartree.Interaction
	field  hartree.Field
	tK     float64
	cutoff float64 // eV
	grid   int
	random int
	tc     bool
	format string
	out    string
	png    string
	pngTc  string
	quiet  bool
}

// parseLayers accepts "1-6", "2,4,6" or a mix.
func parseLayers(s string) ([]int, error) {
	var out []int
	for _, part := range strings.Split(s, ",") {
		part = strings.TrimSpace(part)
		lo, hi, isRange := strings.Cut(part, "-")
		a, err := strconv.Atoi(strings.TrimSpace(lo))
		if err != nil {
			return nil, fmt.Errorf("%q is not a layer count", part)
		}
		b := a
		if isRange {
			if b, err = strconv.Atoi(strings.TrimSpace(hi)); err != nil {
				return nil, fmt.Errorf("%q is not a range of layer counts", part)
			}
		}
		if a < 1 || b < a || b > 12 {
			return nil, fmt.Errorf("layer counts %q must lie in 1..12 in increasing order", part)
		}
		for n := a; n <= b; n++ {
			out = append(out, n)
		}
	}
	return out, nil
}

func parse(args []string, stderr io.Writer) (*config, error) {
	fs := flag.NewFlagSet("evenodd", flag.ContinueOnError)
	fs.SetOutput(stderr)
	layers := fs.String("layers", "1-6", "layer counts: a range such as 1-6 or a list such as 2,4,6 (at most 12)")
	params := fs.String("params", "minimal", "parameter preset ("+strings.Join(lattice.PresetNames(), ", ")+") or JSON file")
	eps := fs.Float64("eps", 1, "background dielectric constant ε")
	gates := fs.String("gates", "two", "metal gates: none, one or two")
	gateDist := fs.Float64("gate-distance", 40, "gate distance in nm")
	screening := fs.String("screening", "rpa", "exchange interaction: rpa (library default, static RPA of the non-interacting stack), bare, thomas-fermi")
	qtf := fs.Float64("qtf", 0, "Thomas-Fermi wave vector in 1/nm (with -screening thomas-fermi)")
	cutoff := fs.Float64("cutoff", 150, "momentum cutoff ħvΛ in meV")
	grid := fs.Int("grid", 48, "k-grid points across the disk")
	tK := fs.Float64("T", 0, "temperature in K")
	D := fs.Float64("D", 0, "displacement field D/ε0 in V/nm")
	n := fs.Float64("n", 0, "carrier density in 10^12 cm^-2")
	random := fs.Int("random", 0, "random seeds per stack in addition to the pattern seeds")
	tc := fs.Bool("tc", false, "also find the mean-field transition temperature of each ground state")
	format := fs.String("format", "csv", "output format: csv or json")
	out := fs.String("o", "", "output file (default stdout)")
	png := fs.String("png", "evenodd.png", "plot of the gaps versus N (empty: none)")
	pngTc := fs.String("png-tc", "evenodd_tc.png", "plot of Tc versus N with -tc (empty: none)")
	quiet := fs.Bool("quiet", false, "no progress lines on stderr")
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil, err
		}
		return nil, usageError{err}
	}
	if fs.NArg() > 0 {
		return nil, usagef("unexpected argument %q", fs.Arg(0))
	}
	c := &config{tK: *tK, cutoff: *cutoff * 1e-3, grid: *grid, random: *random, tc: *tc, format: *format, out: *out, png: *png, pngTc: *pngTc, quiet: *quiet}
	var err error
	if c.layers, err = parseLayers(*layers); err != nil {
		return nil, usagef("-layers: %v", err)
	}
	if c.params, err = lattice.LoadParams(*params); err != nil {
		return nil, usageError{err}
	}
	for name, v := range map[string]float64{"-eps": *eps, "-gate-distance": *gateDist, "-cutoff": *cutoff, "-T": *tK, "-D": *D, "-n": *n, "-qtf": *qtf} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, usagef("%s %g is not a finite number", name, v)
		}
	}
	if *eps <= 0 || *cutoff <= 0 || *tK < 0 || *grid < 4 || *grid > 1024 || *random < 0 {
		return nil, usagef("need -eps > 0, -cutoff > 0, -T >= 0, 4 <= -grid <= 1024, -random >= 0")
	}
	g, err := hartree.ParseGates(*gates)
	if err != nil {
		return nil, usageError{err}
	}
	scr, err := hartree.ParseScreening(*screening)
	if err != nil {
		return nil, usageError{err}
	}
	c.in = hartree.Interaction{Eps: *eps, Gates: g, GateDistance: *gateDist, Screening: scr, QTF: *qtf}
	if g == hartree.NoGates {
		c.in.GateDistance = 0
	}
	if err := (hartree.MeanField{Device: hartree.Device{Stack: mustBernal(1), Params: c.params}, Interaction: c.in}).Validate(); err != nil {
		return nil, usageError{err}
	}
	c.field = hartree.Field{D: *D, N: *n * lattice.Per1e12cm2}
	switch *format {
	case "csv", "json":
	default:
		return nil, usagef("-format %q is not csv or json", *format)
	}
	return c, nil
}

func mustBernal(n int) lattice.Stack {
	st, err := lattice.NewBernal(n)
	if err != nil {
		panic(err) // n comes from parseLayers (1..12)
	}
	return st
}

// nullable encodes NaN as JSON null.
type nullable float64

func (x nullable) MarshalJSON() ([]byte, error) {
	if math.IsNaN(float64(x)) || math.IsInf(float64(x), 0) {
		return []byte("null"), nil
	}
	return []byte(strconv.FormatFloat(float64(x), 'g', 8, 64)), nil
}

// row is one layer count; the JSON keys are part of the command's contract.
type row struct {
	Layers     int        `json:"layers"`
	Stacking   string     `json:"stacking"`
	State      string     `json:"state"`
	Gap        nullable   `json:"gap_meV"`
	SectorGaps []nullable `json:"sector_gaps_meV"`
	Sectors    []string   `json:"sector_kinds"`
	SigmaXY    nullable   `json:"sigma_xy_e2_h"`
	Converged  bool       `json:"converged"`
	Energy     nullable   `json:"energy_meV_per_nm2"`
	Degenerate []string   `json:"degenerate_states"`
	Tc         *nullable  `json:"Tc_K,omitempty"`
	TcTol      *nullable  `json:"Tc_tol_K,omitempty"`
	Ratio      *nullable  `json:"gap_over_kTc,omitempty"`
}

func run(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	c, err := parse(args, stderr)
	if err != nil {
		return err
	}
	var rows []row
	var failures []error
	for _, n := range c.layers {
		r, err := c.one(ctx, n, stderr)
		if ctx.Err() != nil {
			return ctx.Err()
		}
		if err != nil {
			failures = append(failures, fmt.Errorf("N = %d: %w", n, err))
		}
		rows = append(rows, r)
	}
	w := stdout
	var f *os.File
	if c.out != "" {
		if f, err = os.Create(c.out); err != nil {
			return err
		}
		defer f.Close()
		w = f
	}
	if c.format == "json" {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		err = enc.Encode(rows)
	} else {
		err = writeCSV(w, c, rows)
	}
	if err != nil {
		return err
	}
	if f != nil {
		if err := f.Close(); err != nil {
			return err
		}
	}
	if c.png != "" {
		if err := plotGaps(c.png, c, rows); err != nil {
			return fmt.Errorf("writing %s: %w", c.png, err)
		}
	}
	if c.tc && c.pngTc != "" {
		if err := plotTc(c.pngTc, c, rows); err != nil {
			return fmt.Errorf("writing %s: %w", c.pngTc, err)
		}
	}
	return errors.Join(failures...)
}

// one computes the row of the N-layer Bernal stack.
func (c *config) one(ctx context.Context, n int, stderr io.Writer) (row, error) {
	st := mustBernal(n)
	r := row{Layers: n, Stacking: st.String(), Gap: nullable(math.NaN()), SigmaXY: nullable(math.NaN()), Energy: nullable(math.NaN())}
	mf := hartree.MeanField{Device: hartree.Device{Stack: st, Params: c.params}, Interaction: c.in, Field: c.field, T: c.tK, Cutoff: c.cutoff, Grid: c.grid}
	s, err := hartree.NewHFSolver(mf, hartree.HFOptions{})
	if err != nil {
		return r, err
	}
	opt := hartree.SearchOptions{Random: c.random}
	if c.random == 0 {
		opt.Random = -1
	}
	res, err := s.Search(ctx, opt)
	if err != nil {
		r.State = "no converged state"
		return r, err
	}
	g := res.Ground()
	r.Degenerate = res.Degenerate(0)
	r.State, r.Gap, r.SigmaXY, r.Converged, r.Energy = g.Class, nullable(1e3*g.GapRefined), nullable(g.SigmaXY), true, nullable(1e3*g.RelEnergy)
	secs, gaps, err := g.SectorGaps(ctx)
	if err != nil {
		return r, err
	}
	for i, sc := range secs {
		r.SectorGaps = append(r.SectorGaps, nullable(1e3*gaps[i]))
		name := sc.Kind.String()
		if sc.Kind == bands.BilayerLike {
			name += fmt.Sprintf("(λ=%.3f)", sc.Lambda)
		}
		r.Sectors = append(r.Sectors, name)
	}
	if !c.quiet {
		fmt.Fprintf(stderr, "evenodd: N = %d %s: %s, gap %.4f meV, %d states, %d seeds not converged\n",
			n, st, g.Class, 1e3*g.GapRefined, len(res.States), len(res.Failed))
	}
	if c.tc {
		tc, tol, ratio := nullable(0), nullable(0), nullable(math.NaN())
		if g.Class != "symmetric" {
			res, err := s.CriticalTemperature(ctx, g.HFResult, hartree.TcOptions{})
			if err != nil {
				return r, err
			}
			tc, tol, ratio = nullable(res.Tc), nullable(res.Tol), nullable(g.GapRefined/(lattice.BoltzmannEV*res.Tc))
			if !c.quiet {
				fmt.Fprintf(stderr, "evenodd: N = %d: Tc = %.2f ± %.2f K\n", n, res.Tc, res.Tol/2)
			}
		}
		r.Tc, r.TcTol, r.Ratio = &tc, &tol, &ratio
	}
	return r, nil
}

func writeCSV(w io.Writer, c *config, rows []row) error {
	var b strings.Builder
	fmt.Fprintf(&b, "# params %s (%s), eps %g, gates %v at %g nm, screening %v, cutoff %g meV, grid %d, T %g K, D %g V/nm, n %g x 1e12 cm^-2\n",
		c.params.Name, c.params.Source, c.in.Eps, c.in.Gates, c.in.GateDistance, c.in.Screening, 1e3*c.cutoff, c.grid, c.tK, c.field.D, c.field.N/lattice.Per1e12cm2)
	b.WriteString("layers,stacking,state,gap_meV,sector_gaps_meV,sector_kinds,sigma_xy_e2_h,converged,energy_meV_per_nm2,degenerate_states")
	if c.tc {
		b.WriteString(",Tc_K,Tc_tol_K,gap_over_kTc")
	}
	b.WriteByte('\n')
	num := func(x nullable, prec int) string {
		if math.IsNaN(float64(x)) {
			return "NaN"
		}
		v := float64(x)
		if v == 0 {
			v = 0
		}
		return strconv.FormatFloat(v, 'f', prec, 64)
	}
	for _, r := range rows {
		var sg []string
		for _, x := range r.SectorGaps {
			sg = append(sg, num(x, 4))
		}
		fmt.Fprintf(&b, "%d,%s,%q,%s,%s,%s,%s,%t,%s,%q", r.Layers, r.Stacking, r.State, num(r.Gap, 4), strings.Join(sg, ";"),
			strings.Join(r.Sectors, ";"), num(r.SigmaXY, 3), r.Converged, num(r.Energy, 8), strings.Join(r.Degenerate, ";"))
		if c.tc {
			var tc, tol, ratio nullable
			if r.Tc != nil {
				tc, tol, ratio = *r.Tc, *r.TcTol, *r.Ratio
			}
			fmt.Fprintf(&b, ",%s,%s,%s", num(tc, 3), num(tol, 3), num(ratio, 3))
		}
		b.WriteByte('\n')
	}
	_, err := io.WriteString(w, b.String())
	return err
}
