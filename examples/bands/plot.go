package main

import (
	"image/color"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"lamina/bands"
)

// plotBands draws every band against the path coordinate, energies in meV.
func plotBands(file, title string, s *bands.Structure, zone bool) error {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = "k along the path (1/nm)"
	if zone {
		p.X.Label.Text = "path Γ-K-M-Γ (1/nm)"
	}
	p.Y.Label.Text = "E (meV)"
	nb := len(s.Energies[0])
	for b := range nb {
		xy := make(plotter.XYs, len(s.Points))
		for i := range s.Points {
			xy[i].X = s.Dist[i]
			xy[i].Y = 1e3 * s.Energies[i][b]
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return err
		}
		l.Color = color.RGBA{R: 20, G: 60, B: 160, A: 255}
		if b == nb/2-1 || b == nb/2 {
			l.Color = color.RGBA{R: 200, G: 30, B: 30, A: 255} // the bands at neutrality
		}
		p.Add(l)
	}
	if !zone {
		// Focus on the low-energy window where the interesting physics is.
		p.Y.Min, p.Y.Max = -400, 400
	}
	p.Add(plotter.NewGrid())
	return p.Save(6*vg.Inch, 4.5*vg.Inch, file)
}
