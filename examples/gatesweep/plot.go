package main

import (
	"fmt"
	"image/color"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
)

// plotSweep draws the gap and U_N − U_1 (meV) against D (V/nm).
func plotSweep(file string, c *config, rows []row) error {
	p := plot.New()
	p.Title.Text = fmt.Sprintf("%s, %s, eps_z = %g, n = %g x 1e12 cm^-2, T = %g K", c.dev.Stack, c.dev.Params.Name, c.dev.EpsZ, c.n/0.01, c.tK)
	p.X.Label.Text = "D/ε0 (V/nm)"
	p.Y.Label.Text = "energy (meV)"
	gap := make(plotter.XYs, 0, len(rows))
	du := make(plotter.XYs, 0, len(rows))
	for _, r := range rows {
		if !r.Converged {
			continue
		}
		gap = append(gap, plotter.XY{X: r.D, Y: r.Gap})
		du = append(du, plotter.XY{X: r.D, Y: r.DU})
	}
	if len(gap) == 0 {
		return fmt.Errorf("no converged point to plot")
	}
	for _, s := range []struct {
		xy    plotter.XYs
		name  string
		color color.Color
	}{
		{gap, "band gap", color.RGBA{R: 200, G: 30, B: 30, A: 255}},
		{du, "U_N − U_1", color.RGBA{R: 20, G: 60, B: 160, A: 255}},
	} {
		l, pts, err := plotter.NewLinePoints(s.xy)
		if err != nil {
			return err
		}
		l.Color, pts.Color = s.color, s.color
		p.Add(l, pts)
		p.Legend.Add(s.name, l, pts)
	}
	p.Legend.Top, p.Legend.Left = true, true
	p.Add(plotter.NewGrid())
	return p.Save(6*vg.Inch, 4.5*vg.Inch, file)
}
