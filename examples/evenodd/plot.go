package main

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
)

func title(c *config) string {
	return fmt.Sprintf("Bernal stacks, %s, eps = %g, %v exchange, cutoff %g meV", c.params.Name, c.in.Eps, c.in.Screening, 1e3*c.cutoff)
}

// plotGaps draws the ground-state gap and the sector gaps (meV) against N.
func plotGaps(file string, c *config, rows []row) error {
	p := plot.New()
	p.Title.Text = title(c)
	p.X.Label.Text = "layers N"
	p.Y.Label.Text = "gap (meV)"
	var gap, bl, ml plotter.XYs
	for _, r := range rows {
		if !math.IsNaN(float64(r.Gap)) {
			gap = append(gap, plotter.XY{X: float64(r.Layers), Y: math.Max(float64(r.Gap), 0)})
		}
		for i, k := range r.Sectors {
			v := float64(r.SectorGaps[i])
			if math.IsNaN(v) {
				continue
			}
			pt := plotter.XY{X: float64(r.Layers), Y: math.Max(v, 0)}
			if k == "monolayer-like" {
				ml = append(ml, pt)
			} else {
				bl = append(bl, pt)
			}
		}
	}
	add := func(xy plotter.XYs, name string, col color.Color, line bool) error {
		if len(xy) == 0 {
			return nil
		}
		sc, err := plotter.NewScatter(xy)
		if err != nil {
			return err
		}
		sc.Color = col
		p.Add(sc)
		p.Legend.Add(name, sc)
		if line {
			l, err := plotter.NewLine(xy)
			if err != nil {
				return err
			}
			l.Color = col
			p.Add(l)
		}
		return nil
	}
	if err := add(gap, "ground-state gap", color.RGBA{R: 200, G: 30, B: 30, A: 255}, true); err != nil {
		return err
	}
	if err := add(bl, "bilayer-like sectors", color.RGBA{R: 20, G: 60, B: 160, A: 255}, false); err != nil {
		return err
	}
	if err := add(ml, "monolayer-like sector", color.RGBA{R: 20, G: 140, B: 60, A: 255}, false); err != nil {
		return err
	}
	p.Legend.Top, p.Legend.Left = true, true
	p.X.Min, p.X.Max = 0.5, float64(rows[len(rows)-1].Layers)+0.5
	p.Y.Max *= 1.25 // room for the legend
	p.Add(plotter.NewGrid())
	return p.Save(6*vg.Inch, 4.5*vg.Inch, file)
}

// plotTc draws Tc (K) against N.
func plotTc(file string, c *config, rows []row) error {
	p := plot.New()
	p.Title.Text = title(c)
	p.X.Label.Text = "layers N"
	p.Y.Label.Text = "mean-field Tc (K)"
	var xy plotter.XYs
	for _, r := range rows {
		if r.Tc != nil && !math.IsNaN(float64(*r.Tc)) {
			xy = append(xy, plotter.XY{X: float64(r.Layers), Y: float64(*r.Tc)})
		}
	}
	if len(xy) == 0 {
		return fmt.Errorf("no Tc to plot")
	}
	l, pts, err := plotter.NewLinePoints(xy)
	if err != nil {
		return err
	}
	p.Add(l, pts, plotter.NewGrid())
	return p.Save(6*vg.Inch, 4.5*vg.Inch, file)
}
