// Command gatesweep computes how a dual-gated graphene stack screens a displacement field: the
// self-consistent (Hartree) layer potentials, layer densities and band gap versus D at fixed
// carrier density. It is a template: copy it and change what you need.
//
// With no flags it models an invented device of ours: a Bernal bilayer (infrared parameter set)
// encapsulated in hBN, 30 nm below and 25 nm above (ε = 3.4), swept from D = 0 to 2.5 V/nm at
// charge neutrality. It writes a CSV table to stdout, a plot of gap and U_N − U_1 versus D to
// gatesweep.png, and a progress line per point to stderr:
//
//	go run ./examples/gatesweep
//	go run ./examples/gatesweep -stacking ABC -params graphite -D 0,0.2,0.4 -n 0.5 -format json
//	go run ./examples/gatesweep -dmin 0 -dmax 3 -dstep 0.1 -epsz 2.5 -T 10 -o sweep.csv -png sweep.png
//
// Columns (CSV and JSON keys are the same; lists are ';'-separated in CSV, bottom layer first):
//
//	stacking, D_V_per_nm, n_1e12_cm2, eps_z, T_K, dU_meV (U_N − U_1), U_meV (list, layer mean 0),
//	dn_1e12_cm2 (list, layer densities relative to the neutral unbiased stack), gap_meV, mu_meV,
//	converged, iterations, Vb_V, Vt_V (gate voltages of the device for this D and n)
//
// A point that does not converge is written with converged = false and the command exits with
// status 1 after the sweep; its numbers are the last iterate, not a solution.
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
		fmt.Fprintln(os.Stderr, "gatesweep:", err)
		os.Exit(2)
	default:
		fmt.Fprintln(os.Stderr, "gatesweep:", err)
		os.Exit(1)
	}
}

type usageError struct{ error }

func usagef(format string, a ...any) error { return usageError{fmt.Errorf(format, a...)} }

type config struct {
	dev      hartree.Device
	gates    hartree.Gates
	ds       []float64 // V/nm
	n        float64   // 1/nm²
	tK       float64
	format   string
	out, png string
	model    hartree.Model
	cutoff   float64
	quiet    bool
}

func parse(args []string, stderr io.Writer) (*config, error) {
	fs := flag.NewFlagSet("gatesweep", flag.ContinueOnError)
	fs.SetOutput(stderr)
	stacking := fs.String("stacking", "AB", "stacking sequence, bottom layer first")
	params := fs.String("params", "bilayer-ir", "parameter preset ("+strings.Join(lattice.PresetNames(), ", ")+") or JSON file")
	epsz := fs.Float64("epsz", 1, "interlayer dielectric constant ε_z")
	dList := fs.String("D", "", "comma-separated displacement fields D/ε0 in V/nm (overrides -dmin/-dmax/-dstep)")
	dmin := fs.Float64("dmin", 0, "first D/ε0 in V/nm")
	dmax := fs.Float64("dmax", 2.5, "last D/ε0 in V/nm")
	dstep := fs.Float64("dstep", 0.25, "step of D/ε0 in V/nm")
	n := fs.Float64("n", 0, "carrier density in 10^12 cm^-2 (electrons positive)")
	tK := fs.Float64("T", 0, "temperature in K (0 allowed)")
	format := fs.String("format", "csv", "output format: csv or json")
	out := fs.String("o", "", "output file (default stdout)")
	png := fs.String("png", "gatesweep.png", "PNG plot file (empty: no plot)")
	model := fs.String("model", "auto", "band model: auto, continuum or fullzone")
	cutoff := fs.Float64("cutoff", 0, "momentum cutoff ħvΛ in eV for the continuum model (0: none, analytic tail)")
	botNM := fs.Float64("bottom-nm", 30, "bottom gate dielectric thickness in nm")
	topNM := fs.Float64("top-nm", 25, "top gate dielectric thickness in nm")
	epsGate := fs.Float64("eps-gate", 3.4, "gate dielectric constant (hBN about 3.4)")
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
	c := &config{format: *format, out: *out, png: *png, tK: *tK, cutoff: *cutoff, quiet: *quiet}
	st, err := lattice.ParseStack(*stacking)
	if err != nil {
		return nil, usageError{err}
	}
	p, err := lattice.LoadParams(*params)
	if err != nil {
		return nil, usageError{err}
	}
	for name, v := range map[string]float64{"-epsz": *epsz, "-n": *n, "-T": *tK, "-cutoff": *cutoff, "-dmin": *dmin, "-dmax": *dmax, "-dstep": *dstep} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, usagef("%s %g is not a finite number", name, v)
		}
	}
	if *epsz <= 0 {
		return nil, usagef("-epsz %g must be positive", *epsz)
	}
	if *tK < 0 {
		return nil, usagef("-T %g K must not be negative", *tK)
	}
	if *cutoff < 0 {
		return nil, usagef("-cutoff %g must not be negative", *cutoff)
	}
	c.dev = hartree.Device{Stack: st, Params: p, EpsZ: *epsz}
	c.n = *n * lattice.Per1e12cm2
	c.gates = hartree.Gates{
		Bottom: &hartree.Gate{Thickness: *botNM, Eps: *epsGate},
		Top:    &hartree.Gate{Thickness: *topNM, Eps: *epsGate},
	}
	if _, err := c.gates.Field(0, 0); err != nil {
		return nil, usageError{err}
	}
	switch *format {
	case "csv", "json":
	default:
		return nil, usagef("-format %q is not csv or json", *format)
	}
	switch *model {
	case "auto":
		c.model = hartree.Auto
	case "continuum":
		c.model = hartree.Continuum
	case "fullzone":
		c.model = hartree.FullZone
	default:
		return nil, usagef("-model %q is not auto, continuum or fullzone", *model)
	}
	if *dList != "" {
		for _, f := range strings.Split(*dList, ",") {
			v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, usagef("-D: %q is not a finite number", f)
			}
			c.ds = append(c.ds, v)
		}
	} else {
		if *dstep <= 0 || *dmax < *dmin {
			return nil, usagef("need -dstep > 0 and -dmax >= -dmin (got %g, %g, %g)", *dmin, *dmax, *dstep)
		}
		m := int(math.Floor((*dmax-*dmin)/(*dstep)+1e-9)) + 1
		if m > 100000 {
			return nil, usagef("%d D values is too many", m)
		}
		for i := range m {
			c.ds = append(c.ds, *dmin+float64(i)**dstep)
		}
	}
	return c, nil
}

// row is one output line; JSON keys are part of the command's contract.
type row struct {
	Stacking   string    `json:"stacking"`
	D          float64   `json:"D_V_per_nm"`
	N          float64   `json:"n_1e12_cm2"`
	EpsZ       float64   `json:"eps_z"`
	T          float64   `json:"T_K"`
	DU         float64   `json:"dU_meV"`
	U          []float64 `json:"U_meV"`
	Dn         []float64 `json:"dn_1e12_cm2"`
	Gap        float64   `json:"gap_meV"`
	Mu         float64   `json:"mu_meV"`
	Converged  bool      `json:"converged"`
	Iterations int       `json:"iterations"`
	Vb         float64   `json:"Vb_V"`
	Vt         float64   `json:"Vt_V"`
}

func run(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	c, err := parse(args, stderr)
	if err != nil {
		return err
	}
	s, err := hartree.NewSolver(c.dev, c.tK, hartree.Options{Model: c.model, Cutoff: c.cutoff})
	if err != nil {
		return usageError{err}
	}
	conds := make([]hartree.Conditions, len(c.ds))
	for i, d := range c.ds {
		conds[i] = hartree.Conditions{Field: hartree.Field{D: d, N: c.n}, T: c.tK}
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
	var rows []row
	var writeErr error
	if c.format == "csv" {
		writeErr = writeCSVHeader(w, c.dev.Stack.Layers())
	}
	pts, sweepErr := s.Sweep(ctx, conds, func(i int, p hartree.Point) {
		r := toRow(c, p)
		rows = append(rows, r)
		if c.format == "csv" && writeErr == nil {
			writeErr = writeCSVRow(w, r) // streamed: an interrupted sweep keeps its finished points
		}
		if !c.quiet {
			status := "converged"
			if !r.Converged {
				status = "NOT converged"
			}
			fmt.Fprintf(stderr, "gatesweep: point %d/%d D = %.3f V/nm: gap %.2f meV, dU %.2f meV, %s in %d iterations\n",
				i+1, len(conds), r.D, r.Gap, r.DU, status, r.Iterations)
		}
	})
	_ = pts
	if c.format == "json" && writeErr == nil {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		writeErr = enc.Encode(rows)
	}
	if writeErr != nil {
		return writeErr
	}
	if f != nil {
		if err := f.Close(); err != nil {
			return err
		}
	}
	if c.png != "" && len(rows) > 0 {
		if err := plotSweep(c.png, c, rows); err != nil {
			return fmt.Errorf("writing %s: %w", c.png, err)
		}
	}
	if ctx.Err() != nil {
		return sweepErr
	}
	if sweepErr != nil {
		return fmt.Errorf("some points did not converge (written with converged = false): %w", sweepErr)
	}
	return nil
}

func toRow(c *config, p hartree.Point) row {
	r := row{Stacking: c.dev.Stack.String(), D: p.Conditions.Field.D, N: p.Conditions.Field.N / lattice.Per1e12cm2,
		EpsZ: c.dev.EpsZ, T: c.tK}
	if res := p.Result; res != nil {
		n := len(res.U)
		if n > 0 {
			r.DU = 1e3 * (res.U[n-1] - res.U[0])
		}
		for _, u := range res.U {
			r.U = append(r.U, 1e3*u)
		}
		for _, d := range res.Density {
			r.Dn = append(r.Dn, d/lattice.Per1e12cm2)
		}
		r.Gap, r.Mu = 1e3*res.Gap.Gap, 1e3*res.Mu
		r.Converged, r.Iterations = res.Converged && p.Err == nil, res.Iterations
	}
	if vb, vt, err := c.gates.Voltages(p.Conditions.Field); err == nil {
		r.Vb, r.Vt = vb, vt
	}
	return r
}

func writeCSVHeader(w io.Writer, layers int) error {
	_, err := fmt.Fprintln(w, "stacking,D_V_per_nm,n_1e12_cm2,eps_z,T_K,dU_meV,U_meV,dn_1e12_cm2,gap_meV,mu_meV,converged,iterations,Vb_V,Vt_V")
	return err
}

func list(x []float64, prec int) string {
	s := make([]string, len(x))
	for i, v := range x {
		s[i] = strconv.FormatFloat(nz(v), 'f', prec, 64)
		if strings.Trim(s[i], "-0.") == "" {
			s[i] = strings.TrimPrefix(s[i], "-") // no "-0.0000"
		}
	}
	return strings.Join(s, ";")
}

func writeCSVRow(w io.Writer, r row) error {
	_, err := fmt.Fprintf(w, "%s,%.4f,%.4f,%g,%g,%.4f,%s,%s,%.4f,%.4f,%t,%d,%.4f,%.4f\n",
		r.Stacking, nz(r.D), nz(r.N), r.EpsZ, r.T, nz(r.DU), list(r.U, 4), list(r.Dn, 6), nz(r.Gap), nz(r.Mu), r.Converged, r.Iterations, nz(r.Vb), nz(r.Vt))
	return err
}

// nz turns -0 into 0.
func nz(x float64) float64 {
	if x == 0 {
		return 0
	}
	return x
}
