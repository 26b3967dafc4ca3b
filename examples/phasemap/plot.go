package main

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"image/color"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
)

type cell struct {
	n, d  float64
	state string
	gap   float64
}

// readCells reads the points of a scan file (CSV or JSONL) for plotting.
func readCells(path string) ([]cell, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	var out []cell
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 1<<20), 1<<26)
	line := 0
	var cols map[string]int
	for sc.Scan() {
		line++
		t := sc.Text()
		if strings.HasPrefix(t, "#") || t == "" {
			continue
		}
		if strings.HasPrefix(t, "{") {
			var m map[string]any
			if err := json.Unmarshal([]byte(t), &m); err != nil {
				return nil, fmt.Errorf("%s line %d: %w", path, line, err)
			}
			if _, ok := m["format"]; ok {
				continue
			}
			c := cell{n: num(m["n_1e12_cm2"]), d: num(m["D_V_per_nm"]), gap: num(m["gap_meV"])}
			c.state, _ = m["state"].(string)
			out = append(out, c)
			continue
		}
		rec, err := csv.NewReader(strings.NewReader(t)).Read()
		if err != nil {
			return nil, fmt.Errorf("%s line %d: %w", path, line, err)
		}
		if cols == nil {
			cols = map[string]int{}
			for i, name := range rec {
				cols[name] = i
			}
			continue
		}
		get := func(k string) string { return rec[cols[k]] }
		n, _ := strconv.ParseFloat(get("n_1e12_cm2"), 64)
		d, _ := strconv.ParseFloat(get("D_V_per_nm"), 64)
		g, err := strconv.ParseFloat(get("gap_meV"), 64)
		if err != nil {
			g = math.NaN()
		}
		out = append(out, cell{n: n, d: d, state: get("state"), gap: g})
	}
	return out, sc.Err()
}

func num(v any) float64 {
	if x, ok := v.(float64); ok {
		return x
	}
	return math.NaN()
}

var palette = []color.RGBA{
	{R: 230, G: 230, B: 230, A: 255}, {R: 31, G: 119, B: 180, A: 255}, {R: 255, G: 127, B: 14, A: 255},
	{R: 44, G: 160, B: 44, A: 255}, {R: 214, G: 39, B: 40, A: 255}, {R: 148, G: 103, B: 189, A: 255},
	{R: 140, G: 86, B: 75, A: 255}, {R: 227, G: 119, B: 194, A: 255}, {R: 188, G: 189, B: 34, A: 255},
}

// plot draws the ground state of every point as a coloured cell, with a legend of states.
func (c *config) plot(path string) error {
	if c.png == "" {
		return nil
	}
	cells, err := readCells(path)
	if err != nil {
		return err
	}
	if len(cells) == 0 {
		return fmt.Errorf("%s holds no points", path)
	}
	var states []string
	for _, x := range cells {
		if !slices.Contains(states, x.state) {
			states = append(states, x.state)
		}
	}
	slices.Sort(states)
	if i := slices.Index(states, "symmetric"); i > 0 {
		states[0], states[i] = states[i], states[0] // grey for the symmetric state
	}
	dn, dd := step(c.set.Ns), step(c.set.Ds)
	p := plot.New()
	p.Title.Text = fmt.Sprintf("%s, %s, eps = %g, %s exchange: ground states", c.set.Stacking, c.set.Params.Name, c.set.Eps, c.set.Screening)
	p.X.Label.Text = "n (1e12 cm^-2)"
	p.Y.Label.Text = "D/eps0 (V/nm)"
	for si, s := range states {
		col := palette[si%len(palette)]
		var first *plotter.Polygon
		for _, x := range cells {
			if x.state != s {
				continue
			}
			poly, err := plotter.NewPolygon(plotter.XYs{{X: x.n - dn/2, Y: x.d - dd/2}, {X: x.n + dn/2, Y: x.d - dd/2},
				{X: x.n + dn/2, Y: x.d + dd/2}, {X: x.n - dn/2, Y: x.d + dd/2}})
			if err != nil {
				return err
			}
			poly.Color = col
			poly.LineStyle.Width = 0
			p.Add(poly)
			if first == nil {
				first = poly
			}
		}
		if first != nil {
			p.Legend.Add(s, first)
		}
	}
	// Leave room on the right of the map for the legend.
	lo, hi := slices.Min(c.set.Ns)-dn/2, slices.Max(c.set.Ns)+dn/2
	p.X.Min, p.X.Max = lo, hi+0.45*(hi-lo)
	p.Legend.Top = true
	p.Legend.TextStyle.Font.Size = vg.Points(9)
	p.Legend.ThumbnailWidth = vg.Points(12)
	return p.Save(7*vg.Inch, 5*vg.Inch, c.png)
}

func step(x []float64) float64 {
	if len(x) < 2 {
		return 1
	}
	return math.Abs(x[1] - x[0])
}
