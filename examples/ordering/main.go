// Command ordering finds the competing interaction-driven states of a graphene stack in
// Hartree-Fock mean-field theory and ranks them by energy. It is a template: copy it and change
// what you need.
//
// With no flags it studies an invented suspended device of ours: a Bernal tetralayer at charge
// neutrality, with metal gates 40 nm above and below, the library's default screened (static
// RPA) exchange, ħvΛ = 150 meV and a 48-point grid. Every seed (every class of flavour
// polarization signs with outer-layer, layer-staggered and sublattice profiles, the symmetric
// state and random seeds) is iterated to self-consistency; distinct converged states are listed
// lowest energy first, and seeds that do not converge are listed as such:
//
//	go run ./examples/ordering
//	go run ./examples/ordering -stacking AB -eps 4 -screening bare -grid 48 -cutoff 1000 -format json
//	go run ./examples/ordering -stacking ABC -params graphite -D 0.05 -n 0.1 -gates one -gate-distance 20
//
// Columns (CSV; JSON keys are the same):
//
//	state, pattern, seed, energy_meV_per_nm2 (relative to the symmetric state), gap_meV,
//	sigma_xy_e2_h, chern (per flavour, NaN when a flavour is gapless), layer_density_1e12_cm2
//	(per flavour a list of per-layer densities relative to the neutral stack), converged,
//	iterations, ground, seeds (all seeds that reached the state), mu_meV
//
// Flavours are ordered (up,K), (up,K'), (down,K), (down,K'). In CSV, flavours are separated by
// '|' and layers by ';'.
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
		fmt.Fprintln(os.Stderr, "ordering:", err)
		os.Exit(2)
	default:
		fmt.Fprintln(os.Stderr, "ordering:", err)
		os.Exit(1)
	}
}

type usageError struct{ error }

func usagef(format string, a ...any) error { return usageError{fmt.Errorf(format, a...)} }

type config struct {
	mf     hartree.MeanField
	search hartree.SearchOptions
	format string
	out    string
	quiet  bool
}

func parse(args []string, stderr io.Writer) (*config, error) {
	fs := flag.NewFlagSet("ordering", flag.ContinueOnError)
	fs.SetOutput(stderr)
	stacking := fs.String("stacking", "ABAB", "stacking sequence, bottom layer first")
	params := fs.String("params", "minimal", "parameter preset ("+strings.Join(lattice.PresetNames(), ", ")+") or JSON file")
	eps := fs.Float64("eps", 1, "background dielectric constant ε (1: suspended)")
	gates := fs.String("gates", "two", "metal gates screening the interaction: none, one or two")
	gateDist := fs.Float64("gate-distance", 40, "distance from the stack to each gate in nm")
	screening := fs.String("screening", "rpa", "exchange interaction: rpa (static RPA of the non-interacting stack), bare, thomas-fermi")
	qtf := fs.Float64("qtf", 0, "Thomas-Fermi wave vector in 1/nm (with -screening thomas-fermi)")
	cutoff := fs.Float64("cutoff", 150, "momentum cutoff ħvΛ in meV")
	grid := fs.Int("grid", 48, "k-grid points across the disk around each valley")
	tK := fs.Float64("T", 0, "temperature in K")
	D := fs.Float64("D", 0, "displacement field D/ε0 in V/nm")
	n := fs.Float64("n", 0, "carrier density in 10^12 cm^-2")
	random := fs.Int("random", 2, "number of random seeds")
	rseed := fs.Uint64("seed", 1, "first RNG seed of the random seeds")
	allSigns := fs.Bool("all-signs", false, "seed all 16 flavour sign assignments, not one per symmetry class")
	format := fs.String("format", "csv", "output format: csv or json")
	out := fs.String("o", "", "output file (default stdout)")
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
	st, err := lattice.ParseStack(*stacking)
	if err != nil {
		return nil, usageError{err}
	}
	p, err := lattice.LoadParams(*params)
	if err != nil {
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
	switch *format {
	case "csv", "json":
	default:
		return nil, usagef("-format %q is not csv or json", *format)
	}
	c := &config{format: *format, out: *out, quiet: *quiet}
	c.mf = hartree.MeanField{
		Device:      hartree.Device{Stack: st, Params: p},
		Interaction: hartree.Interaction{Eps: *eps, Gates: g, GateDistance: *gateDist, Screening: scr, QTF: *qtf},
		Field:       hartree.Field{D: *D, N: *n * lattice.Per1e12cm2},
		T:           *tK, Cutoff: *cutoff * 1e-3, Grid: *grid,
	}
	if g == hartree.NoGates {
		c.mf.Interaction.GateDistance = 0
	}
	c.search = hartree.SearchOptions{AllAssignments: *allSigns, Random: *random, RandomSeed: *rseed}
	if *random == 0 {
		c.search.Random = -1
	}
	return c, nil
}

// nullable encodes NaN as JSON null.
type nullable float64

func (x nullable) MarshalJSON() ([]byte, error) {
	if math.IsNaN(float64(x)) || math.IsInf(float64(x), 0) {
		return []byte("null"), nil
	}
	return []byte(strconv.FormatFloat(float64(x), 'g', 8, 64)), nil
}

// row is one output object; the keys are part of the command's contract.
type row struct {
	State      string        `json:"state"`
	Pattern    string        `json:"pattern"`
	Seed       string        `json:"seed"`
	Energy     nullable      `json:"energy_meV_per_nm2"`
	Gap        nullable      `json:"gap_meV"`
	Density    [][]float64   `json:"layer_density_1e12_cm2"`
	Chern      [4]nullable   `json:"chern"`
	SigmaXY    nullable      `json:"sigma_xy_e2_h"`
	Converged  bool          `json:"converged"`
	Iterations int           `json:"iterations"`
	Ground     bool          `json:"ground"`
	Seeds      []string      `json:"seeds"`
	Mu         nullable      `json:"mu_meV"`
	Order      [4][3]float64 `json:"order_dipole_staggered_sublattice_1e12_cm2"`
}

func run(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	c, err := parse(args, stderr)
	if err != nil {
		return err
	}
	s, err := hartree.NewHFSolver(c.mf, hartree.HFOptions{})
	if err != nil {
		return usageError{err}
	}
	if !c.quiet {
		c.search.Progress = func(done, total int, r *hartree.HFResult) {
			st := "converged"
			if !r.Converged {
				st = "NOT converged"
			}
			fmt.Fprintf(stderr, "ordering: seed %d/%d %-16s %s in %d iterations: %s, gap %.3f meV\n",
				done, total, r.Seed, st, r.Iterations, r.Class, 1e3*r.GapRefined)
		}
	}
	res, searchErr := s.Search(ctx, c.search)
	if ctx.Err() != nil {
		return searchErr
	}
	var rows []row
	for i, st := range res.States {
		rows = append(rows, toRow(st.HFResult, st.RelEnergy, i == 0, st.Seeds))
	}
	for _, f := range res.Failed {
		r := toRow(f, math.NaN(), false, []string{f.Seed})
		r.State = "not converged: " + r.State
		rows = append(rows, r)
	}
	w := stdout
	if c.out != "" {
		f, err := os.Create(c.out)
		if err != nil {
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
	if f, ok := w.(*os.File); ok && c.out != "" {
		if err := f.Close(); err != nil {
			return err
		}
	}
	return searchErr
}

func toRow(r *hartree.HFResult, rel float64, ground bool, seeds []string) row {
	out := row{State: r.Class, Pattern: r.Pattern, Seed: r.Seed, Energy: nullable(1e3 * rel),
		Gap: nullable(1e3 * r.GapRefined), SigmaXY: nullable(r.SigmaXY), Converged: r.Converged,
		Iterations: r.Iterations, Ground: ground, Seeds: seeds, Mu: nullable(1e3 * r.Mu)}
	for f := range hartree.Flavors {
		out.Chern[f] = nullable(r.Chern[f])
		var layers []float64
		for _, v := range r.Flavor[f] {
			layers = append(layers, v/lattice.Per1e12cm2)
		}
		out.Density = append(out.Density, layers)
		o := r.Order[f]
		out.Order[f] = [3]float64{o.Dipole / lattice.Per1e12cm2, o.Staggered / lattice.Per1e12cm2, o.Sublattice / lattice.Per1e12cm2}
	}
	return out
}

func writeCSV(w io.Writer, c *config, rows []row) error {
	var b strings.Builder
	mf := c.mf
	fmt.Fprintf(&b, "# stacking %s, params %s (%s), eps %g, gates %v at %g nm, screening %v, cutoff %g meV, grid %d, T %g K, D %g V/nm, n %g x 1e12 cm^-2\n",
		mf.Device.Stack, mf.Device.Params.Name, mf.Device.Params.Source, mf.Interaction.Eps, mf.Interaction.Gates, mf.Interaction.GateDistance,
		mf.Interaction.Screening, 1e3*mf.Cutoff, mf.Grid, mf.T, mf.Field.D, mf.Field.N/lattice.Per1e12cm2)
	b.WriteString("state,pattern,seed,energy_meV_per_nm2,gap_meV,sigma_xy_e2_h,chern,layer_density_1e12_cm2,converged,iterations,ground,seeds,mu_meV\n")
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
		var ch []string
		for _, x := range r.Chern {
			ch = append(ch, num(x, 3))
		}
		var fl []string
		for _, layers := range r.Density {
			var ls []string
			for _, v := range layers {
				ls = append(ls, num(nullable(v), 6))
			}
			fl = append(fl, strings.Join(ls, ";"))
		}
		fmt.Fprintf(&b, "%q,%s,%s,%s,%s,%s,%s,%s,%t,%d,%t,%s,%s\n", r.State, r.Pattern, r.Seed, num(r.Energy, 8), num(r.Gap, 4),
			num(r.SigmaXY, 3), strings.Join(ch, ";"), strings.Join(fl, "|"), r.Converged, r.Iterations, r.Ground,
			strings.Join(r.Seeds, ";"), num(r.Mu, 4))
	}
	_, err := io.WriteString(w, b.String())
	return err
}
