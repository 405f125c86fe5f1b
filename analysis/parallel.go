package analysis

import (
	"math/rand/v2"
	"runtime"
	"slices"
	"sync"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
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
	// Permutations is the number of permutations actually run: a multiple
	// of ParallelBatch (or the cap) at which every decision that matters
	// was settled, or the cap.
	Permutations int
	// Cap is the most permutations the run was allowed (--permutations).
	Cap int
	// P95 is, per component, the 95th percentile of the eigenvalues of the
	// permuted data (from the permutations run), drawn on the scree plot.
	P95 []float64
	// Exceedance is, per component, the share of permutations whose a-th
	// eigenvalue is at least the observed a-th eigenvalue: the Monte Carlo
	// p-value of the component.
	Exceedance []float64
	// Decision is, per component, DecisionKeep, DecisionDrop,
	// DecisionBorderline, or DecisionBeyond for components after the
	// sequential rule stopped.
	Decision []ParallelDecision
	// Count is the number of leading components whose keep decision is
	// settled. A borderline component is not counted.
	Count int
	// Borderline is the 0-based index of the component whose decision was
	// still unsettled at the cap, or −1.
	Borderline int
}

// ParallelDecision is the outcome of parallel analysis for one component.
type ParallelDecision string

const (
	DecisionKeep       ParallelDecision = "keep"
	DecisionDrop       ParallelDecision = "drop"
	DecisionBorderline ParallelDecision = "borderline"
	DecisionBeyond     ParallelDecision = "not tested" // after the sequential rule stopped
)

// Adaptive parallel analysis settings.
const (
	// ParallelBatch permutations run between two looks at the decisions.
	// With none of 100 permutations reaching the observed eigenvalue the
	// one-sided 99 % Clopper–Pearson upper bound is 1 − 0.01^(1/100) =
	// 0.045 < 0.05, so a clear component is settled by the first batch.
	ParallelBatch = 100
	// ParallelAlpha is the significance level of each component's test.
	ParallelAlpha = 0.05
	// ParallelConfidence is the one-sided confidence of the Clopper–Pearson
	// bounds (Clopper & Pearson 1934, Biometrika 26:404–413) that must lie
	// on one side of ParallelAlpha for a decision to count as settled: the
	// band is the two-sided 98 % interval. Looking after every batch is a
	// sequential test; at most cap/batch looks, each wrong with probability
	// below 1 %, is the price of stopping early (Besag & Clifford 1991,
	// Biometrika 78:301–304, on sequential Monte Carlo p-values).
	ParallelConfidence = 0.99
)

// exceedanceBounds returns the one-sided Clopper–Pearson bounds at
// ParallelConfidence for c exceedances in b permutations.
func exceedanceBounds(c, b int) (lo, hi float64) {
	a := 1 - ParallelConfidence
	lo, hi = 0, 1
	if c > 0 {
		lo = distuv.Beta{Alpha: float64(c), Beta: float64(b - c + 1)}.Quantile(a)
	}
	if c < b {
		hi = distuv.Beta{Alpha: float64(c + 1), Beta: float64(b - c)}.Quantile(1 - a)
	}
	return lo, hi
}

// settle applies the sequential rule to the exceedance counts after b
// permutations: components are kept while their decision is a settled
// keep; the first component that is not is a settled drop, or borderline.
// done reports whether no further permutation can change the count.
func settle(exceed []int, b int) (count, borderline int, decision []ParallelDecision, done bool) {
	m := len(exceed)
	decision = make([]ParallelDecision, m)
	borderline = -1
	done = true
	for a := 0; a < m; a++ {
		if count < a || borderline >= 0 {
			decision[a] = DecisionBeyond
			continue
		}
		lo, hi := exceedanceBounds(exceed[a], b)
		switch {
		case hi < ParallelAlpha:
			decision[a] = DecisionKeep
			count++
		case lo > ParallelAlpha:
			decision[a] = DecisionDrop
		default:
			decision[a] = DecisionBorderline
			borderline = a
			done = false
		}
	}
	return count, borderline, decision, done
}

// ParallelAnalysis runs Horn's (1965) parallel analysis (Psychometrika
// 30:179–185): each variable of the preprocessed matrix z is permuted
// independently, destroying the correlations while keeping each variable's
// distribution, and components are retained while the observed eigenvalue
// is significantly above the permuted ones at 5 % (Glorfeld 1995, Educ.
// Psychol. Meas. 55:377–393, whose 95th-percentile criterion this is in
// p-value form).
//
// The number of permutations is adaptive. Permutations run in batches of
// ParallelBatch; after each batch the exceedance frequency of each
// component (the share of permutations whose eigenvalue of the same rank
// reaches the observed one) is compared with 5 % through its Clopper–
// Pearson bounds, and the run stops as soon as every decision the count
// depends on — the leading keeps and the first drop — is settled. At the
// cap (maxPermutations) a decision still unsettled is reported as
// borderline: the count is the settled keeps, and the borderline component
// is named, never decided by the seed.
//
// Permuting rows of a column changes neither its mean nor its scale, so
// permuting the preprocessed columns equals preprocessing the permuted data.
// Row order does not change the eigenvalues either, so the first column is
// left in place and the other p−1 are permuted.
//
// Each permutation has its own random stream and the batches are fixed, so
// the result does not depend on threads. Each permutation's eigenvalues come
// from the smaller cross-product (p×p for tall data, n×n for wide), which is
// exact up to rounding of order ε·λ_1: ample for a comparison at 5 %.
func ParallelAnalysis(z *mat.Dense, observed []float64, maxPermutations int, seed uint64, threads int, progress Progress) Parallel {
	n, p := z.Dims()
	m := min(n-1, p)
	res := Parallel{Cap: max(maxPermutations, 0), Borderline: -1}
	if maxPermutations <= 0 {
		return res
	}
	raw := z.RawMatrix()
	tall := n >= p
	short := min(n, p)
	type workspace struct {
		buf    []float64 // short × long, row-major: Zᵀ (tall) or Z (wide)
		gram   []float64
		values []float64
		sym    mat.EigenSym
		seeds  []uint64
		// shufflers shuffle the columns of one permutation, several at a
		// time when a single worker runs (see inner below).
		shufflers workspacePool[*columnShuffler]
	}
	// Workspaces are kept between batches: each holds a copy of the data.
	var free, used []*workspace
	var mu sync.Mutex
	newWorkspace := func() *workspace {
		mu.Lock()
		defer mu.Unlock()
		var w *workspace
		if k := len(free); k > 0 {
			w, free = free[k-1], free[:k-1]
		} else {
			w = &workspace{buf: make([]float64, n*p), gram: make([]float64, short*short), values: make([]float64, short)}
			w.shufflers.make = func() *columnShuffler { return &columnShuffler{column: make([]float64, n)} }
		}
		used = append(used, w)
		return w
	}
	workers := workersFor(threads, int64(8*n*p))
	// When memory allows a single worker (one copy of the data each), its
	// permutations' columns are shuffled by all threads instead: on a
	// 1,000,000 × 20 table the shuffle is most of a permutation. A
	// shuffler holds one column and its bucket labels (10 bytes a row).
	inner := 1
	if workers == 1 {
		inner = workersFor(threads, int64(10*n))
	}
	var eig [][]float64
	task := func(w *workspace, b int) {
		rng := taskRNG(seed, streamPermutation, b)
		if tall {
			// Rows of buf are the columns of z, each shuffled. The columns
			// are gathered in one pass down the rows of z (reading it in
			// order), then shuffled, each by its own generator seeded in
			// column order from the permutation's, so that the result does
			// not depend on how many goroutines share the columns.
			for i := 0; i < n; i++ {
				for j, v := range raw.Data[i*raw.Stride : i*raw.Stride+p] {
					w.buf[j*n+i] = v
				}
			}
			w.seeds = slices.Grow(w.seeds[:0], p)[:p]
			for j := 1; j < p; j++ {
				w.seeds[j] = rng.Uint64()
			}
			w.shufflers.reset()
			parallelFor(p-1, inner, w.shufflers.get, func(sh *columnShuffler, c int) {
				j := c + 1
				row := w.buf[j*n : (j+1)*n]
				shuffleInto(sh.column, row, rand.New(rand.NewPCG(w.seeds[j], uint64(j))), &sh.ws)
				copy(row, sh.column)
			}, "", nil)
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
		gramUpper(c, a)
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
	exceed := make([]int, m)
	for done := 0; done < maxPermutations; {
		batch := min(ParallelBatch, maxPermutations-done)
		base := done
		eig = append(eig, make([][]float64, batch)...)
		var step Progress
		if progress != nil {
			step = func(stage string, d, _ int) { progress(stage, base+d, maxPermutations) }
		}
		parallelFor(batch, workers, newWorkspace, func(w *workspace, i int) { task(w, base+i) }, "permutations", step)
		free = append(free, used...) // the workers have finished: reuse their memory
		used = used[:0]
		done += batch
		for b := base; b < done; b++ {
			for a := 0; a < m; a++ {
				if eig[b][a] >= observed[a] {
					exceed[a]++
				}
			}
		}
		var finished bool
		res.Count, res.Borderline, res.Decision, finished = settle(exceed, done)
		res.Permutations = done
		if finished {
			break
		}
	}

	res.P95 = make([]float64, m)
	res.Exceedance = make([]float64, m)
	col := make([]float64, res.Permutations)
	for a := 0; a < m; a++ {
		for b := range eig {
			col[b] = eig[b][a]
		}
		slices.Sort(col)
		res.P95[a] = percentile(col, 95)
		res.Exceedance[a] = float64(exceed[a]) / float64(res.Permutations)
	}
	return res
}

// columnShuffler is the memory one goroutine needs to shuffle columns of
// a tall table: the shuffled column and shuffleInto's workspace.
type columnShuffler struct {
	column []float64
	ws     shuffleWorkspace
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
