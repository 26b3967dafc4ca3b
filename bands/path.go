package bands

import (
	"fmt"
	"math"
)

// KPoint is a wave vector in 1/nm. For continuum Hamiltonians it is measured from the valley
// point; for [FullZone] it is absolute.
type KPoint struct{ X, Y float64 }

// Label marks a named point of a path.
type Label struct {
	Index int    // index into Path.Points
	Name  string // e.g. "Γ", "K", "M"
}

// Path is a sequence of k-points with the cumulative distance along it.
type Path struct {
	Points []KPoint
	Dist   []float64 // cumulative length along the path (1/nm); for a line through K, the signed coordinate
	Labels []Label
}

func finitePositive(name string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 {
		return fmt.Errorf("bands: %s = %g must be a positive finite number", name, v)
	}
	return nil
}

// Line returns n points on the straight line through the valley point along the direction at
// angle theta (radians from the k_x axis), from -kmax to +kmax (1/nm). Dist holds the signed
// coordinate along the line. n must be at least 2.
func Line(theta, kmax float64, n int) (Path, error) {
	if err := finitePositive("kmax", kmax); err != nil {
		return Path{}, err
	}
	if math.IsNaN(theta) || math.IsInf(theta, 0) {
		return Path{}, fmt.Errorf("bands: line angle %g is not finite", theta)
	}
	if n < 2 {
		return Path{}, fmt.Errorf("bands: a line needs at least 2 points, got %d", n)
	}
	s, c := math.Sincos(theta)
	p := Path{Points: make([]KPoint, n), Dist: make([]float64, n)}
	for i := range n {
		t := -kmax + 2*kmax*float64(i)/float64(n-1)
		p.Points[i] = KPoint{t * c, t * s}
		p.Dist[i] = t
	}
	p.Labels = []Label{{Index: (n - 1) / 2, Name: "K"}}
	return p, nil
}

// Radial returns n points from the valley point (k = 0) out to kmax along angle theta.
func Radial(theta, kmax float64, n int) (Path, error) {
	if err := finitePositive("kmax", kmax); err != nil {
		return Path{}, err
	}
	if math.IsNaN(theta) || math.IsInf(theta, 0) {
		return Path{}, fmt.Errorf("bands: radial angle %g is not finite", theta)
	}
	if n < 2 {
		return Path{}, fmt.Errorf("bands: a radial cut needs at least 2 points, got %d", n)
	}
	s, c := math.Sincos(theta)
	p := Path{Points: make([]KPoint, n), Dist: make([]float64, n)}
	for i := range n {
		t := kmax * float64(i) / float64(n-1)
		p.Points[i] = KPoint{t * c, t * s}
		p.Dist[i] = t
	}
	p.Labels = []Label{{Index: 0, Name: "K"}}
	return p, nil
}

// ZonePath returns the path Γ-K-M-Γ of the hexagonal Brillouin zone for lattice constant a (nm)
// with about n points in all, spaced evenly in length. K = (4π/3a, 0), M = (π/a, π/(√3 a)).
func ZonePath(a float64, n int) (Path, error) {
	if err := finitePositive("a", a); err != nil {
		return Path{}, err
	}
	if n < 4 {
		return Path{}, fmt.Errorf("bands: a zone path needs at least 4 points, got %d", n)
	}
	corners := []struct {
		k    KPoint
		name string
	}{
		{KPoint{0, 0}, "Γ"},
		{KPoint{4 * math.Pi / (3 * a), 0}, "K"},
		{KPoint{math.Pi / a, math.Pi / (math.Sqrt(3) * a)}, "M"},
		{KPoint{0, 0}, "Γ"},
	}
	total := 0.0
	seg := make([]float64, len(corners)-1)
	for i := range seg {
		seg[i] = math.Hypot(corners[i+1].k.X-corners[i].k.X, corners[i+1].k.Y-corners[i].k.Y)
		total += seg[i]
	}
	var p Path
	d := 0.0
	for i := range seg {
		m := max(1, int(math.Round(float64(n-1)*seg[i]/total)))
		p.Labels = append(p.Labels, Label{Index: len(p.Points), Name: corners[i].name})
		for j := range m {
			t := float64(j) / float64(m)
			a, b := corners[i].k, corners[i+1].k
			p.Points = append(p.Points, KPoint{a.X + t*(b.X-a.X), a.Y + t*(b.Y-a.Y)})
			p.Dist = append(p.Dist, d+t*seg[i])
		}
		d += seg[i]
	}
	last := corners[len(corners)-1]
	p.Labels = append(p.Labels, Label{Index: len(p.Points), Name: last.name})
	p.Points = append(p.Points, last.k)
	p.Dist = append(p.Dist, d)
	return p, nil
}
