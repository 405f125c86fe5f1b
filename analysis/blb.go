package analysis

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// Bootstrap schemes, as Stability.Scheme names them.
const (
	SchemeFull = "full bootstrap"
	SchemeBLB  = "bag of little bootstraps"
)

// Bag of little bootstraps (Kleiner, Talwalkar, Sarkar & Jordan 2014,
// J. R. Statist. Soc. B 76:795–816) for very tall tables.
var (
	// BLBMinRows is the number of rows from which tall tables switch to the
	// bag of little bootstraps. A full resample costs about 0.63·n·p²/2
	// multiply-adds; at 100,000 × 20 the default 500 resamples take some
	// seconds on one core of the (shared) development machine and grow in
	// proportion to n beyond, while a little bootstrap's resample costs
	// b·p²/2 whatever n is. A variable so that tests can switch it.
	BLBMinRows = 100_000
)

const (
	// BLBGamma sets the subset size b = n^γ. Kleiner et al. found γ = 0.7
	// as accurate as the full bootstrap in their experiments and γ = 0.6
	// sometimes not; 0.7 is the value they recommend.
	BLBGamma = 0.7
	// BLBSubsets is s, the number of subsets; Kleiner et al. report that
	// relative error levels off after a handful of subsets (their figures
	// use up to 20). Resamples are split evenly: r = ⌈B/s⌉ per subset.
	BLBSubsets = 10
	// BLBMinSubsetPerVariable keeps each subset at least this many rows per
	// variable, so that a subset's p×p cross-product is well determined
	// even where n^γ is small next to p.
	BLBMinSubsetPerVariable = 4
)

// Random streams of the little bootstraps: the subsets, and each subset's
// resamples.
const (
	streamBLBSubset   = 9 << 40
	streamBLBResample = 10 << 40
)

// blbPlan returns the subset size b, the subsets s and the resamples per
// subset r for an n × p table and B resamples; ok is false when the full
// bootstrap is used instead (wide data, n below BLBMinRows, or subsets
// that would not be much smaller than the table).
func blbPlan(n, p, resamples int) (b, s, r int, ok bool) {
	if n < p || n < BLBMinRows || resamples <= 0 {
		return 0, 0, 0, false
	}
	b = max(int(math.Ceil(math.Pow(float64(n), BLBGamma))), BLBMinSubsetPerVariable*p)
	if b > n/4 {
		return 0, 0, 0, false
	}
	s = min(BLBSubsets, resamples)
	r = (resamples + s - 1) / s
	return b, s, r, true
}

// blbUsed reports whether Bootstrap uses the bag of little bootstraps.
func blbUsed(n, p, resamples int) bool {
	_, _, _, ok := blbPlan(n, p, resamples)
	return ok
}

// subsetRows draws b distinct rows of n (Floyd's algorithm: O(b), whatever
// n is), in increasing order.
func subsetRows(seed uint64, subset, n, b int) []int {
	rng := taskRNG(seed, streamBLBSubset, subset)
	chosen := make(map[int]struct{}, b)
	rows := make([]int, 0, b)
	for j := n - b; j < n; j++ {
		t := rng.IntN(j + 1)
		if _, dup := chosen[t]; dup {
			t = j
		}
		chosen[t] = struct{}{}
		rows = append(rows, t)
	}
	slices.Sort(rows)
	return rows
}

// multinomialCounts draws n rows with replacement from b: the weights of a
// little bootstrap resample, summing to n. Drawing costs n increments; the
// arithmetic of the resample then costs b·p²/2 whatever n is.
func multinomialCounts(seed uint64, index, n, b int) []int32 {
	rng := taskRNG(seed, streamBLBResample, index)
	c := make([]int32, b)
	for i := 0; i < n; i++ {
		c[rng.IntN(b)]++
	}
	return c
}

// subsetBootstrapper is the bootstrapper of the rows of one subset, whose
// resamples carry total weight n.
func subsetBootstrapper(full *bootstrapper, rows []int) *bootstrapper {
	p := full.p
	z := mat.NewDense(len(rows), p, nil)
	for x, i := range rows {
		z.SetRow(x, full.z.RawRowView(i))
	}
	sb := &bootstrapper{n: len(rows), p: p, m: full.m, k: full.k, scaling: full.scaling, z: z, refScale: full.refScale, ref: full.ref}
	sb.zt = transpose(z)
	sb.refSD = make([]float64, p)
	for j := 0; j < p; j++ {
		col := sb.zt[j*sb.n : (j+1)*sb.n]
		sb.refSD[j] = math.Sqrt(floats.Dot(col, col) / float64(sb.n-1))
	}
	return sb
}

// subsetEigenFactor converts the eigenvalues of a subset of b rows
// analysed alone (weight 1 each, divisor b − 1) into those of the subset
// weighted n/b each (divisor n − 1), the estimate its little bootstrap is
// centred on. Correlations do not depend on the weights; Pareto scaling
// divides by the square root of a standard deviation, so half the factor
// remains.
func subsetEigenFactor(s Scaling, n, b int) float64 {
	f := float64(n) * float64(b-1) / (float64(b) * float64(n-1))
	switch s {
	case ScaleUnit:
		return 1
	case ScalePareto:
		return math.Sqrt(f)
	}
	return f
}

// littleBootstrap is what one subset contributes: its estimate and its
// resamples.
type littleBootstrap struct {
	eigen, pct []float64 // the subset's estimate
	loadings   []float64 // p × k, aligned to the reference
	results    []resampleResult
}

// bagOfLittleBootstraps runs the scheme for r's table: s subsets of b rows;
// on each, r resamples with multinomial weights summing to n, each
// redoing the whole preprocessing, their loadings aligned to the subset's
// own estimate. Per subset, the quality measures are those of the full
// bootstrap taken about the subset's estimate: quantiles of θ* − θ̂_j for
// eigenvalues, shares and loadings, and the congruence of θ* with θ̂_j;
// they are averaged over the subsets, and the intervals placed about the
// full-data estimate. BCa intervals are not given: their acceleration
// needs the n leave-one-out fits, which this scheme exists to avoid.
func bagOfLittleBootstraps(r *Result, resamples int, seed uint64, threads int, progress Progress) Stability {
	full := newBootstrapper(r)
	n, p := full.n, full.p
	b, s, per, _ := blbPlan(n, p, resamples)
	st := Stability{Resamples: s * per, Scheme: SchemeBLB, SubsetSize: b, Subsets: s, PerSubset: per, SwitchRows: BLBMinRows}
	bags := make([]littleBootstrap, s)
	workers := workersFor(threads, int64(8*(b+p*p+4*p)))
	for j := range bags {
		sb := subsetBootstrapper(full, subsetRows(seed, j, n, b))
		ones := make([]int32, b)
		for i := range ones {
			ones[i] = 1
		}
		sb.total = b
		est := sb.tallResample(&bootWorkspace{}, ones)
		if !est.ok {
			continue
		}
		f := subsetEigenFactor(full.scaling, n, b)
		bag := littleBootstrap{loadings: est.loadings, eigen: make([]float64, full.m), pct: make([]float64, full.m)}
		for a, ev := range est.eigen {
			bag.eigen[a] = f * ev
			bag.pct[a] = 100 * ev / est.total
		}
		sb.ref = mat.NewDense(p, full.k, slices.Clone(est.loadings))
		sb.total = n
		bag.results = make([]resampleResult, per)
		parallelFor(per, workers, func() *bootWorkspace { return &bootWorkspace{} }, func(w *bootWorkspace, i int) {
			bag.results[i] = sb.resample(w, multinomialCounts(seed, j*per+i, n, b))
		}, "bootstrap", progressOffset(progress, j*per, s*per))
		bags[j] = bag
	}
	st.summariseBags(r, bags)
	return st
}

// progressOffset reports the progress of one subset's resamples as part of
// all of them.
func progressOffset(progress Progress, base, total int) Progress {
	if progress == nil {
		return nil
	}
	return func(stage string, done, _ int) { progress(stage, base+done, total) }
}
