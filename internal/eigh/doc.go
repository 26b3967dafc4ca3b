// Package eigh computes eigenvalues and eigenvectors of small dense complex Hermitian matrices
// (orders 2 to 64, mostly 4 to 20) quickly and without allocation. gonum has no complex
// Hermitian eigensolver; this package fills that gap for the band-structure code.
//
// # Usage
//
//	ws, err := eigh.NewWorkspace(n) // once per goroutine and order
//	w := make([]float64, n)         // eigenvalues, ascending
//	z := make([]complex128, n*n)    // eigenvectors, z[j*n:(j+1)*n] is eigenvector j
//	err = ws.Eigen(w, z, a)         // or ws.Values(w, a) for eigenvalues only
//
// # Storage
//
// A matrix of order n is a []complex128 of length n*n in row-major order, a[i*n+j] = A_ij. Only
// the lower triangle i >= j is read, and of the diagonal only the real part (the imaginary part
// must still be finite); the matrix is taken to be Hermitian and the upper triangle is never
// looked at. The input is not modified.
//
// Eigenvalues come back in ascending order. Eigenvector j is stored contiguously,
// z[j*n+i] = component i of eigenvector j, so that
//
//	A z_j = w_j z_j,   z_jᴴ z_k = δ_jk.
//
// Each eigenvector is determined only up to a phase factor, and within a degenerate eigenspace
// only the spanned subspace is determined; callers must not rely on a particular phase or basis.
//
// # Algorithm
//
// The matrix is copied into split real and imaginary arrays and, if its largest entry lies
// outside [2^-256, 2^256], scaled by a power of two (exactly). Householder reflectors
// H_k = I - τ_k v_k v_kᴴ, chosen (as LAPACK's zlarfg chooses them) so that the off-diagonal
// elements they produce are real, reduce it to a real symmetric tridiagonal matrix
//
//	T = Qᴴ A Q,   Q = H_0 H_1 ... H_{n-2}.
//
// Eigen then runs the implicit QL iteration with Wilkinson shifts on T, accumulating the real
// plane rotations into the real orthogonal eigenvector matrix R of T, and forms the eigenvectors
// of A as Z = Q R by applying the reflectors to R. Values instead runs the root-free QL
// iteration of Pal, Walker and Kahan on T scaled to norm about 1, which needs no square root in
// its inner loop. A block of T is split off where an off-diagonal element satisfies
// |e_i| <= ε (|d_i| + |d_{i+1}|) (|e_i|² <= ε² |d_i d_{i+1}| in the root-free variant) or is
// below ε²·||T||, with ε = 2^-53. Finally the eigenvalues are sorted and unscaled.
//
// # Accuracy
//
// Both reductions are normwise backward stable: the computed eigenvalues and eigenvectors are
// exact for a Hermitian matrix A + E with ||E|| of order n·ε·||A||. Consequently each eigenvalue
// has an absolute error of order n·ε·||A||, the residuals ||A z_j - w_j z_j|| are of the same
// order, and the eigenvectors are orthonormal to order n·ε. Exactly or nearly degenerate
// eigenvalues do not spoil orthogonality. An eigenvector whose eigenvalue is separated from the
// rest of the spectrum by a gap g is accurate to about n·ε·||A||/g in angle; within a degenerate
// or tight cluster only the spanned subspace is determined, to the same accuracy with g the gap
// around the cluster. Small eigenvalues are not computed to high relative accuracy. The tests
// check residuals against 10·n·ε·||A||_F and orthogonality against 10·n·ε on random and
// structured matrices up to order 64.
//
// # Errors
//
// No function panics on bad input. Wrong slice lengths, n < 1, NaN or infinite entries,
// eigenvalues that overflow float64 and (not observed in practice) failure of the QL iteration
// to converge within 50 iterations per eigenvalue are returned as errors whose text starts with
// "eigh: ".
//
// # Concurrency
//
// A [Workspace] holds the scratch memory of one computation and is not safe for concurrent use:
// give each goroutine its own (for example one per worker in a k-point loop). Different
// Workspaces share nothing. Results depend only on the input, never on scheduling.
package eigh
