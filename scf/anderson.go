package scf

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
)

// Defaults used by [Anderson] when the corresponding field is 0.
const (
	DefaultDepth          = 8
	DefaultRegularization = 1e-10
	DefaultRestartCond    = 1e8
	DefaultRestartGrowth  = 100
)

// Anderson is Anderson mixing of type II, known in electronic structure as
// Pulay mixing or DIIS. With the residual f_k = G(x_k) − x_k and the
// differences of the last m iterates as columns,
//
//	ΔX = [x_{k-m+1} − x_{k-m}, ..., x_k − x_{k-1}],   ΔF likewise from f,
//
// each step solves the regularised least-squares problem
//
//	γ = argmin ‖f_k − ΔF γ‖² + λ ‖D γ‖²,   D = diag(‖ΔF column j‖),
//
// and moves to
//
//	x_{k+1} = x_k + β f_k − (ΔX + β ΔF) γ.
//
// With no history (m = 0) this is linear mixing with the same β. For a
// linear G on Rⁿ, β = 1, unlimited history and no restarts, the iterates
// are those of GMRES mapped through G, x_{k+1} = G(x_k^GMRES) (Walker & Ni,
// SIAM J. Numer. Anal. 49, 1715 (2011)), so in exact arithmetic x_{n+1} is
// the fixed point: n+1 steps, n+2 evaluations of G counting the one at x0.
//
// The least-squares problem is solved without forming the Gram matrix
// ΔFᵀΔF, whose condition number is the square of that of ΔF. The columns
// of ΔF are scaled to unit length (so the Gram matrix has unit diagonal and
// λ = Regularization is relative to its scale) and factorised by Householder
// QR, ΔF_s = Q R. LAPACK's 1-norm estimate of cond(R) = cond(ΔF_s) decides
// restarts, and the Tikhonov problem becomes the small least-squares problem
// [R; √λ I] γ_s ≈ [Qᵀ f_k; 0], solved by a second QR.
//
// The history is cleared (a restart, after which the step is a linear one)
// when that condition number exceeds RestartCond, or when ‖f_k‖₂ exceeds
// RestartGrowth times the smallest ‖f‖₂ since the last restart. The first
// Warmup steps are linear and collect no history: mean-field problems often
// need a few damped steps before their residuals behave linearly enough for
// extrapolation to help.
//
// The zero value is usable. Anderson is a configuration: [Anderson.Start]
// allocates all buffers of a run (about (3m+5)·n floats) once, and later
// steps do not allocate. The arithmetic is done by gonum's pure-Go LAPACK,
// independent of any implementation registered with lapack64.Use, so results
// are reproducible.
//
// References: D. G. Anderson, J. ACM 12, 547 (1965); P. Pulay, Chem. Phys.
// Lett. 73, 393 (1980); H. F. Walker and P. Ni, SIAM J. Numer. Anal. 49,
// 1715 (2011); H. Fang and Y. Saad, Numer. Linear Algebra Appl. 16, 197
// (2009) (the type I / type II names).
type Anderson struct {
	// Depth is the history length m, the number of earlier iterates the
	// step may combine. 0 means DefaultDepth (8). A negative Depth means
	// no history: every step is a linear-mixing step with Beta, bitwise
	// equal to [Linear]{Beta}. Depths above the vector length n are
	// reduced to n, since more than n differences are linearly dependent.
	Depth int

	// Beta is the mixing parameter β (dimensionless) applied to the
	// predicted residual. 0 means DefaultBeta (0.3). NaN, infinite and
	// negative values are errors.
	Beta float64

	// Regularization is λ above (dimensionless, relative to the unit
	// diagonal of the scaled Gram matrix). 0 means DefaultRegularization
	// (1e-10). A tiny value such as 1e-30 is in effect no regularisation.
	// NaN, infinite and negative values are errors.
	Regularization float64

	// Warmup is the number of initial linear-mixing steps before
	// acceleration starts. 0 means none. Negative values are errors.
	Warmup int

	// RestartCond is the largest estimated condition number of the
	// column-scaled ΔF that is accepted before the history is cleared. 0 means
	// DefaultRestartCond (1e8). +Inf never restarts on conditioning.
	// NaN and values below 1 (other than 0) are errors.
	RestartCond float64

	// RestartGrowth clears the history when ‖f_k‖₂ exceeds RestartGrowth
	// times the smallest ‖f‖₂ since the last restart. 0 means
	// DefaultRestartGrowth (100). +Inf switches this off. NaN and values
	// below 1 (other than 0) are errors.
	RestartGrowth float64

	// Normal solves the least-squares problem through its normal equations,
	// (ΔF_sᵀ ΔF_s + λ I) γ_s = ΔF_sᵀ f_k, with the Gram matrix updated
	// incrementally: about 2mn flops per step instead of the 4m²n of the QR
	// factorisation, which matters for long vectors (n of order 10⁶, as in
	// mean-field problems on k-grids). The price is accuracy: the Gram matrix
	// has the squared condition number, so in this mode the history is also
	// cleared when cond(ΔF_s) exceeds 1e6 (if RestartCond is larger).
	Normal bool
}

var _ Mixer = Anderson{}

// withDefaults returns a copy with defaults filled in, or an error wrapping
// ErrInvalid naming the first bad field.
func (a Anderson) withDefaults() (Anderson, error) {
	bad := func(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) || v < 0 }
	switch {
	case bad(a.Beta):
		return a, fmt.Errorf("%w: Anderson.Beta = %v, want a finite value > 0 (0 means %g)", ErrInvalid, a.Beta, DefaultBeta)
	case bad(a.Regularization):
		return a, fmt.Errorf("%w: Anderson.Regularization = %v, want a finite value > 0 (0 means %g)", ErrInvalid, a.Regularization, DefaultRegularization)
	case a.Warmup < 0:
		return a, fmt.Errorf("%w: Anderson.Warmup = %d, want >= 0", ErrInvalid, a.Warmup)
	case math.IsNaN(a.RestartCond) || (a.RestartCond != 0 && a.RestartCond < 1):
		return a, fmt.Errorf("%w: Anderson.RestartCond = %v, want >= 1 or +Inf (0 means %g)", ErrInvalid, a.RestartCond, DefaultRestartCond)
	case math.IsNaN(a.RestartGrowth) || (a.RestartGrowth != 0 && a.RestartGrowth < 1):
		return a, fmt.Errorf("%w: Anderson.RestartGrowth = %v, want >= 1 or +Inf (0 means %g)", ErrInvalid, a.RestartGrowth, float64(DefaultRestartGrowth))
	}
	switch {
	case a.Depth == 0:
		a.Depth = DefaultDepth
	case a.Depth < 0:
		a.Depth = 0
	}
	if a.Beta == 0 {
		a.Beta = DefaultBeta
	}
	if a.Regularization == 0 {
		a.Regularization = DefaultRegularization
	}
	if a.RestartCond == 0 {
		a.RestartCond = DefaultRestartCond
	}
	if a.RestartGrowth == 0 {
		a.RestartGrowth = DefaultRestartGrowth
	}
	return a, nil
}

// String returns a short description such as
// "anderson(depth=8, beta=0.3)", with defaults filled in and non-default
// optional fields appended. Invalid fields are printed as they are.
func (a Anderson) String() string {
	d, err := a.withDefaults()
	if err != nil {
		return fmt.Sprintf("anderson(depth=%d, beta=%g, regularization=%g, warmup=%d, restartCond=%g, restartGrowth=%g)",
			a.Depth, a.Beta, a.Regularization, a.Warmup, a.RestartCond, a.RestartGrowth)
	}
	var b strings.Builder
	fmt.Fprintf(&b, "anderson(depth=%d, beta=%g", d.Depth, d.Beta)
	if d.Warmup != 0 {
		fmt.Fprintf(&b, ", warmup=%d", d.Warmup)
	}
	b.WriteByte(')')
	return b.String()
}

// Start returns an Anderson-mixing run for vectors of length n, with all of
// its buffers allocated.
func (a Anderson) Start(n int) (Mixing, error) {
	c, err := a.withDefaults()
	if err != nil {
		return nil, err
	}
	if n < 1 {
		return nil, fmt.Errorf("%w: Anderson: vector length %d, want >= 1", ErrInvalid, n)
	}
	m := min(c.Depth, n)
	s := &andersonMixing{
		n:       n,
		m:       m,
		beta:    c.Beta,
		lambda:  c.Regularization,
		warmup:  c.Warmup,
		maxCond: c.RestartCond,
		growth:  c.RestartGrowth,
		normal:  c.Normal,
		xk:      make([]float64, n),
		fk:      make([]float64, n),
		xprev:   make([]float64, n),
		fprev:   make([]float64, n),
	}
	if m == 0 {
		return s, nil
	}
	s.dx = make([][]float64, m)
	s.df = make([][]float64, m)
	for j := range m {
		s.dx[j] = make([]float64, n)
		s.df[j] = make([]float64, n)
	}
	s.norm = make([]float64, m)
	s.slot = make([]int, m)
	s.gamma = make([]float64, m)
	s.a = make([]float64, m*n)
	s.c = make([]float64, n)
	s.tau = make([]float64, m)
	s.b = make([]float64, 2*m*m)
	s.d = make([]float64, 2*m)
	s.tau2 = make([]float64, m)
	s.conWork = make([]float64, 3*m)
	s.conIwork = make([]int, m)
	if c.Normal {
		s.gram = make([]float64, m*m)
		s.gs = make([]float64, m*m)
		s.ga = make([]float64, m*m)
		s.ev = make([]float64, m)
		s.ework = make([]float64, 3*m+16)
		s.maxCond = math.Min(s.maxCond, 1e6)
		return s, nil
	}
	// Workspace queries for every history length that can occur.
	q := []float64{0}
	lwork := 1
	for k := 1; k <= m; k++ {
		lapackImpl.Dgelqf(k, n, s.a[:k*n], n, s.tau[:k], q, -1)
		lwork = max(lwork, int(q[0]))
		lapackImpl.Dormlq(blas.Left, blas.NoTrans, n, 1, k, s.a[:k*n], n, s.tau[:k], s.c, 1, q, -1)
		lwork = max(lwork, int(q[0]))
		lapackImpl.Dgeqrf(2*k, k, s.b[:2*k*k], k, s.tau2[:k], q, -1)
		lwork = max(lwork, int(q[0]))
		lapackImpl.Dormqr(blas.Left, blas.Trans, 2*k, 1, k, s.b[:2*k*k], k, s.tau2[:k], s.d[:2*k], 1, q, -1)
		lwork = max(lwork, int(q[0]))
	}
	s.work = make([]float64, lwork)
	return s, nil
}

// lapackImpl is gonum's pure-Go LAPACK, used directly so that results do
// not depend on what was registered with lapack64.Use.
var lapackImpl gonum.Implementation

// andersonMixing is the state of one Anderson run.
type andersonMixing struct {
	n, m    int // vector length, history capacity
	beta    float64
	lambda  float64
	warmup  int
	maxCond float64
	growth  float64
	normal  bool

	// Normal-equations mode: Gram matrix of the stored Δf by slot, and scratch.
	gram  []float64 // m×m, gram[i*m+j] = <df[i], df[j]>
	gs    []float64 // scaled k×k system
	ga    []float64 // its copy for the eigenvalue estimate
	ev    []float64
	ework []float64

	calls    int     // completed Next calls
	havePrev bool    // xprev, fprev hold the previous iterate
	fmin     float64 // smallest ‖f‖₂ since the last restart

	xk, fk       []float64 // current iterate and residual (copies)
	xprev, fprev []float64

	// Ring buffers of differences; slot head is written next.
	dx, df      [][]float64
	norm        []float64 // ‖df[slot]‖₂
	head, count int

	// Least-squares workspace.
	slot     []int     // slots, oldest first
	gamma    []float64 // coefficients of the unscaled columns
	a        []float64 // k×n: rows are the scaled Δf, then their LQ factors
	c        []float64 // Q f
	tau      []float64
	b        []float64 // 2k×k: [R; √λ I], then its QR factors
	d        []float64 // [Q f; 0], then the solution
	tau2     []float64
	work     []float64
	conWork  []float64
	conIwork []int
}

func (s *andersonMixing) Next(dst, x, gx []float64) (int, error) {
	if err := checkLengths("Anderson", s.n, dst, x, gx); err != nil {
		return 0, err
	}
	for i := range s.fk {
		s.fk[i] = gx[i] - x[i]
	}
	fn := floats.Norm(s.fk, 2)
	if math.IsNaN(fn) || math.IsInf(fn, 0) {
		return 0, fmt.Errorf("scf: Anderson step %d: residual norm ‖G(x)−x‖₂ = %v", s.calls+1, fn)
	}
	copy(s.xk, x)

	used := 0
	switch {
	case s.m == 0 || s.calls < s.warmup || !s.havePrev:
		s.fmin = fn
	case fn > s.growth*s.fmin:
		s.clear()
		s.fmin = fn
	default:
		s.push()
		s.fmin = min(s.fmin, fn)
		if s.count > 0 {
			used = s.solve()
			if used == 0 {
				s.clear()
				s.fmin = fn
			}
		}
	}
	if used == 0 {
		linearStep(dst, s.xk, gx, s.beta)
	} else {
		s.extrapolate(dst)
	}
	s.xk, s.xprev = s.xprev, s.xk
	s.fk, s.fprev = s.fprev, s.fk
	s.havePrev = true
	s.calls++
	return used, nil
}

// clear empties the history; the current iterate stays as the new base.
func (s *andersonMixing) clear() {
	s.head, s.count = 0, 0
}

// push stores x_k − x_{k−1} and f_k − f_{k−1}, unless the residual did not
// change at all (a zero column carries no information).
func (s *andersonMixing) push() {
	if floats.Equal(s.fk, s.fprev) {
		return
	}
	dx, df := s.dx[s.head], s.df[s.head]
	for i := range df {
		dx[i] = s.xk[i] - s.xprev[i]
		df[i] = s.fk[i] - s.fprev[i]
	}
	s.norm[s.head] = floats.Norm(df, 2)
	if s.normal {
		// New row and column of the Gram matrix against the slots that stay.
		h := s.head
		for j := range min(s.count+1, s.m) {
			slot := (h - j + s.m) % s.m
			v := floats.Dot(df, s.df[slot])
			s.gram[h*s.m+slot], s.gram[slot*s.m+h] = v, v
		}
	}
	s.head = (s.head + 1) % s.m
	s.count = min(s.count+1, s.m)
}

// solve computes gamma for the current history. It returns the number of
// columns used, or 0 when the history must be cleared because its estimated
// condition number exceeds the limit.
func (s *andersonMixing) solve() int {
	if s.normal {
		return s.solveNormal()
	}
	n, k := s.n, s.count
	// Rows of a are the columns of ΔF scaled to unit length. Its LQ
	// factorisation a = L Q is the QR factorisation ΔF_s = Qᵀ R with
	// R = Lᵀ; rows are contiguous, which keeps the Householder updates
	// fast for long vectors.
	a := s.a[:k*n]
	for j := range k {
		slot := (s.head - k + j + s.m) % s.m
		s.slot[j] = slot
		floats.ScaleTo(a[j*n:(j+1)*n], 1/s.norm[slot], s.df[slot])
	}
	tau := s.tau[:k]
	lapackImpl.Dgelqf(k, n, a, n, tau, s.work, len(s.work))
	copy(s.c, s.fk)
	lapackImpl.Dormlq(blas.Left, blas.NoTrans, n, 1, k, a, n, tau, s.c, 1, s.work, len(s.work))

	// b = [R; √λ I] with R = Lᵀ (k×k upper triangular).
	b := s.b[:2*k*k]
	clear(b)
	for i := range k {
		for j := i; j < k; j++ {
			b[i*k+j] = a[j*n+i]
		}
		b[(k+i)*k+i] = math.Sqrt(s.lambda)
	}
	// LAPACK's 1-norm estimate of cond(R) = cond(ΔF_s) (within a factor
	// of about k of the 2-norm value); rcond is 0 for a singular R.
	rcond := lapackImpl.Dtrcon(lapack.MaxColumnSum, blas.Upper, blas.NonUnit, k, b, k, s.conWork[:3*k], s.conIwork[:k])
	if !(1/rcond <= s.maxCond) {
		return 0
	}
	// Tikhonov: min ‖[Qf; 0] − [R; √λ I] γ_s‖₂, by QR of the 2k×k matrix.
	tau2 := s.tau2[:k]
	lapackImpl.Dgeqrf(2*k, k, b, k, tau2, s.work, len(s.work))
	d := s.d[:2*k]
	copy(d, s.c[:k])
	clear(d[k:])
	lapackImpl.Dormqr(blas.Left, blas.Trans, 2*k, 1, k, b, k, tau2, d, 1, s.work, len(s.work))
	if !lapackImpl.Dtrtrs(blas.Upper, blas.NoTrans, blas.NonUnit, k, 1, b, k, d, 1) {
		return 0 // unreachable for λ > 0, which makes the factor nonsingular
	}
	for j := range k {
		s.gamma[j] = d[j] / s.norm[s.slot[j]]
	}
	return k
}

// solveNormal solves the scaled, regularised normal equations by Cholesky
// factorisation, after checking the condition number of the scaled Gram
// matrix (its square root is cond(ΔF_s)).
func (s *andersonMixing) solveNormal() int {
	k, m := s.count, s.m
	for j := range k {
		s.slot[j] = (s.head - k + j + m) % m
	}
	g := s.gs[:k*k]
	for i := range k {
		si := s.slot[i]
		for j := range k {
			sj := s.slot[j]
			g[i*k+j] = s.gram[si*m+sj] / (s.norm[si] * s.norm[sj])
		}
	}
	// Condition estimate from the symmetric eigenvalues (k is small).
	a := s.ga[:k*k]
	copy(a, g)
	if !lapackImpl.Dsyev(lapack.EVNone, blas.Upper, k, a, k, s.ev[:k], s.ework, len(s.ework)) {
		return 0
	}
	lo, hi := s.ev[0], s.ev[k-1]
	if !(lo > 0) || !(math.Sqrt(hi/lo) <= s.maxCond) {
		return 0
	}
	rhs := s.d[:k]
	for j := range k {
		rhs[j] = floats.Dot(s.df[s.slot[j]], s.fk) / s.norm[s.slot[j]]
		g[j*k+j] += s.lambda
	}
	// Cholesky in place (lower), then two triangular solves.
	for j := range k {
		d := g[j*k+j]
		for p := range j {
			d -= g[j*k+p] * g[j*k+p]
		}
		if d <= 0 {
			return 0
		}
		d = math.Sqrt(d)
		g[j*k+j] = d
		for i := j + 1; i < k; i++ {
			v := g[i*k+j]
			for p := range j {
				v -= g[i*k+p] * g[j*k+p]
			}
			g[i*k+j] = v / d
		}
	}
	for i := range k {
		v := rhs[i]
		for p := range i {
			v -= g[i*k+p] * rhs[p]
		}
		rhs[i] = v / g[i*k+i]
	}
	for i := k - 1; i >= 0; i-- {
		v := rhs[i]
		for p := i + 1; p < k; p++ {
			v -= g[p*k+i] * rhs[p]
		}
		rhs[i] = v / g[i*k+i]
	}
	for j := range k {
		s.gamma[j] = rhs[j] / s.norm[s.slot[j]]
	}
	return k
}

// extrapolate writes x_k + β f_k − Σ_j γ_j (Δx_j + β Δf_j) into dst.
func (s *andersonMixing) extrapolate(dst []float64) {
	for i := range dst {
		dst[i] = s.xk[i] + s.beta*s.fk[i]
	}
	for j, slot := range s.slot[:s.count] {
		g := s.gamma[j]
		dx, df := s.dx[slot], s.df[slot]
		for i := range dst {
			dst[i] -= g * (dx[i] + s.beta*df[i])
		}
	}
}

var _ Mixing = (*andersonMixing)(nil)
