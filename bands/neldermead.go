package bands

import "math"

// minimize2 minimises f over the plane from x0 with a Nelder-Mead simplex of initial size step,
// stopping when the simplex is smaller than xtol or after maxEval evaluations. It returns the
// best point and value. Standard coefficients (reflection 1, expansion 2, contraction 1/2,
// shrink 1/2; Nelder & Mead, Comput. J. 7, 308 (1965)).
func minimize2(f func(x, y float64) float64, x0, y0, step, xtol float64, maxEval int) (bx, by, bf float64) {
	type vtx struct{ x, y, f float64 }
	var s [3]vtx
	s[0] = vtx{x0, y0, f(x0, y0)}
	s[1] = vtx{x0 + step, y0, f(x0+step, y0)}
	s[2] = vtx{x0, y0 + step, f(x0, y0+step)}
	evals := 3
	sort3 := func() {
		if s[1].f < s[0].f {
			s[0], s[1] = s[1], s[0]
		}
		if s[2].f < s[1].f {
			s[1], s[2] = s[2], s[1]
		}
		if s[1].f < s[0].f {
			s[0], s[1] = s[1], s[0]
		}
	}
	for evals < maxEval {
		sort3()
		size := max(math.Abs(s[1].x-s[0].x), math.Abs(s[1].y-s[0].y), math.Abs(s[2].x-s[0].x), math.Abs(s[2].y-s[0].y))
		if size < xtol {
			break
		}
		cx, cy := (s[0].x+s[1].x)/2, (s[0].y+s[1].y)/2
		rx, ry := 2*cx-s[2].x, 2*cy-s[2].y
		fr := f(rx, ry)
		evals++
		switch {
		case fr < s[0].f:
			ex, ey := 3*cx-2*s[2].x, 3*cy-2*s[2].y
			fe := f(ex, ey)
			evals++
			if fe < fr {
				s[2] = vtx{ex, ey, fe}
			} else {
				s[2] = vtx{rx, ry, fr}
			}
		case fr < s[1].f:
			s[2] = vtx{rx, ry, fr}
		default:
			// Contraction, outside if the reflected point is better than the worst.
			var kx, ky float64
			if fr < s[2].f {
				kx, ky = cx+(rx-cx)/2, cy+(ry-cy)/2
			} else {
				kx, ky = cx+(s[2].x-cx)/2, cy+(s[2].y-cy)/2
			}
			fk := f(kx, ky)
			evals++
			if fk < min(fr, s[2].f) {
				s[2] = vtx{kx, ky, fk}
			} else {
				for i := 1; i < 3; i++ {
					s[i].x = s[0].x + (s[i].x-s[0].x)/2
					s[i].y = s[0].y + (s[i].y-s[0].y)/2
					s[i].f = f(s[i].x, s[i].y)
					evals++
				}
			}
		}
	}
	sort3()
	return s[0].x, s[0].y, s[0].f
}
