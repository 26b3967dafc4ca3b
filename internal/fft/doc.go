// Package fft provides fast, allocation-free complex FFTs in one and two dimensions, and a
// Convolver for the zero-padded 2D convolutions of the mean-field (exchange) self-energy.
//
// # Conventions
//
// The forward transform has the negative sign in the exponent and no normalisation; the
// inverse transform has the positive sign and the factor 1/N, so that Inverse undoes Forward:
//
//	Forward:  X_kl = Σ_ij x_ij exp(−2πi(ik/nx + jl/ny))
//	Inverse:  x_ij = 1/(nx·ny) Σ_kl X_kl exp(+2πi(ik/nx + jl/ny))
//
// (and likewise in 1D with Plan). This is the convention of numpy.fft and of gonum's
// dsp/fourier CmplxFFT (Coefficients = Forward, Sequence = n·Inverse).
//
// # Storage and sizes
//
// 2D arrays are row-major: element (i, j) of an nx×ny array is x[i*ny+j], i < nx, j < ny.
// Transforms work in place. Every axis length must be a positive product of powers of 2, 3 and
// 5; other lengths, and arrays of more than 2²⁸ elements, are rejected with an error wrapping
// ErrSize. All errors start with "fft: ". No exported function panics on bad input.
//
// # Algorithm
//
// Each axis is transformed by a mixed-radix Stockham autosort FFT (radix 4 where possible,
// then 2, 3 and 5) with precomputed twiddle tables, so there is no bit-reversal pass. Rows
// are transformed one at a time in cache. Columns are transformed in blocks of 8 adjacent
// columns: the first pass reads the block straight from the array and the last pass writes it
// back, the passes in between work in two small scratch arrays, and every butterfly runs over
// 8 (or, once the blocks are contiguous, more) consecutive numbers with one twiddle factor.
// There are no transposes and no allocations per call.
//
// # Convolutions
//
// A Convolver computes the linear convolution of l1×l2 fields with a real, even kernel given
// on the difference grid, by transforms zero padded to PaddedSize(l1)×PaddedSize(l2) (sizes
// that are products of 2 and 3 and at least 2·l−1, so nothing wraps around). The transform of
// a real even kernel is real, so a Kernel stores one float64 per frequency. The transforms are
// pruned: only the l1 non-zero rows of the padded source are row-transformed, the column
// transforms skip the zero half of their input and produce only the l1 output rows that are
// kept, and the product with the kernel is fused into the first inverse column pass while a
// block of columns is in cache. ConvolveReal2 convolves two real fields in one complex
// transform, and ConvolveMulti convolves one source with several kernels sharing its forward
// transform.
//
// # Concurrency
//
// Plan, Plan2D and Convolver hold scratch space: none of them is safe for concurrent use, so
// use one per goroutine. A Kernel is read-only once made and may be shared by Convolvers of
// the same grid size in any number of goroutines.
package fft
