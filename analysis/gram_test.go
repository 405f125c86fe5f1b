package analysis

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"

	"pcqc/internal/synth"
)

// TestGramUpperMatchesSyrk holds gramUpper against gonum's reference Syrk
// (the external check: gonum's BLAS, itself tested against the reference
// BLAS) on shapes that exercise every edge: rows not a multiple of 4 or 2,
// columns not a multiple of 4, several chunks, a stride wider than the
// row, and with the FMA kernel on and off. The lower triangle must be left
// as it was.
func TestGramUpperMatchesSyrk(t *testing.T) {
	shapes := [][2]int{{1, 1}, {1, 9}, {2, 3}, {3, 4}, {4, 4}, {5, 7}, {6, 2}, {7, 1000}, {9, 33}, {13, 5000}, {50, 6321}, {101, 300}}
	kernels := []bool{false}
	if haveFMAKernel {
		kernels = append(kernels, true)
	}
	saved := haveFMAKernel
	defer func() { haveFMAKernel = saved }()
	for _, fma := range kernels {
		haveFMAKernel = fma
		for _, sh := range shapes {
			r, m := sh[0], sh[1]
			t.Run(fmt.Sprintf("fma=%v/%dx%d", fma, r, m), func(t *testing.T) {
				x, _ := synth.LowRank(synth.RNG(3, uint64(r*m)), r, m+3, []float64{2}, 1)
				raw := x.RawMatrix()
				a := blas64.General{Rows: r, Cols: m, Stride: raw.Stride, Data: raw.Data}
				got := blas64.Symmetric{N: r, Stride: r + 1, Uplo: blas.Upper, Data: make([]float64, r*(r+1))}
				want := blas64.Symmetric{N: r, Stride: r + 1, Uplo: blas.Upper, Data: make([]float64, r*(r+1))}
				for i := range got.Data {
					got.Data[i], want.Data[i] = -7, -7
				}
				gramUpper(got, a)
				blas64.Syrk(blas.NoTrans, 1, a, 0, want)
				for i := 0; i < r; i++ {
					for j := 0; j < r+1; j++ {
						g, w := got.Data[i*got.Stride+j], want.Data[i*want.Stride+j]
						if j < i || j == r {
							if g != -7 {
								t.Fatalf("(%d,%d) outside the upper triangle changed to %g", i, j, g)
							}
							continue
						}
						scale := math.Sqrt(want.Data[i*want.Stride+i] * want.Data[j*want.Stride+j])
						if math.Abs(g-w) > 1e-13*scale+1e-300 {
							t.Fatalf("(%d,%d) = %.17g, Syrk %.17g", i, j, g, w)
						}
					}
				}
			})
		}
	}
}

func benchmarkGram(b *testing.B, r, m int, ours bool) {
	x, _ := synth.LowRank(synth.RNG(3, 1), r, m, []float64{2}, 1)
	raw := x.RawMatrix()
	a := blas64.General{Rows: r, Cols: m, Stride: raw.Stride, Data: raw.Data}
	c := blas64.Symmetric{N: r, Stride: r, Uplo: blas.Upper, Data: make([]float64, r*r)}
	for b.Loop() {
		if ours {
			gramUpper(c, a)
		} else {
			blas64.Syrk(blas.NoTrans, 1, a, 0, c)
		}
	}
}

// The shapes of the tall bootstrap (50 variables × 6,321 distinct rows) and
// of wide cross-validation (100 rows × 5,000 variables).
func BenchmarkGramTallOurs(b *testing.B) { benchmarkGram(b, 50, 6321, true) }
func BenchmarkGramTallSyrk(b *testing.B) { benchmarkGram(b, 50, 6321, false) }
func BenchmarkGramWideOurs(b *testing.B) { benchmarkGram(b, 100, 5000, true) }
func BenchmarkGramWideSyrk(b *testing.B) { benchmarkGram(b, 100, 5000, false) }

// TestMulNarrow holds mulNarrow against gonum's Gemm.
func TestMulNarrow(t *testing.T) {
	for _, sh := range [][3]int{{1, 1, 1}, {5, 7, 3}, {5000, 100, 3}, {40, 9, 1}} {
		r, m, k := sh[0], sh[1], sh[2]
		x, _ := synth.LowRank(synth.RNG(4, uint64(r)), r, m, []float64{2}, 1)
		y, _ := synth.LowRank(synth.RNG(5, uint64(k)), m, k, []float64{1}, 1)
		got := mat.NewDense(r, k, nil)
		mulNarrow(got.RawMatrix(), x.RawMatrix(), y.RawMatrix())
		var want mat.Dense
		want.Mul(x, y)
		if !mat.EqualApprox(got, &want, 1e-12) {
			t.Fatalf("%v: mulNarrow differs from Gemm", sh)
		}
	}
}
