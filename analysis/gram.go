package analysis

import (
	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/floats"
)

// gramUpper sets the upper triangle of c to A·Aᵀ, A being r × m: the
// same result as blas64.Syrk(blas.NoTrans, 1, a, 0, c) with c upper, up to
// the order of the additions. The strict lower triangle is not touched.
//
// Gram and cross-product matrices are the inner loop of the bootstrap,
// parallel analysis, leave-one-out and cross-validation. gonum's Syrk takes
// each entry as one dot product over the whole row; with rows of thousands
// of entries every dot product streams two rows from memory. Here the
// columns are taken in chunks that stay in the L2 cache, and within a chunk
// four rows are multiplied with two at a time (eight sums in registers),
// with AVX2 fused multiply-adds where the processor has them
// (gram_amd64.s). Each entry is summed chunk by chunk, four lanes at a time,
// so it differs from a plain dot product in the last bits (relative error
// of order m·ε, as for any summation order; Higham 2002, §3.1).
func gramUpper(c blas64.Symmetric, a blas64.General) {
	if c.Uplo != blas.Upper || c.N != a.Rows {
		panic("analysis: gramUpper needs an upper r × r destination")
	}
	r, m := a.Rows, a.Cols
	for i := 0; i < r; i++ {
		clear(c.Data[i*c.Stride+i : i*c.Stride+r])
	}
	// About 256 KiB of rows per chunk (a common L2 size), in multiples of 4.
	chunk := max(256, min(4096, 32768/max(r, 1))) &^ 3
	for l0 := 0; l0 < m; l0 += chunk {
		gramChunk(c, a, l0, min(l0+chunk, m))
	}
}

// gramChunk adds the products of columns l0 to l1 of a to c's upper triangle.
func gramChunk(c blas64.Symmetric, a blas64.General, l0, l1 int) {
	r := a.Rows
	row := func(i int) []float64 { return a.Data[i*a.Stride+l0 : i*a.Stride+l1] }
	var s [8]float64
	i := 0
	for ; i+4 <= r; i += 4 {
		a0, a1, a2, a3 := row(i), row(i+1), row(i+2), row(i+3)
		j := i
		for ; j+2 <= r; j += 2 {
			dot4x2(a0, a1, a2, a3, row(j), row(j+1), &s)
			for q := 0; q < 4; q++ {
				at := (i+q)*c.Stride + j
				if i+q <= j {
					c.Data[at] += s[2*q]
				}
				if i+q <= j+1 {
					c.Data[at+1] += s[2*q+1]
				}
			}
		}
		if j < r {
			b := row(j)
			for q, aq := range [4][]float64{a0, a1, a2, a3} {
				if i+q <= j {
					c.Data[(i+q)*c.Stride+j] += floats.Dot(aq, b)
				}
			}
		}
	}
	for ; i < r; i++ {
		ai := row(i)
		for j := i; j < r; j++ {
			c.Data[i*c.Stride+j] += floats.Dot(ai, row(j))
		}
	}
}

// dot4x2 sets s to the eight dot products of a0…a3 with b0 and b1, in the
// order a0·b0, a0·b1, a1·b0, …, a3·b1. All six slices must have a0's length.
func dot4x2(a0, a1, a2, a3, b0, b1 []float64, s *[8]float64) {
	n := len(a0)
	a1, a2, a3, b0, b1 = a1[:n], a2[:n], a3[:n], b0[:n], b1[:n]
	head := 0
	if haveFMAKernel && n >= 4 {
		head = n &^ 3
		dot4x2FMA(&a0[0], &a1[0], &a2[0], &a3[0], &b0[0], &b1[0], head, s)
	} else {
		*s = [8]float64{}
	}
	dot4x2Go(a0[head:], a1[head:], a2[head:], a3[head:], b0[head:], b1[head:], s)
}

// dot4x2Go adds the eight dot products to s, in plain Go.
func dot4x2Go(a0, a1, a2, a3, b0, b1 []float64, s *[8]float64) {
	n := len(a0)
	a1, a2, a3, b0, b1 = a1[:n], a2[:n], a3[:n], b0[:n], b1[:n]
	var s00, s01, s10, s11, s20, s21, s30, s31 float64
	for l := 0; l < n; l++ {
		x0, x1, x2, x3 := a0[l], a1[l], a2[l], a3[l]
		y0, y1 := b0[l], b1[l]
		s00 += x0 * y0
		s01 += x0 * y1
		s10 += x1 * y0
		s11 += x1 * y1
		s20 += x2 * y0
		s21 += x2 * y1
		s30 += x3 * y0
		s31 += x3 * y1
	}
	s[0] += s00
	s[1] += s01
	s[2] += s10
	s[3] += s11
	s[4] += s20
	s[5] += s21
	s[6] += s30
	s[7] += s31
}

// mulNarrow sets dst = A·B for a narrow B (its columns a few components):
// B is copied transposed, so that each entry is one dot product along a
// row of A. gonum's Gemm would instead add a k-long row of B per element
// of A, a call per element, which at k = 3 cost twenty times the
// arithmetic (the wide bootstrap's loadings: 5,000 × 100 calls a resample).
func mulNarrow(dst, a, b blas64.General) {
	if a.Cols != b.Rows || dst.Rows != a.Rows || dst.Cols != b.Cols {
		panic("analysis: mulNarrow dimension mismatch")
	}
	k := b.Cols
	bt := blas64.General{Rows: k, Cols: b.Rows, Stride: b.Rows, Data: make([]float64, k*b.Rows)}
	for l := 0; l < b.Rows; l++ {
		for c, v := range b.Data[l*b.Stride : l*b.Stride+k] {
			bt.Data[c*bt.Stride+l] = v
		}
	}
	blas64.Gemm(blas.NoTrans, blas.Trans, 1, a, bt, 0, dst)
}
