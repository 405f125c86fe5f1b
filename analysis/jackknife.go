package analysis

import (
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// MaxJackknifeWork caps the work (flops, roughly) of the wide-data
// leave-one-out eigenvalues, n³·p: beyond it BCa intervals are not computed
// and only percentile intervals are reported.
const MaxJackknifeWork = 2e10

// jackknifeEigenvalues returns, for every sample i, the eigenvalues of the
// whole pipeline (centring and the run's scaling redone) applied to the
// data without row i, and their total (the trace): eigen[i][a] for the m
// components of the reference decomposition. They are the jackknife values
// behind BCa's acceleration. nil when the work would exceed
// MaxJackknifeWork.
//
// It works, like Bootstrap, on the reference-preprocessed z (whose columns
// sum to zero) and is exact to rounding:
//
//   - Tall data: leaving out row z_i moves the mean to −z_i/(n−1), so the
//     centred cross-product is S − n/(n−1)·z_i z_iᵀ with S = ZᵀZ, a rank-one
//     downdate; its diagonal gives the new scales, and the eigenvalues of
//     the rescaled p×p matrix over n−2 are the sample's.
//   - Wide data: the (n−1)×(n−1) Gram matrix of the recentred, rescaled
//     rows.
//
// A variable constant without row i is handled as in Bootstrap (zero
// variance; see scaleFactor).
func jackknifeEigenvalues(r *Result, threads int) (eigen [][]float64, total []float64) {
	b := newBootstrapper(r)
	n, p, m := b.n, b.p, b.m
	if n < 3 {
		return nil, nil
	}
	tall := n >= p
	if !tall && float64(n)*float64(n)*float64(n)*float64(p) > MaxJackknifeWork {
		return nil, nil
	}
	nf := float64(n)
	ranges := newLOORanges(b)
	eigen = make([][]float64, n)
	total = make([]float64, n)
	var s []float64
	if tall {
		s = make([]float64, p*p)
		blas64.Syrk(blas.Trans, 1, r.Z.RawMatrix(), 0, blas64.Symmetric{N: p, Stride: p, Uplo: blas.Upper, Data: s})
	}
	type ws struct {
		c, g, rows []float64
		eig        mat.EigenSym
	}
	parallelFor(n, workersFor(threads, int64(8*(p*p+n*n+n*p))), func() *ws { return &ws{} }, func(w *ws, i int) {
		zi := r.Z.RawRowView(i)
		w.g = grow(w.g, p)
		var sym *mat.SymDense
		var size int
		if tall {
			w.c = grow(w.c, p*p)
			f := nf / (nf - 1)
			for j := 0; j < p; j++ {
				for l := j; l < p; l++ {
					w.c[j*p+l] = s[j*p+l] - f*zi[j]*zi[l]
				}
			}
			for j := 0; j < p; j++ {
				sd := math.Sqrt(math.Max(w.c[j*p+j], 0) / (nf - 2))
				w.g[j], _ = b.scaleFactor(j, sd, ranges.without(j, i))
			}
			tr := 0.0
			for j := 0; j < p; j++ {
				for l := j; l < p; l++ {
					w.c[j*p+l] *= w.g[j] * w.g[l]
				}
				tr += w.c[j*p+j]
			}
			total[i] = tr / (nf - 2)
			sym, size = mat.NewSymDense(p, w.c), p
		} else {
			// Column j of the rows kept: z_rj + z_ij/(n−1), whose sum of
			// squares is Σ_r z_rj² − n/(n−1)·z_ij² (Σ_r z_rj = 0).
			w.rows = grow(w.rows, (n-1)*p)
			for j := 0; j < p; j++ {
				col := b.zt[j*n : (j+1)*n]
				ss := 0.0
				for _, v := range col {
					ss += v * v
				}
				sd := math.Sqrt(math.Max(ss-nf/(nf-1)*zi[j]*zi[j], 0) / (nf - 2))
				w.g[j], _ = b.scaleFactor(j, sd, ranges.without(j, i))
			}
			k := 0
			for row := 0; row < n; row++ {
				if row == i {
					continue
				}
				dst := w.rows[k*p : (k+1)*p]
				for j, v := range r.Z.RawRowView(row) {
					dst[j] = (v + zi[j]/(nf-1)) * w.g[j]
				}
				k++
			}
			w.c = grow(w.c, (n-1)*(n-1))
			blas64.Syrk(blas.NoTrans, 1, blas64.General{Rows: n - 1, Cols: p, Stride: p, Data: w.rows}, 0,
				blas64.Symmetric{N: n - 1, Stride: n - 1, Uplo: blas.Upper, Data: w.c})
			tr := 0.0
			for a := 0; a < n-1; a++ {
				tr += w.c[a*(n-1)+a]
			}
			total[i] = tr / (nf - 2)
			sym, size = mat.NewSymDense(n-1, w.c), n-1
		}
		ev := make([]float64, m)
		if w.eig.Factorize(sym, false) {
			vals := w.eig.Values(nil)
			for a := 0; a < m && a < size; a++ {
				ev[a] = math.Max(vals[size-1-a], 0) / (nf - 2)
			}
		} else {
			for a := range ev {
				ev[a] = math.NaN()
			}
		}
		eigen[i] = ev
	}, "", nil)
	return eigen, total
}

// looRanges gives the range of each variable without one row, from the two
// smallest and two largest values of the column (in reference units).
type looRanges struct {
	lo1, lo2, hi1, hi2 []float64
	loAt, hiAt         []int
}

func newLOORanges(b *bootstrapper) looRanges {
	p, n := b.p, b.n
	r := looRanges{lo1: make([]float64, p), lo2: make([]float64, p), hi1: make([]float64, p), hi2: make([]float64, p), loAt: make([]int, p), hiAt: make([]int, p)}
	for j := 0; j < p; j++ {
		col := b.zt[j*n : (j+1)*n]
		lo1, lo2, hi1, hi2 := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
		for i, v := range col {
			if v < lo1 {
				lo1, lo2, r.loAt[j] = v, lo1, i
			} else if v < lo2 {
				lo2 = v
			}
			if v > hi1 {
				hi1, hi2, r.hiAt[j] = v, hi1, i
			} else if v > hi2 {
				hi2 = v
			}
		}
		r.lo1[j], r.lo2[j], r.hi1[j], r.hi2[j] = lo1, lo2, hi1, hi2
	}
	return r
}

func (r looRanges) without(j, i int) float64 {
	lo, hi := r.lo1[j], r.hi1[j]
	if i == r.loAt[j] {
		lo = r.lo2[j]
	}
	if i == r.hiAt[j] {
		hi = r.hi2[j]
	}
	return hi - lo
}
