package analysis

import (
	"math/rand/v2"
	"runtime"
	"slices"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// WorkspaceBudget bounds the memory (bytes) that resampling workers may hold
// in copies of the data at one time. When one worker's copy is larger than
// the budget a single worker runs, so very large tables are resampled one
// copy at a time rather than exhausting memory.
var WorkspaceBudget int64 = 256 << 20

// workersFor returns how many workers may run when each needs perWorker
// bytes: at most threads (all cores when threads ≤ 0), at least one.
func workersFor(threads int, perWorker int64) int {
	if threads <= 0 {
		threads = runtime.NumCPU()
	}
	w := int(WorkspaceBudget / max(perWorker, 1))
	return max(1, min(w, threads))
}

// Parallel is the result of parallel analysis.
type Parallel struct {
	Permutations int
	// P95 is, per component, the 95th percentile of the eigenvalues of the
	// permuted data.
	P95 []float64
	// Count is the number of leading components whose observed eigenvalue
	// exceeds P95.
	Count int
}

// ParallelAnalysis runs Horn's (1965) parallel analysis (Psychometrika
// 30:179–185) with the 95th-percentile criterion of Glorfeld (1995, Educ.
// Psychol. Meas. 55:377–393): each variable of the preprocessed matrix z is
// permuted independently, destroying the correlations while keeping each
// variable's distribution, and components are retained while the observed
// eigenvalue exceeds the 95th percentile of the permuted ones.
//
// Permuting rows of a column changes neither its mean nor its scale, so
// permuting the preprocessed columns equals preprocessing the permuted data.
// Row order does not change the eigenvalues either, so the first column is
// left in place and the other p−1 are permuted.
//
// Each permutation's eigenvalues come from the smaller cross-product (p×p
// for tall data, n×n for wide), which is exact up to rounding of order
// ε·λ_1: ample for a comparison at the 95th percentile.
func ParallelAnalysis(z *mat.Dense, observed []float64, permutations int, seed uint64, threads int, progress Progress) Parallel {
	n, p := z.Dims()
	m := min(n-1, p)
	res := Parallel{Permutations: permutations}
	if permutations <= 0 {
		return res
	}
	eig := make([][]float64, permutations)
	raw := z.RawMatrix()
	tall := n >= p
	short := min(n, p)
	type workspace struct {
		buf     []float64 // short × long, row-major: Zᵀ (tall) or Z (wide)
		gram    []float64
		values  []float64
		sym     mat.EigenSym
		column  []float64
		shuffle shuffleWorkspace
	}
	newWorkspace := func() *workspace {
		w := &workspace{buf: make([]float64, n*p), gram: make([]float64, short*short), values: make([]float64, short)}
		if tall {
			w.column = make([]float64, n)
		}
		return w
	}
	task := func(w *workspace, b int) {
		rng := taskRNG(seed, streamPermutation, b)
		if tall {
			// Rows of buf are the columns of z, each shuffled. The columns
			// are gathered in one pass down the rows of z (reading it in
			// order), then shuffled one by one.
			for i := 0; i < n; i++ {
				for j, v := range raw.Data[i*raw.Stride : i*raw.Stride+p] {
					w.buf[j*n+i] = v
				}
			}
			for j := 1; j < p; j++ {
				row := w.buf[j*n : (j+1)*n]
				shuffleInto(w.column, row, rng, &w.shuffle)
				copy(row, w.column)
			}
		} else {
			for i := 0; i < n; i++ {
				copy(w.buf[i*p:(i+1)*p], raw.Data[i*raw.Stride:i*raw.Stride+p])
			}
			for j := 1; j < p; j++ {
				for i := n - 1; i > 0; i-- {
					r := rng.IntN(i + 1)
					w.buf[i*p+j], w.buf[r*p+j] = w.buf[r*p+j], w.buf[i*p+j]
				}
			}
		}
		long := max(n, p)
		a := blas64.General{Rows: short, Cols: long, Stride: long, Data: w.buf}
		c := blas64.Symmetric{N: short, Stride: short, Uplo: blas.Upper, Data: w.gram}
		blas64.Syrk(blas.NoTrans, 1, a, 0, c)
		if !w.sym.Factorize(mat.NewSymDense(short, w.gram), false) {
			panic("analysis: symmetric eigendecomposition failed in parallel analysis")
		}
		vals := w.sym.Values(w.values)
		out := make([]float64, m)
		for a := 0; a < m; a++ {
			out[a] = vals[short-1-a] / float64(n-1)
		}
		eig[b] = out
	}
	workers := workersFor(threads, int64(8*n*p))
	parallelFor(permutations, workers, newWorkspace, task, "permutations", progress)

	res.P95 = make([]float64, m)
	col := make([]float64, permutations)
	for a := 0; a < m; a++ {
		for b := range eig {
			col[b] = eig[b][a]
		}
		slices.Sort(col)
		res.P95[a] = percentile(col, 95)
	}
	for res.Count < m && observed[res.Count] > res.P95[res.Count] {
		res.Count++
	}
	return res
}

// shuffleWorkspace is the reusable memory of shuffleInto.
type shuffleWorkspace struct {
	labels []uint16
	counts []int
}

// shuffleBuckets is log2 of the number of buckets shuffleInto uses.
const shuffleBuckets = 10

// shuffleInto writes a uniformly random permutation of src into dst.
//
// A Fisher–Yates shuffle of a long column jumps around memory at random, and
// for millions of values nearly every step misses the cache. Here every
// value first gets a random bucket label (uniform and independent), values
// are scattered into their buckets in order, and each bucket — small enough
// for the first-level cache — is shuffled by Fisher–Yates. Ordering by
// (uniform label, uniform order within the label) is a uniformly random
// permutation (Sanders 1998, Inform. Process. Lett. 67:305–309).
func shuffleInto(dst, src []float64, rng *rand.Rand, ws *shuffleWorkspace) {
	n := len(src)
	const buckets = 1 << shuffleBuckets
	if n < 16*buckets {
		copy(dst, src)
		fisherYates(dst, rng)
		return
	}
	if cap(ws.labels) < n {
		ws.labels = make([]uint16, n)
	}
	labels := ws.labels[:n]
	if ws.counts == nil {
		ws.counts = make([]int, buckets+1)
	}
	counts := ws.counts
	clear(counts)
	for i := 0; i < n; i += 4 {
		r := rng.Uint64()
		for q := 0; q < 4 && i+q < n; q++ {
			l := uint16(r>>(16*q)) & (buckets - 1)
			labels[i+q] = l
			counts[l+1]++
		}
	}
	for b := 1; b <= buckets; b++ {
		counts[b] += counts[b-1]
	}
	starts := counts // counts[b] is now where bucket b starts
	pos := make([]int, buckets)
	copy(pos, starts[:buckets])
	for i, v := range src {
		l := labels[i]
		dst[pos[l]] = v
		pos[l]++
	}
	for b := 0; b < buckets; b++ {
		fisherYates(dst[starts[b]:starts[b+1]], rng)
	}
}

func fisherYates(x []float64, rng *rand.Rand) {
	for i := len(x) - 1; i > 0; i-- {
		r := rng.IntN(i + 1)
		x[i], x[r] = x[r], x[i]
	}
}
