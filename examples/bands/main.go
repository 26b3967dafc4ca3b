// Command bands computes the band structure of a graphene stack and writes it as a CSV table and a
// PNG plot. It is a template: copy it and change what you need.
//
// With no flags it models an invented device of ours, a Bernal tetralayer under a displacement
// field that puts 40 meV between its outer layers (a linear potential profile), and writes the
// bands near valley K along k_x to stdout and bands.png:
//
//	go run ./examples/bands
//	go run ./examples/bands -stacking ABCA -params graphite -U -30,-10,10,30 -o abca.csv -png abca.png
//	go run ./examples/bands -stacking AB -path zone -png ab_zone.png
//
// Output (long format, one row per k-point and band; '#' lines carry the settings):
//
//	# stacking ABAB, params graphite (Dresselhaus & Dresselhaus, ...), valley K, U_meV -20 -6.667 6.667 20
//	k_1_per_nm,kx_1_per_nm,ky_1_per_nm,band,E_meV,w_L1,w_L2,w_L3,w_L4
//	-0.300000,-0.300000,0.000000,1,-611.234,0.1207,...
//
// The layer weights w_Ll are the probability of the state on layer l (they sum to 1).
package main

import (
	"context"
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
		fmt.Fprintln(os.Stderr, "bands:", err)
		os.Exit(2)
	default:
		fmt.Fprintln(os.Stderr, "bands:", err)
		os.Exit(1)
	}
}

// usageError marks bad command-line input (exit status 2).
type usageError struct{ error }

func usagef(format string, a ...any) error { return usageError{fmt.Errorf(format, a...)} }

type config struct {
	stack  lattice.Stack
	params lattice.Params
	u      []float64 // eV
	valley bands.Valley
	path   bands.Path
	out    string
	png    string
}

func parse(args []string, stderr io.Writer) (*config, error) {
	fs := flag.NewFlagSet("bands", flag.ContinueOnError)
	fs.SetOutput(stderr)
	stacking := fs.String("stacking", "ABAB", "stacking sequence, bottom layer first (letters A, B, C)")
	params := fs.String("params", "graphite", "parameter preset ("+strings.Join(lattice.PresetNames(), ", ")+") or JSON file")
	uList := fs.String("U", "", "layer potentials in meV, comma-separated, bottom first (overrides -dU)")
	dU := fs.Float64("dU", 40, "potential difference U_N - U_1 in meV, spread linearly over the layers")
	valley := fs.String("valley", "K", "valley for continuum paths: K or K'")
	path := fs.String("path", "line", "k-path: line (through K), radial (from K outwards) or zone (Γ-K-M-Γ, full-zone model)")
	angle := fs.Float64("angle", 0, "direction of a line or radial path, degrees from k_x")
	kmax := fs.Float64("kmax", 0.3, "half-length of a line or length of a radial path, 1/nm")
	points := fs.Int("points", 301, "number of k-points")
	out := fs.String("o", "", "CSV output file (default stdout)")
	png := fs.String("png", "bands.png", "PNG plot file (empty: no plot)")
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil, err
		}
		return nil, usageError{err}
	}
	if fs.NArg() > 0 {
		return nil, usagef("unexpected argument %q", fs.Arg(0))
	}
	c := &config{out: *out, png: *png}
	var err error
	if c.stack, err = lattice.ParseStack(*stacking); err != nil {
		return nil, usageError{err}
	}
	if c.params, err = lattice.LoadParams(*params); err != nil {
		return nil, usageError{err}
	}
	n := c.stack.Layers()
	if *uList != "" {
		c.u, err = floats(*uList)
		if err != nil {
			return nil, usagef("-U: %v", err)
		}
		if len(c.u) != n {
			return nil, usagef("-U has %d values for %d layers", len(c.u), n)
		}
		for i := range c.u {
			c.u[i] *= 1e-3
		}
	} else {
		if math.IsNaN(*dU) || math.IsInf(*dU, 0) {
			return nil, usagef("-dU %g is not finite", *dU)
		}
		c.u = make([]float64, n)
		for l := range c.u {
			if n > 1 {
				c.u[l] = 1e-3 * *dU * (float64(l)/float64(n-1) - 0.5)
			}
		}
	}
	switch *valley {
	case "K":
		c.valley = bands.K
	case "K'", "Kp", "KPrime":
		c.valley = bands.KPrime
	default:
		return nil, usagef("-valley %q is not K or K'", *valley)
	}
	th := *angle * math.Pi / 180
	switch *path {
	case "line":
		c.path, err = bands.Line(th, *kmax, *points)
	case "radial":
		c.path, err = bands.Radial(th, *kmax, *points)
	case "zone":
		c.path, err = bands.ZonePath(c.params.A, *points)
	default:
		return nil, usagef("-path %q is not line, radial or zone", *path)
	}
	if err != nil {
		return nil, usageError{err}
	}
	return c, nil
}

func floats(s string) ([]float64, error) {
	var out []float64
	for _, f := range strings.Split(s, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
		if err != nil {
			return nil, err
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%q is not a finite number", f)
		}
		out = append(out, v)
	}
	return out, nil
}

func run(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	c, err := parse(args, stderr)
	if err != nil {
		return err
	}
	var h bands.Hamiltonian
	zone := c.path.Labels[0].Name == "Γ"
	if zone {
		h, err = bands.NewFullZone(c.stack, c.params, c.u)
	} else {
		h, err = bands.NewContinuum(c.stack, c.params, c.valley, c.u)
	}
	if err != nil {
		return err
	}
	s, err := bands.Compute(ctx, h, c.path, bands.Options{})
	if err != nil {
		return err
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
	if err := writeCSV(w, c, s, zone); err != nil {
		return err
	}
	if c.out != "" {
		if err := w.(*os.File).Close(); err != nil {
			return err
		}
	}
	if c.png != "" {
		title := fmt.Sprintf("%s, %s", c.stack, c.params.Name)
		if !zone {
			title += fmt.Sprintf(", valley %v", c.valley)
		}
		if err := plotBands(c.png, title, s, zone); err != nil {
			return fmt.Errorf("writing %s: %w", c.png, err)
		}
	}
	return nil
}

func writeCSV(w io.Writer, c *config, s *bands.Structure, zone bool) error {
	var b strings.Builder
	model := "continuum, valley " + c.valley.String()
	if zone {
		model = "full zone"
	}
	fmt.Fprintf(&b, "# stacking %s, params %s (%s), %s, U_meV", c.stack, c.params.Name, c.params.Source, model)
	for _, u := range c.u {
		fmt.Fprintf(&b, " %.4g", 1e3*u)
	}
	b.WriteString("\nk_1_per_nm,kx_1_per_nm,ky_1_per_nm,band,E_meV")
	for l := 1; l <= c.stack.Layers(); l++ {
		fmt.Fprintf(&b, ",w_L%d", l)
	}
	b.WriteByte('\n')
	for i, k := range s.Points {
		for band, e := range s.Energies[i] {
			fmt.Fprintf(&b, "%.6f,%.6f,%.6f,%d,%.4f", nz(s.Dist[i]), nz(k.X), nz(k.Y), band+1, 1e3*e)
			for _, wl := range s.Weights[i][band] {
				fmt.Fprintf(&b, ",%.4f", wl)
			}
			b.WriteByte('\n')
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// nz turns -0 into 0 so that tables do not show "-0.000000".
func nz(x float64) float64 {
	if x == 0 {
		return 0
	}
	return x
}
