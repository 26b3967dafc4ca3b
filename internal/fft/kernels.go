package fft

// Radix-r Stockham butterflies. Each radix has two kernels:
//
//   - scalarR: the first pass of a single contiguous transform (s = 1, v = 1), where the twiddle
//     factor changes from one butterfly to the next; x and y have length n = r·m.
//   - vectorR: every other pass, and all passes of batched (column) transforms. The twiddle
//     factor is constant along the innermost loop, which runs over v contiguous numbers.
//
// All kernels compute the forward butterfly. The inverse butterfly (ω → ω⁻¹) equals the forward
// one applied to the inputs in the order 0, r−1, r−2, …, 1, followed by conjugated twiddles;
// callers pass inv and the conjugated table, and the kernels permute their input slices.
//
// The arithmetic is written on real and imaginary parts: products with real constants and
// with ±i then cost what they should (the compiler does not simplify complex(c, 0)·z), and the
// result uses fewer registers. The reslicing x1 := …[:len(x0)] lets the compiler drop bounds
// checks in the inner loops.

const (
	sin60 = 0.86602540378443864676372317075293618347140262690519  // sin(π/3)
	c51   = 0.30901699437494742410229341718281905886436137196432  // cos(2π/5)
	c52   = -0.80901699437494742410229341718281905886436137196432 // cos(4π/5)
	s51   = 0.95105651629515357211643933337938214340569863412576  // sin(2π/5)
	s52   = 0.58778525229247312916870595463907276859765243764314  // sin(4π/5)
)

// cmul returns (ar + i·ai)·w.
func cmul(ar, ai float64, w complex128) complex128 {
	wr, wi := real(w), imag(w)
	return complex(ar*wr-ai*wi, ar*wi+ai*wr)
}

// scaleC returns h·z for real h.
func scaleC(h float64, z complex128) complex128 { return complex(h*real(z), h*imag(z)) }

// ---------------------------------------------------------------- radix 2

func scalar2(y, x []complex128, tw []complex128, _ bool) {
	m := len(x) / 2
	x0, x1 := x[:m], x[m:2*m]
	x1 = x1[:len(x0)]
	y = y[:2*len(x0)]
	for p, u0 := range x0 {
		u1 := x1[p]
		yy := y[2*p : 2*p+2 : 2*p+2]
		yy[0] = u0 + u1
		if p == 0 {
			yy[1] = u0 - u1
			continue
		}
		yy[1] = (u0 - u1) * tw[p]
	}
}

func vector2(a *passArgs) {
	m, s := a.m, a.s
	sm := s * m
	for p := 0; p < m; p++ {
		w1 := complex(1, 0)
		if p > 0 {
			w1 = a.tw[p]
		}
		for q := 0; q < s; q++ {
			e, f := q+s*p, q+2*s*p
			x0 := a.in(e)
			y0 := a.out(f)[:len(x0)]
			switch {
			case f+s >= a.outLen: // pruned output: y1 is not needed
				x1 := a.in(e + sm)[:len(x0)]
				for j, u0 := range x0 {
					y0[j] = u0 + x1[j]
				}
				continue
			case e+sm >= a.inLen: // pruned input: u1 = 0
				y1 := a.out(f + s)[:len(x0)]
				copy(y0, x0)
				for j, u0 := range x0 {
					y1[j] = u0 * w1
				}
				continue
			}
			x1 := a.in(e + sm)[:len(x0)]
			y1 := a.out(f + s)[:len(x0)]
			if p == 0 {
				for j, u0 := range x0 {
					u1 := x1[j]
					y0[j], y1[j] = u0+u1, u0-u1
				}
				continue
			}
			for j, u0 := range x0 {
				u1 := x1[j]
				y0[j], y1[j] = u0+u1, (u0-u1)*w1
			}
		}
	}
}

// ---------------------------------------------------------------- radix 3
//
// 3-point DFT: with t1 = u1+u2, t2 = u0 − t1/2 and t3 = −i·sin(π/3)·(u1−u2),
// y0 = u0+t1, y1 = t2+t3, y2 = t2−t3.

func scalar3(y, x []complex128, tw []complex128, inv bool) {
	m := len(x) / 3
	x0, x1, x2 := x[:m], x[m:2*m], x[2*m:3*m]
	if inv {
		x1, x2 = x2, x1
	}
	x1, x2 = x1[:len(x0)], x2[:len(x0)]
	y = y[:3*len(x0)]
	for p, u0 := range x0 {
		u1, u2 := x1[p], x2[p]
		t1r, t1i := real(u1)+real(u2), imag(u1)+imag(u2)
		t2r, t2i := real(u0)-0.5*t1r, imag(u0)-0.5*t1i
		dr, di := sin60*(real(u1)-real(u2)), sin60*(imag(u1)-imag(u2))
		yy := y[3*p : 3*p+3 : 3*p+3]
		yy[0] = complex(real(u0)+t1r, imag(u0)+t1i)
		if p == 0 {
			yy[1], yy[2] = complex(t2r+di, t2i-dr), complex(t2r-di, t2i+dr)
			continue
		}
		w := tw[2*p : 2*p+2 : 2*p+2]
		yy[1], yy[2] = cmul(t2r+di, t2i-dr, w[0]), cmul(t2r-di, t2i+dr, w[1])
	}
}

func vector3(a *passArgs) {
	m, s := a.m, a.s
	sm := s * m
	k1, k2 := sm, 2*sm
	if a.inv {
		k1, k2 = k2, k1
	}
	for p := 0; p < m; p++ {
		var w1, w2 complex128
		if p > 0 {
			w := a.tw[2*p : 2*p+2 : 2*p+2]
			w1, w2 = w[0], w[1]
		}
		for q := 0; q < s; q++ {
			e, f := q+s*p, q+3*s*p
			x0 := a.in(e)
			x1 := a.in(e + k1)[:len(x0)]
			x2 := a.in(e + k2)[:len(x0)]
			y0 := a.out(f)[:len(x0)]
			y1 := a.out(f + s)[:len(x0)]
			y2 := a.out(f + 2*s)[:len(x0)]
			if p == 0 {
				for j, u0 := range x0 {
					u1, u2 := x1[j], x2[j]
					t1r, t1i := real(u1)+real(u2), imag(u1)+imag(u2)
					t2r, t2i := real(u0)-0.5*t1r, imag(u0)-0.5*t1i
					dr, di := sin60*(real(u1)-real(u2)), sin60*(imag(u1)-imag(u2))
					y0[j] = complex(real(u0)+t1r, imag(u0)+t1i)
					y1[j], y2[j] = complex(t2r+di, t2i-dr), complex(t2r-di, t2i+dr)
				}
				continue
			}
			for j, u0 := range x0 {
				u1, u2 := x1[j], x2[j]
				t1r, t1i := real(u1)+real(u2), imag(u1)+imag(u2)
				t2r, t2i := real(u0)-0.5*t1r, imag(u0)-0.5*t1i
				dr, di := sin60*(real(u1)-real(u2)), sin60*(imag(u1)-imag(u2))
				y0[j] = complex(real(u0)+t1r, imag(u0)+t1i)
				y1[j], y2[j] = cmul(t2r+di, t2i-dr, w1), cmul(t2r-di, t2i+dr, w2)
			}
		}
	}
}

// ---------------------------------------------------------------- radix 4
//
// 4-point DFT: with t0 = u0+u2, t1 = u0−u2, t2 = u1+u3, t3 = u1−u3,
// y0 = t0+t2, y1 = t1 − i·t3, y2 = t0−t2, y3 = t1 + i·t3.

func scalar4(y, x []complex128, tw []complex128, inv bool) {
	m := len(x) / 4
	x0, x1, x2, x3 := x[:m], x[m:2*m], x[2*m:3*m], x[3*m:4*m]
	if inv {
		x1, x3 = x3, x1
	}
	x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
	y = y[:4*len(x0)]
	for p, u0 := range x0 {
		u1, u2, u3 := x1[p], x2[p], x3[p]
		t0r, t0i := real(u0)+real(u2), imag(u0)+imag(u2)
		t1r, t1i := real(u0)-real(u2), imag(u0)-imag(u2)
		t2r, t2i := real(u1)+real(u3), imag(u1)+imag(u3)
		t3r, t3i := real(u1)-real(u3), imag(u1)-imag(u3)
		yy := y[4*p : 4*p+4 : 4*p+4]
		yy[0] = complex(t0r+t2r, t0i+t2i)
		if p == 0 {
			yy[1] = complex(t1r+t3i, t1i-t3r)
			yy[2] = complex(t0r-t2r, t0i-t2i)
			yy[3] = complex(t1r-t3i, t1i+t3r)
			continue
		}
		w := tw[3*p : 3*p+3 : 3*p+3]
		yy[1] = cmul(t1r+t3i, t1i-t3r, w[0])
		yy[2] = cmul(t0r-t2r, t0i-t2i, w[1])
		yy[3] = cmul(t1r-t3i, t1i+t3r, w[2])
	}
}

// scalar4Pruned is the first forward radix-4 pass of a transform of length 4m whose input is
// zero from element len(x) ≤ 2m on; it reads only x. With u2 = u3 = 0 the butterfly reduces to
// y = (u0+u1, u0−i·u1, u0−u1, u0+i·u1) times the twiddles.
func scalar4Pruned(y, x []complex128, m int, tw []complex128) {
	n1 := max(len(x)-m, 0) // u1 is non-zero for p < n1
	n0 := min(len(x), m)   // u0 is non-zero for p < n0
	x0, x1 := x[:n1], x[m:m+n1]
	x1 = x1[:len(x0)]
	y = y[:4*m]
	for p, u0 := range x0 {
		u1 := x1[p]
		yy := y[4*p : 4*p+4 : 4*p+4]
		yy[0] = u0 + u1
		if p == 0 {
			yy[1] = complex(real(u0)+imag(u1), imag(u0)-real(u1))
			yy[2] = u0 - u1
			yy[3] = complex(real(u0)-imag(u1), imag(u0)+real(u1))
			continue
		}
		w := tw[3*p : 3*p+3 : 3*p+3]
		yy[1] = cmul(real(u0)+imag(u1), imag(u0)-real(u1), w[0])
		yy[2] = (u0 - u1) * w[1]
		yy[3] = cmul(real(u0)-imag(u1), imag(u0)+real(u1), w[2])
	}
	for p := n1; p < n0; p++ {
		u0 := x[p]
		yy := y[4*p : 4*p+4 : 4*p+4]
		yy[0] = u0
		if p == 0 {
			yy[1], yy[2], yy[3] = u0, u0, u0
			continue
		}
		w := tw[3*p : 3*p+3 : 3*p+3]
		yy[1], yy[2], yy[3] = u0*w[0], u0*w[1], u0*w[2]
	}
	clear(y[4*n0:])
}

func vector4(a *passArgs) {
	m, s := a.m, a.s
	sm := s * m
	k1, k3 := sm, 3*sm
	if a.inv {
		k1, k3 = k3, k1
	}
	for p := 0; p < m; p++ {
		w1, w2, w3 := complex(1, 0), complex(1, 0), complex(1, 0)
		if p > 0 {
			w := a.tw[3*p : 3*p+3 : 3*p+3]
			w1, w2, w3 = w[0], w[1], w[2]
		}
		for q := 0; q < s; q++ {
			e, f := q+s*p, q+4*s*p
			x0 := a.in(e)
			x1 := a.in(e + k1)[:len(x0)]
			y0 := a.out(f)[:len(x0)]
			switch {
			case f+s >= a.outLen: // pruned output: only y0 is needed
				x2 := a.in(e + 2*sm)[:len(x0)]
				x3 := a.in(e + k3)[:len(x0)]
				for j, u0 := range x0 {
					y0[j] = (u0 + x2[j]) + (x1[j] + x3[j])
				}
				continue
			case f+2*s >= a.outLen: // pruned output: only y0 and y1 are needed
				x2 := a.in(e + 2*sm)[:len(x0)]
				x3 := a.in(e + k3)[:len(x0)]
				y1 := a.out(f + s)[:len(x0)]
				for j, u0 := range x0 {
					u1, u2, u3 := x1[j], x2[j], x3[j]
					t0r, t0i := real(u0)+real(u2), imag(u0)+imag(u2)
					t1r, t1i := real(u0)-real(u2), imag(u0)-imag(u2)
					t2r, t2i := real(u1)+real(u3), imag(u1)+imag(u3)
					t3r, t3i := real(u1)-real(u3), imag(u1)-imag(u3)
					y0[j] = complex(t0r+t2r, t0i+t2i)
					y1[j] = cmul(t1r+t3i, t1i-t3r, w1)
				}
				continue
			}
			y1 := a.out(f + s)[:len(x0)]
			y2 := a.out(f + 2*s)[:len(x0)]
			y3 := a.out(f + 3*s)[:len(x0)]
			switch {
			case a.scale != nil: // inputs multiplied by a real array on the fly
				x2 := a.in(e + 2*sm)[:len(x0)]
				x3 := a.in(e + k3)[:len(x0)]
				h0 := a.scaleOf(e)[:len(x0)]
				h1 := a.scaleOf(e + k1)[:len(x0)]
				h2 := a.scaleOf(e + 2*sm)[:len(x0)]
				h3 := a.scaleOf(e + k3)[:len(x0)]
				for j, u0 := range x0 {
					u0 = scaleC(h0[j], u0)
					u1, u2, u3 := scaleC(h1[j], x1[j]), scaleC(h2[j], x2[j]), scaleC(h3[j], x3[j])
					t0r, t0i := real(u0)+real(u2), imag(u0)+imag(u2)
					t1r, t1i := real(u0)-real(u2), imag(u0)-imag(u2)
					t2r, t2i := real(u1)+real(u3), imag(u1)+imag(u3)
					t3r, t3i := real(u1)-real(u3), imag(u1)-imag(u3)
					y0[j] = complex(t0r+t2r, t0i+t2i)
					y1[j] = cmul(t1r+t3i, t1i-t3r, w1)
					y2[j] = cmul(t0r-t2r, t0i-t2i, w2)
					y3[j] = cmul(t1r-t3i, t1i+t3r, w3)
				}
				continue
			case e+2*sm >= a.inLen && e+k3 >= a.inLen: // pruned input: u2 = u3 = 0
				for j, u0 := range x0 {
					u1 := x1[j]
					y0[j] = u0 + u1
					y1[j] = cmul(real(u0)+imag(u1), imag(u0)-real(u1), w1)
					y2[j] = (u0 - u1) * w2
					y3[j] = cmul(real(u0)-imag(u1), imag(u0)+real(u1), w3)
				}
				continue
			}
			x2 := a.in(e + 2*sm)[:len(x0)]
			x3 := a.in(e + k3)[:len(x0)]
			if p == 0 {
				for j, u0 := range x0 {
					u1, u2, u3 := x1[j], x2[j], x3[j]
					t0r, t0i := real(u0)+real(u2), imag(u0)+imag(u2)
					t1r, t1i := real(u0)-real(u2), imag(u0)-imag(u2)
					t2r, t2i := real(u1)+real(u3), imag(u1)+imag(u3)
					t3r, t3i := real(u1)-real(u3), imag(u1)-imag(u3)
					y0[j] = complex(t0r+t2r, t0i+t2i)
					y1[j] = complex(t1r+t3i, t1i-t3r)
					y2[j] = complex(t0r-t2r, t0i-t2i)
					y3[j] = complex(t1r-t3i, t1i+t3r)
				}
				continue
			}
			for j, u0 := range x0 {
				u1, u2, u3 := x1[j], x2[j], x3[j]
				t0r, t0i := real(u0)+real(u2), imag(u0)+imag(u2)
				t1r, t1i := real(u0)-real(u2), imag(u0)-imag(u2)
				t2r, t2i := real(u1)+real(u3), imag(u1)+imag(u3)
				t3r, t3i := real(u1)-real(u3), imag(u1)-imag(u3)
				y0[j] = complex(t0r+t2r, t0i+t2i)
				y1[j] = cmul(t1r+t3i, t1i-t3r, w1)
				y2[j] = cmul(t0r-t2r, t0i-t2i, w2)
				y3[j] = cmul(t1r-t3i, t1i+t3r, w3)
			}
		}
	}
}

// ---------------------------------------------------------------- radix 5
//
// 5-point DFT: with b1 = u1+u4, b2 = u2+u3, d1 = u1−u4, d2 = u2−u3, ck = cos(2πk/5) and
// sk = sin(2πk/5),
//   y0 = u0 + b1 + b2,
//   y1, y4 = e1 ∓ i·f1 with e1 = u0 + c1·b1 + c2·b2, f1 = s1·d1 + s2·d2,
//   y2, y3 = e2 ∓ i·f2 with e2 = u0 + c2·b1 + c1·b2, f2 = s2·d1 − s1·d2.
// The body is written out in each loop because the compiler does not inline a function of
// this size.

func scalar5(y, x []complex128, tw []complex128, inv bool) {
	m := len(x) / 5
	x0, x1, x2, x3, x4 := x[:m], x[m:2*m], x[2*m:3*m], x[3*m:4*m], x[4*m:5*m]
	if inv {
		x1, x2, x3, x4 = x4, x3, x2, x1
	}
	x1, x2, x3, x4 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)], x4[:len(x0)]
	y = y[:5*len(x0)]
	for p, u0 := range x0 {
		u1, u2, u3, u4 := x1[p], x2[p], x3[p], x4[p]
		b1r, b1i := real(u1)+real(u4), imag(u1)+imag(u4)
		b2r, b2i := real(u2)+real(u3), imag(u2)+imag(u3)
		d1r, d1i := real(u1)-real(u4), imag(u1)-imag(u4)
		d2r, d2i := real(u2)-real(u3), imag(u2)-imag(u3)
		e1r, e1i := real(u0)+c51*b1r+c52*b2r, imag(u0)+c51*b1i+c52*b2i
		e2r, e2i := real(u0)+c52*b1r+c51*b2r, imag(u0)+c52*b1i+c51*b2i
		f1r, f1i := s51*d1r+s52*d2r, s51*d1i+s52*d2i
		f2r, f2i := s52*d1r-s51*d2r, s52*d1i-s51*d2i
		yy := y[5*p : 5*p+5 : 5*p+5]
		yy[0] = complex(real(u0)+b1r+b2r, imag(u0)+b1i+b2i)
		if p == 0 {
			yy[1] = complex(e1r+f1i, e1i-f1r)
			yy[2] = complex(e2r+f2i, e2i-f2r)
			yy[3] = complex(e2r-f2i, e2i+f2r)
			yy[4] = complex(e1r-f1i, e1i+f1r)
			continue
		}
		w := tw[4*p : 4*p+4 : 4*p+4]
		yy[1] = cmul(e1r+f1i, e1i-f1r, w[0])
		yy[2] = cmul(e2r+f2i, e2i-f2r, w[1])
		yy[3] = cmul(e2r-f2i, e2i+f2r, w[2])
		yy[4] = cmul(e1r-f1i, e1i+f1r, w[3])
	}
}

func vector5(a *passArgs) {
	m, s := a.m, a.s
	sm := s * m
	k1, k2, k3, k4 := sm, 2*sm, 3*sm, 4*sm
	if a.inv {
		k1, k2, k3, k4 = k4, k3, k2, k1
	}
	for p := 0; p < m; p++ {
		w1, w2, w3, w4 := complex(1, 0), complex(1, 0), complex(1, 0), complex(1, 0)
		if p > 0 {
			w := a.tw[4*p : 4*p+4 : 4*p+4]
			w1, w2, w3, w4 = w[0], w[1], w[2], w[3]
		}
		for q := 0; q < s; q++ {
			e, f := q+s*p, q+5*s*p
			x0 := a.in(e)
			x1 := a.in(e + k1)[:len(x0)]
			x2 := a.in(e + k2)[:len(x0)]
			x3 := a.in(e + k3)[:len(x0)]
			x4 := a.in(e + k4)[:len(x0)]
			y0 := a.out(f)[:len(x0)]
			y1 := a.out(f + s)[:len(x0)]
			y2 := a.out(f + 2*s)[:len(x0)]
			y3 := a.out(f + 3*s)[:len(x0)]
			y4 := a.out(f + 4*s)[:len(x0)]
			for j, u0 := range x0 {
				u1, u2, u3, u4 := x1[j], x2[j], x3[j], x4[j]
				b1r, b1i := real(u1)+real(u4), imag(u1)+imag(u4)
				b2r, b2i := real(u2)+real(u3), imag(u2)+imag(u3)
				d1r, d1i := real(u1)-real(u4), imag(u1)-imag(u4)
				d2r, d2i := real(u2)-real(u3), imag(u2)-imag(u3)
				e1r, e1i := real(u0)+c51*b1r+c52*b2r, imag(u0)+c51*b1i+c52*b2i
				e2r, e2i := real(u0)+c52*b1r+c51*b2r, imag(u0)+c52*b1i+c51*b2i
				f1r, f1i := s51*d1r+s52*d2r, s51*d1i+s52*d2i
				f2r, f2i := s52*d1r-s51*d2r, s52*d1i-s51*d2i
				y0[j] = complex(real(u0)+b1r+b2r, imag(u0)+b1i+b2i)
				y1[j] = cmul(e1r+f1i, e1i-f1r, w1)
				y2[j] = cmul(e2r+f2i, e2i-f2r, w2)
				y3[j] = cmul(e2r-f2i, e2i+f2r, w3)
				y4[j] = cmul(e1r-f1i, e1i+f1r, w4)
			}
		}
	}
}
