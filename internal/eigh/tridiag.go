package eigh

import "math"

const (
	// ssqSafe: a sum of squares below this may have lost digits to underflow and is recomputed
	// with scaling.
	ssqSafe = 0x1p-900
	// betaTiny: a Householder column whose norm is below this is treated as zero. The working
	// matrix has its largest entry above 2^-256 (see scaleLo), so the change is far below
	// rounding error in norm.
	betaTiny = 0x1p-960
)

// tridiag reduces the Hermitian matrix in ar, ai (lower triangle) to real symmetric tridiagonal
// form T = Qᴴ A Q with Q = H_0 H_1 ... H_{n-2}, H_k = I - tau_k v_k v_kᴴ. The diagonal of T goes
// to d, the off-diagonal to e; v_k and tau_k are kept for the back-transformation. The
// Householder vectors are chosen as in LAPACK's zlarfg, which makes the off-diagonal real.
func (ws *Workspace) tridiag() {
	n := ws.n
	ar, ai := ws.ar[:n*n], ws.ai[:n*n]
	d, e := ws.d[:n], ws.e[:n]
	for k := 0; k < n-1; k++ {
		m := n - k - 1 // order of the trailing block, rows/columns k+1..n-1
		vr := ws.vr[k*n+k+1 : k*n+n]
		vi := ws.vi[k*n+k+1 : k*n+n]
		vr = vr[:m]
		vi = vi[:m]

		// Gather the column below the diagonal: alpha = A[k+1][k], x = A[k+2:][k].
		alphr := ar[(k+1)*n+k]
		alphi := ai[(k+1)*n+k]
		ssq := 0.0
		for i := 1; i < m; i++ {
			p := (k+1+i)*n + k
			xr, xi := ar[p], ai[p]
			vr[i], vi[i] = xr, xi
			ssq += xr*xr + xi*xi
		}
		d[k] = ar[k*n+k]

		var taur, taui, beta float64
		switch {
		case ssq == 0 && alphi == 0 && allZero(vr[1:], vi[1:]):
			// Nothing to annihilate and alpha is real: H = I.
			beta = alphr
		default:
			tot := alphr*alphr + alphi*alphi + ssq
			if tot < ssqSafe {
				beta = safeNorm(alphr, alphi, vr[1:], vi[1:])
			} else {
				beta = math.Sqrt(tot)
			}
			if beta < betaTiny {
				// Negligible column: drop it.
				beta = 0
				break
			}
			if alphr >= 0 {
				beta = -beta
			}
			taur = (beta - alphr) / beta
			taui = -alphi / beta
			// Scale x by 1/(alpha - beta). |alphr - beta| >= |beta| >= |alphi|, so Smith's
			// formula with q = alphi/(alphr-beta) is safe.
			dr := alphr - beta
			q := alphi / dr
			den := dr + alphi*q
			sr := 1 / den
			si := -q / den
			for i := 1; i < m; i++ {
				xr, xi := vr[i], vi[i]
				vr[i] = xr*sr - xi*si
				vi[i] = xr*si + xi*sr
			}
		}
		vr[0], vi[0] = 1, 0
		e[k] = beta
		ws.taur[k], ws.taui[k] = taur, taui
		if (taur == 0 && taui == 0) || m == 1 {
			// H = I, or a 1×1 trailing block, whose (real) diagonal a phase leaves unchanged.
			continue
		}
		ws.update(k, taur, taui)
	}
	e[n-1] = 0
	d[n-1] = ar[(n-1)*n+n-1]
}

// update applies A22 := H_kᴴ A22 H_k to the trailing block A22 (rows and columns k+1..n-1, lower
// triangle) as the rank-2 update A22 - v wᴴ - w vᴴ with
//
//	x = tau A22 v,   w = x - (tau/2) (xᴴ v) v.
func (ws *Workspace) update(k int, taur, taui float64) {
	n := ws.n
	m := n - k - 1
	off := k + 1
	vr := ws.vr[k*n+off : k*n+n]
	vi := ws.vi[k*n+off : k*n+n]
	yr := ws.yr[:m]
	yi := ws.yi[:m]
	vr = vr[:m]
	vi = vi[:m]
	clear(yr)
	clear(yi)

	// y = A22 v from the lower triangle: row i contributes A_ij v_j to y_i and conj(A_ij) v_i
	// to y_j for j < i.
	for i := 0; i < m; i++ {
		row := (off+i)*n + off
		rr := ws.ar[row : row+i+1]
		ri := ws.ai[row : row+len(rr)]
		pvr, pvi := vr[i], vi[i]
		dii := rr[i]
		sr := dii * pvr
		si := dii * pvi
		rr = rr[:i]
		ri = ri[:i]
		vvr := vr[:len(rr)]
		vvi := vi[:len(rr)]
		yyr := yr[:len(rr)]
		yyi := yi[:len(rr)]
		for j, pr := range rr {
			pi := ri[j]
			ur, ui := vvr[j], vvi[j]
			sr += pr*ur - pi*ui
			si += pr*ui + pi*ur
			yyr[j] += pr*pvr + pi*pvi
			yyi[j] += pr*pvi - pi*pvr
		}
		yr[i] += sr
		yi[i] += si
	}

	// x = tau y, and xᴴ v.
	dotr, doti := 0.0, 0.0
	for i := range yr {
		a, b := yr[i], yi[i]
		xr := taur*a - taui*b
		xi := taur*b + taui*a
		yr[i], yi[i] = xr, xi
		dotr += xr*vr[i] + xi*vi[i]
		doti += xr*vi[i] - xi*vr[i]
	}
	// w = x + c v with c = -(tau/2) (xᴴ v).
	cr := -0.5 * (taur*dotr - taui*doti)
	ci := -0.5 * (taur*doti + taui*dotr)
	for i := range yr {
		yr[i] += cr*vr[i] - ci*vi[i]
		yi[i] += cr*vi[i] + ci*vr[i]
	}

	// A22 -= v wᴴ + w vᴴ on the lower triangle.
	wr, wi := yr, yi
	for i := 0; i < m; i++ {
		row := (off+i)*n + off
		rr := ws.ar[row : row+i+1]
		ri := ws.ai[row : row+len(rr)]
		avr, avi := vr[i], vi[i]
		awr, awi := wr[i], wi[i]
		vvr := vr[:len(rr)]
		vvi := vi[:len(rr)]
		wwr := wr[:len(rr)]
		wwi := wi[:len(rr)]
		for j := range rr {
			bwr, bwi := wwr[j], wwi[j]
			bvr, bvi := vvr[j], vvi[j]
			rr[j] -= avr*bwr + avi*bwi + awr*bvr + awi*bvi
			ri[j] -= avi*bwr - avr*bwi + awi*bvr - awr*bvi
		}
	}
}

func allZero(xr, xi []float64) bool {
	for i := range xr {
		if xr[i] != 0 || xi[i] != 0 {
			return false
		}
	}
	return true
}

// safeNorm returns sqrt(alphr² + alphi² + ||x||²) without underflow. It divides by the
// largest magnitude rather than multiplying by its reciprocal, which would overflow for a
// subnormal maximum.
func safeNorm(alphr, alphi float64, xr, xi []float64) float64 {
	s := max(math.Abs(alphr), math.Abs(alphi))
	for i := range xr {
		s = max(s, math.Abs(xr[i]), math.Abs(xi[i]))
	}
	if s == 0 {
		return 0
	}
	t := (alphr/s)*(alphr/s) + (alphi/s)*(alphi/s)
	for i := range xr {
		a, b := xr[i]/s, xi[i]/s
		t += a*a + b*b
	}
	return s * math.Sqrt(t)
}

// backTransform forms the eigenvectors of A, Z = Q q with Q = H_0 H_1 ... H_{n-2}, by applying
// the reflectors to the columns of q (real part, becomes Re Z in place) and ai (imaginary part),
// and writes column perm[j] of Z to z[j*n:(j+1)*n].
func (ws *Workspace) backTransform(z []complex128) {
	n := ws.n
	zr, zi := ws.q[:n*n], ws.ai[:n*n]
	clear(zi)
	wr, wi := ws.yr[:n], ws.yi[:n]
	for k := n - 2; k >= 0; k-- {
		taur, taui := ws.taur[k], ws.taui[k]
		if taur == 0 && taui == 0 {
			continue
		}
		m := n - k - 1
		vr := ws.vr[k*n+k+1 : k*n+n]
		vi := ws.vi[k*n+k+1 : k*n+n]
		vr = vr[:m]
		vi = vi[:m]
		// w = vᴴ Z[k+1:, :] (a row vector); v_0 = 1.
		row := (k + 1) * n
		copy(wr, zr[row:row+n])
		copy(wi, zi[row:row+n])
		for i := 1; i < m; i++ {
			a, b := vr[i], vi[i]
			row := (k + 1 + i) * n
			xr := zr[row : row+n]
			xi := zi[row : row+len(xr)]
			ur := wr[:len(xr)]
			ui := wi[:len(xr)]
			for j, x := range xr {
				y := xi[j]
				ur[j] += a*x + b*y
				ui[j] += a*y - b*x
			}
		}
		// Z[k+1:, :] -= (tau v) w.
		for i := 0; i < m; i++ {
			a, b := vr[i], vi[i]
			tr := taur*a - taui*b
			ti := taur*b + taui*a
			row := (k + 1 + i) * n
			xr := zr[row : row+n]
			xi := zi[row : row+len(xr)]
			ur := wr[:len(xr)]
			ui := wi[:len(xr)]
			for j, x := range ur {
				y := ui[j]
				xr[j] -= tr*x - ti*y
				xi[j] -= tr*y + ti*x
			}
		}
	}
	for j, p := range ws.perm[:n] {
		out := z[j*n : j*n+n]
		for i := range out {
			out[i] = complex(zr[i*n+p], zi[i*n+p])
		}
	}
}
