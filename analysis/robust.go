package analysis

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"sync"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Robust fit methods, as named in RobustFit.Method and the report.
const (
	RobustROBPCA    = "ROBPCA"
	RobustSpherical = "spherical PCA"
)

// Robust fit settings.
const (
	// RobustAlpha is the share of samples in ROBPCA's h-subset,
	// h = ⌈0.75 n⌉: the default of Hubert, Rousseeuw & Vanden Branden
	// (2005), which resists up to a quarter of the samples being outliers.
	RobustAlpha = 0.75
	// RobustDirections is how many directions through pairs of samples the
	// outlyingness is measured on (Hubert et al. 2005 use 250; all pairs
	// when there are fewer).
	RobustDirections = 250
	// RobustBudget bounds n·m·RobustDirections, the multiply-adds of the
	// outlyingness stage, above which spherical PCA is used instead: about
	// a tenth of a second on one core, a small part of the audit's time.
	RobustBudget = 3e8
	// robustMCDStarts is how many random (k+1)-subsets start concentration
	// steps of the MCD, beside two deterministic starts.
	robustMCDStarts = 10
	// robustCutoff is the quantile of the score- and orthogonal-distance
	// cut-offs (Hubert et al. 2005, §3.4).
	robustCutoff = 0.975
)

// Random streams of the robust fit (see engine.go).
const (
	streamRobustDirection = 6 << 40
	streamRobustMCD       = 4 << 40
)

// RobustFit is a principal component fit that resists outliers, computed
// beside the classical PCA on the same preprocessed matrix Z, with as many
// components as the classical fit retains.
//
// ROBPCA (Hubert, Rousseeuw & Vanden Branden 2005, Technometrics 47:64–79)
// is used when it applies; otherwise spherical PCA (Locantore et al. 1999,
// Test 8:1–73), and Method says which. Both are orthogonally equivariant,
// so they are computed in the coordinates of all m classical components,
// T = Z V_m, which represent Z exactly (Z = T V_mᵀ) and, for wide data,
// are ROBPCA's first stage (the affine subspace spanned by the samples).
type RobustFit struct {
	Method string // RobustROBPCA or RobustSpherical; "" when not computed
	// Reason says why spherical PCA was used, or why nothing was computed.
	Reason     string
	H          int // ROBPCA's h-subset size, ⌈RobustAlpha·n⌉
	Directions int // directions the outlyingness was measured on
	// Center (p) and Loadings (p × k, orthonormal columns) are in the
	// preprocessed variables; Eigenvalues are robust variances along the
	// loadings, descending.
	Center      []float64
	Loadings    *mat.Dense
	Eigenvalues []float64
	// SD and OD are each sample's score distance (Mahalanobis distance
	// within the robust subspace) and orthogonal distance (to it), with the
	// cut-offs of Hubert et al. (2005): √χ²_{k,0.975} for SD, and
	// (median(OD^{2/3}) + MAD(OD^{2/3})·z_{0.975})^{3/2} for OD, the
	// Wilson–Hilferty approximation of OD's distribution.
	SD, OD             []float64
	SDCutoff, ODCutoff float64
}

// Beyond reports whether sample i lies beyond either cut-off.
func (f RobustFit) Beyond(i int) bool {
	return f.SD[i] > f.SDCutoff || f.OD[i] > f.ODCutoff
}

// Outlyingness returns max(SD/cut-off, OD/cut-off) of sample i: above 1 the
// robust fit treats it as an outlier.
func (f RobustFit) Outlyingness(i int) float64 {
	return math.Max(f.SD[i]/f.SDCutoff, f.OD[i]/f.ODCutoff)
}

// DownWeighted returns the samples beyond either cut-off, the most outlying
// first.
func (f RobustFit) DownWeighted() []int {
	var idx []int
	for i := range f.SD {
		if f.Beyond(i) {
			idx = append(idx, i)
		}
	}
	slices.SortStableFunc(idx, func(a, b int) int { return cmp.Compare(f.Outlyingness(b), f.Outlyingness(a)) })
	return idx
}

// FitRobust computes the robust fit of k components of z, whose classical
// decomposition is d. The random directions and MCD starts come from
// streams derived from seed and their index, so the result does not depend
// on threads.
func FitRobust(z *mat.Dense, d *Decomposition, k int, seed uint64, threads int) RobustFit {
	n, _ := z.Dims()
	m := d.Components()
	if k < 1 || k > m || n < 3 {
		return RobustFit{Reason: fmt.Sprintf("a robust fit of %d components needs at least 3 samples and at most %d components", k, m)}
	}
	t, vm := robustSpace(z, d)
	h := int(math.Ceil(RobustAlpha * float64(n)))
	dirs := min(RobustDirections, n*(n-1)/2)
	var fit robustCoords
	var ok bool
	var reason string
	switch {
	// The MCD step needs several samples per dimension: Rousseeuw & Van
	// Driessen (1999, Technometrics 41:212–223) advise n > 5k.
	case n <= 5*k:
		reason = fmt.Sprintf("ROBPCA's MCD step on %d-dimensional scores needs more than %d samples (5 per dimension); there are %d", k, 5*k, n)
	case float64(n)*float64(m)*float64(dirs) > RobustBudget:
		reason = fmt.Sprintf("ROBPCA's outlyingness on %d directions of a %d × %d table would take more than %.0e multiply-adds", dirs, n, m, RobustBudget)
	default:
		fit, ok = robpca(t, k, h, dirs, seed, threads)
		if !ok {
			reason = "ROBPCA's MCD step met a singular scatter matrix (the h-subset's scores are collinear)"
		}
	}
	out := RobustFit{Method: RobustROBPCA, H: h, Directions: dirs}
	if !ok {
		fit = sphericalPCA(t, k)
		out = RobustFit{Method: RobustSpherical, Reason: reason}
	}
	return finishRobust(t, vm, k, fit, out)
}

// robustSpace returns the coordinates T the robust fit works in, and the
// map V_m back to the preprocessed variables. When the table has fewer
// columns than rows and full column rank (m = p), V_m is square and
// orthogonal, and both methods are equivariant under it (ROBPCA's
// directions through pairs of samples, the MCD and spherical PCA all rotate
// with the data), so Z itself serves as T and V_m as the identity (nil):
// that saves an n × p copy, which matters on tall tables. Otherwise T = Z V_m,
// the coordinates of Z in its own row space.
func robustSpace(z *mat.Dense, d *Decomposition) (t *mat.Dense, vm mat.Matrix) {
	m := d.Components()
	if m == d.Vars {
		return z, nil
	}
	return d.Scores(z, m), d.Loadings.Slice(0, d.Vars, 0, m)
}

// finishRobust maps a fit in the coordinates T back to the preprocessed
// variables (V_m times the coordinates; vm nil is the identity) and adds
// the distances and cut-offs.
func finishRobust(t *mat.Dense, vm mat.Matrix, k int, fit robustCoords, out RobustFit) RobustFit {
	if vm == nil {
		out.Loadings, out.Center = fit.loadings, fit.center
	} else {
		_, m := vm.Dims()
		p, _ := vm.Dims()
		var load mat.Dense
		load.Mul(vm, fit.loadings)
		center := mat.NewVecDense(p, nil)
		center.MulVec(vm, mat.NewVecDense(m, fit.center))
		out.Loadings = &load
		out.Center = center.RawVector().Data
	}
	out.Eigenvalues = fit.eigen
	out.SD, out.OD = robustDistances(t, fit)
	out.SDCutoff = math.Sqrt(distuv.ChiSquared{K: float64(k)}.Quantile(robustCutoff))
	out.ODCutoff = odCutoff(out.OD)
	return out
}

// robustCoords is a robust fit in the coordinates T: centre (m), loadings
// (m × k, orthonormal) and eigenvalues (k, descending).
type robustCoords struct {
	center   []float64
	loadings *mat.Dense
	eigen    []float64
}

// robustDistances returns every sample's score and orthogonal distance.
func robustDistances(t *mat.Dense, f robustCoords) (sd, od []float64) {
	n, m := t.Dims()
	_, k := f.loadings.Dims()
	sd, od = make([]float64, n), make([]float64, n)
	c := make([]float64, m)
	for i := 0; i < n; i++ {
		row := t.RawRowView(i)
		for j := range c {
			c[j] = row[j] - f.center[j]
		}
		total := dot(c, c)
		s2, proj := 0.0, 0.0
		for a := 0; a < k; a++ {
			sc := 0.0
			for j := 0; j < m; j++ {
				sc += c[j] * f.loadings.At(j, a)
			}
			proj += sc * sc
			s2 += sc * sc / f.eigen[a]
		}
		sd[i] = math.Sqrt(s2)
		od[i] = math.Sqrt(math.Max(total-proj, 0))
	}
	return sd, od
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i, v := range a {
		s += v * b[i]
	}
	return s
}

// odCutoff is (median(OD^{2/3}) + MAD(OD^{2/3})·z_{0.975})^{3/2}, with the
// MAD scaled by 1.4826 to estimate a normal standard deviation (Hubert et
// al. 2005, §3.4).
func odCutoff(od []float64) float64 {
	x := make([]float64, len(od))
	for i, v := range od {
		x[i] = math.Pow(v, 2.0/3)
	}
	med, mad := medianMAD(x)
	return math.Pow(med+mad*distuv.UnitNormal.Quantile(robustCutoff), 1.5)
}

// medianMAD returns the median of x and its median absolute deviation
// scaled by 1.4826 (consistent for the normal standard deviation).
func medianMAD(x []float64) (med, mad float64) {
	s := slices.Clone(x)
	slices.Sort(s)
	med = percentile(s, 50)
	for i, v := range x {
		s[i] = math.Abs(v - med)
	}
	slices.Sort(s)
	return med, 1.4826 * percentile(s, 50)
}

// robpca is ROBPCA on the n × m coordinates t. Stages, after Hubert et al.
// (2005, §3):
//
//  1. Stahel–Donoho outlyingness of every sample: the largest
//     |xᵢ·v − μ(v)|/σ(v) over directions v through pairs of samples, with
//     μ, σ the univariate MCD location and scale of the projections (the
//     reweighted univariate MCD, univariateMCD).
//  2. The h least outlying samples H0; their mean and covariance, and the
//     first k eigenvectors of it.
//  3. Reweighting: the samples whose orthogonal distance to that subspace
//     is within the OD cut-off (OD^{2/3} centred and scaled by its
//     univariate MCD) form H1, whose mean and covariance give the
//     k-dimensional subspace of the fit.
//  4. The MCD of the k-dimensional scores on that subspace, by
//     concentration steps (Rousseeuw & Van Driessen 1999), then reweighted
//     (χ²_{k,0.975}); the eigenvectors of its scatter rotate the loadings
//     within the subspace and its eigenvalues are the robust eigenvalues.
//
// Differences from the paper, stated: k is the classical fit's retained
// count, not chosen from the robust eigenvalues; the MCD of stage 4 starts
// from H1's nearest h samples, H0 and robustMCDStarts random (k+1)-subsets
// rather than FAST-MCD's 500 starts with nested subsets; and stage 3 keeps
// H1 whatever its size (the paper's refinements of that step are left
// out). The subspace the check compares comes from stage 3; stage 4 only
// rotates within it and sets the scales.
func robpca(t *mat.Dense, k, h, dirs int, seed uint64, threads int) (robustCoords, bool) {
	n, m := t.Dims()
	outl := outlyingness(t, h, dirs, seed, threads)
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int { return cmp.Compare(outl[a], outl[b]) })
	h0 := slices.Clone(order[:h])
	slices.Sort(h0)

	c0, v0, _ := subsetPCA(t, h0, k)
	od0 := orthogonalDistances(t, c0, v0)
	// The reweighting cut-off centres and scales OD^{2/3} by its
	// univariate MCD, as rrcov's PcaHubert does, rather than by median
	// and MAD.
	x := make([]float64, n)
	for i, o := range od0 {
		x[i] = math.Pow(o, 2.0/3)
	}
	slices.Sort(x)
	loc, sc := univariateMCD(x, h)
	cut := math.Pow(loc+sc*distuv.UnitNormal.Quantile(robustCutoff), 1.5)
	var h1 []int
	for i, o := range od0 {
		if o <= cut {
			h1 = append(h1, i)
		}
	}
	if len(h1) <= k+1 {
		h1 = h0
	}
	c1, v1, _ := subsetPCA(t, h1, k)

	// Scores on the stage-3 subspace.
	s := mat.NewDense(n, k, nil)
	cen := make([]float64, m)
	for i := 0; i < n; i++ {
		row := t.RawRowView(i)
		for j := range cen {
			cen[j] = row[j] - c1[j]
		}
		for a := 0; a < k; a++ {
			sc := 0.0
			for j := 0; j < m; j++ {
				sc += cen[j] * v1.At(j, a)
			}
			s.Set(i, a, sc)
		}
	}
	mu, cov, ok := mcd(s, h, [][]int{h0, h1}, seed)
	if !ok {
		return robustCoords{}, false
	}
	var eig mat.EigenSym
	if !eig.Factorize(cov, true) {
		return robustCoords{}, false
	}
	vals := eig.Values(nil) // ascending
	var w mat.Dense
	eig.VectorsTo(&w)
	out := robustCoords{center: make([]float64, m), loadings: mat.NewDense(m, k, nil), eigen: make([]float64, k)}
	for a := 0; a < k; a++ {
		src := k - 1 - a
		if !(vals[src] > 0) {
			return robustCoords{}, false
		}
		out.eigen[a] = vals[src]
		for j := 0; j < m; j++ {
			v := 0.0
			for b := 0; b < k; b++ {
				v += v1.At(j, b) * w.At(b, src)
			}
			out.loadings.Set(j, a, v)
		}
	}
	for j := 0; j < m; j++ {
		out.center[j] = c1[j]
		for b := 0; b < k; b++ {
			out.center[j] += v1.At(j, b) * mu[b]
		}
	}
	return out, true
}

// outlyingness returns the Stahel–Donoho outlyingness of every row of t on
// dirs directions through pairs of rows: all pairs when there are at most
// dirs of them, otherwise pairs drawn from stream (seed, direction index).
// Each worker keeps its own running maximum; the maximum of maxima does not
// depend on which worker took which direction.
func outlyingness(t *mat.Dense, h, dirs int, seed uint64, threads int) []float64 {
	n, m := t.Dims()
	allPairs := dirs == n*(n-1)/2
	type work struct{ outl, y, sorted, v []float64 }
	var mu sync.Mutex
	var spaces []*work
	parallelFor(dirs, threads, func() *work {
		w := &work{outl: make([]float64, n), y: make([]float64, n), sorted: make([]float64, n), v: make([]float64, m)}
		mu.Lock()
		spaces = append(spaces, w)
		mu.Unlock()
		return w
	}, func(w *work, d int) {
		var a, b int
		if allPairs {
			a, b = pairAt(d, n)
		} else {
			rng := taskRNG(seed, streamRobustDirection, d)
			a = rng.IntN(n)
			b = rng.IntN(n - 1)
			if b >= a {
				b++
			}
		}
		ra, rb := t.RawRowView(a), t.RawRowView(b)
		norm := 0.0
		for j := range w.v {
			w.v[j] = ra[j] - rb[j]
			norm += w.v[j] * w.v[j]
		}
		if norm == 0 {
			return // a duplicated pair gives no direction
		}
		for i := 0; i < n; i++ {
			w.y[i] = dot(t.RawRowView(i), w.v)
		}
		copy(w.sorted, w.y)
		slices.Sort(w.sorted)
		loc, scale := univariateMCD(w.sorted, h)
		if !(scale > 1e-12*(math.Abs(w.sorted[n-1]-w.sorted[0]))) || scale == 0 {
			return // more than h samples project to one point: no scale
		}
		for i, y := range w.y {
			if o := math.Abs(y-loc) / scale; o > w.outl[i] {
				w.outl[i] = o
			}
		}
	}, "", nil)
	out := make([]float64, n)
	for _, w := range spaces {
		for i, o := range w.outl {
			out[i] = math.Max(out[i], o)
		}
	}
	return out
}

// pairAt returns the d-th pair (a, b), a < b, of n items in lexicographic
// order.
func pairAt(d, n int) (int, int) {
	a := 0
	for d >= n-1-a {
		d -= n - 1 - a
		a++
	}
	return a, a + 1 + d
}

// univariateMCD returns the reweighted univariate MCD location and scale
// of sorted y (Rousseeuw & Leroy 1987, Robust Regression and Outlier
// Detection, §4.4): the h consecutive values of least variance give a raw
// mean and variance; the variance is made consistent at the normal by the
// h-th smallest squared standardised residual over χ²_{1,h/n}; the values
// within χ²_{1,0.975} of the raw mean then give the mean and standard
// deviation returned.
func univariateMCD(sorted []float64, h int) (loc, scale float64) {
	n := len(sorted)
	// Shift by the median so that the running sums do not cancel.
	shift := sorted[n/2]
	s, s2 := 0.0, 0.0
	for _, v := range sorted[:h] {
		s += v - shift
		s2 += (v - shift) * (v - shift)
	}
	best, bestS := math.Inf(1), 0.0
	for start := 0; ; start++ {
		if v := s2 - s*s/float64(h); v < best {
			best, bestS = v, s
		}
		if start+h >= n {
			break
		}
		out, in := sorted[start]-shift, sorted[start+h]-shift
		s += in - out
		s2 += in*in - out*out
	}
	mean := shift + bestS/float64(h)
	variance := math.Max(best, 0) / float64(h-1)
	if h >= n || !(variance > 0) {
		return mean, math.Sqrt(variance)
	}
	res := make([]float64, n)
	for i, v := range sorted {
		res[i] = (v - mean) * (v - mean) / variance
	}
	slices.Sort(res)
	variance *= res[h-1] / distuv.ChiSquared{K: 1}.Quantile(float64(h)/float64(n))
	limit := distuv.ChiSquared{K: 1}.Quantile(robustCutoff) * variance
	sum, count := 0.0, 0
	for _, v := range sorted {
		if (v-mean)*(v-mean) < limit {
			sum += v
			count++
		}
	}
	if count < 2 {
		return mean, math.Sqrt(variance)
	}
	loc = sum / float64(count)
	ss := 0.0
	for _, v := range sorted {
		if (v-mean)*(v-mean) < limit {
			ss += (v - loc) * (v - loc)
		}
	}
	return loc, math.Sqrt(ss / float64(count-1))
}

// subsetPCA returns the mean of the rows idx of t and the first k
// eigenvectors and eigenvalues of their covariance, from the SVD of the
// centred rows.
func subsetPCA(t *mat.Dense, idx []int, k int) ([]float64, *mat.Dense, []float64) {
	_, m := t.Dims()
	c := rowMean(t, idx)
	x := mat.NewDense(len(idx), m, nil)
	for r, i := range idx {
		row := x.RawRowView(r)
		for j, v := range t.RawRowView(i) {
			row[j] = v - c[j]
		}
	}
	var svd mat.SVD
	svd.Factorize(x, mat.SVDThinV)
	var v mat.Dense
	svd.VTo(&v)
	vals := svd.Values(nil)
	eig := make([]float64, k)
	for a := range eig {
		if a < len(vals) {
			eig[a] = vals[a] * vals[a] / float64(max(len(idx)-1, 1))
		}
	}
	_, cols := v.Dims()
	basis := mat.NewDense(m, k, nil)
	basis.Copy(v.Slice(0, m, 0, min(k, cols)))
	return c, basis, eig
}

// orthogonalDistances returns ‖(tᵢ − c) − V Vᵀ(tᵢ − c)‖ for every row.
func orthogonalDistances(t *mat.Dense, c []float64, v *mat.Dense) []float64 {
	_, od := robustDistances(t, robustCoords{center: c, loadings: v, eigen: onesLike(v)})
	return od
}

func onesLike(v *mat.Dense) []float64 {
	_, k := v.Dims()
	e := make([]float64, k)
	for i := range e {
		e[i] = 1
	}
	return e
}

// mcd is the reweighted minimum covariance determinant estimator of the
// rows of s (n × k) with h-subsets (Rousseeuw & Van Driessen 1999,
// Technometrics 41:212–223): concentration steps from each start (the given
// subsets, then random (k+1)-subsets from stream (seed, start index)); the
// subset of least determinant; its covariance made consistent at the
// normal by median(d²)/χ²_{k,0.5}; then the mean and covariance of the
// samples with d² ≤ χ²_{k,0.975}, made consistent the same way.
func mcd(s *mat.Dense, h int, starts [][]int, seed uint64) ([]float64, *mat.SymDense, bool) {
	n, k := s.Dims()
	bestDet := math.Inf(1)
	var bestMu []float64
	var bestCov *mat.SymDense
	try := func(subset []int) {
		for iter := 0; iter < 100; iter++ {
			mu, cov := meanCov(s, subset)
			var ch mat.Cholesky
			if !ch.Factorize(cov) {
				return
			}
			det := ch.Det()
			d2 := mahalanobis(s, mu, &ch)
			next := smallest(d2, h)
			if det < bestDet {
				bestDet, bestMu, bestCov = det, mu, cov
			}
			if slices.Equal(next, subset) {
				return
			}
			subset = next
		}
	}
	for _, st := range starts {
		try(slices.Clone(st))
	}
	for r := 0; r < robustMCDStarts; r++ {
		rng := taskRNG(seed, streamRobustMCD, r)
		perm := rng.Perm(n)[:min(n, k+1)]
		mu, cov := meanCov(s, perm)
		var ch mat.Cholesky
		if !ch.Factorize(cov) {
			continue
		}
		try(smallest(mahalanobis(s, mu, &ch), h))
	}
	if bestCov == nil {
		return nil, nil, false
	}
	chi50 := distuv.ChiSquared{K: float64(k)}.Quantile(0.5)
	chi975 := distuv.ChiSquared{K: float64(k)}.Quantile(robustCutoff)
	consistent := func(mu []float64, cov *mat.SymDense) ([]float64, bool) {
		var ch mat.Cholesky
		if !ch.Factorize(cov) {
			return nil, false
		}
		d2 := mahalanobis(s, mu, &ch)
		sorted := slices.Clone(d2)
		slices.Sort(sorted)
		f := percentile(sorted, 50) / chi50
		if !(f > 0) {
			return nil, false
		}
		cov.ScaleSym(f, cov)
		for i := range d2 {
			d2[i] /= f
		}
		return d2, true
	}
	d2, ok := consistent(bestMu, bestCov)
	if !ok {
		return nil, nil, false
	}
	var keep []int
	for i, v := range d2 {
		if v <= chi975 {
			keep = append(keep, i)
		}
	}
	if len(keep) <= k {
		return bestMu, bestCov, true
	}
	mu, cov := meanCov(s, keep)
	if _, ok := consistent(mu, cov); !ok {
		return bestMu, bestCov, true
	}
	return mu, cov, true
}

// rowMean returns the mean of rows idx of t.
func rowMean(t *mat.Dense, idx []int) []float64 {
	_, m := t.Dims()
	mean := make([]float64, m)
	for _, i := range idx {
		for j, v := range t.RawRowView(i) {
			mean[j] += v
		}
	}
	for j := range mean {
		mean[j] /= float64(len(idx))
	}
	return mean
}

// meanCov returns the mean and covariance (divisor |idx| − 1) of rows idx.
func meanCov(s *mat.Dense, idx []int) ([]float64, *mat.SymDense) {
	_, k := s.Dims()
	mu := rowMean(s, idx)
	cov := mat.NewSymDense(k, nil)
	c := make([]float64, k)
	for _, i := range idx {
		for a, v := range s.RawRowView(i) {
			c[a] = v - mu[a]
		}
		for a := 0; a < k; a++ {
			for b := a; b < k; b++ {
				cov.SetSym(a, b, cov.At(a, b)+c[a]*c[b])
			}
		}
	}
	cov.ScaleSym(1/float64(max(len(idx)-1, 1)), cov)
	return mu, cov
}

// mahalanobis returns (sᵢ − μ)ᵀ Σ⁻¹ (sᵢ − μ) for every row, Σ = LLᵀ given
// by its Cholesky factor: ‖L⁻¹(sᵢ − μ)‖², by forward substitution (k is
// small, and this runs for every row in every concentration step).
func mahalanobis(s *mat.Dense, mu []float64, ch *mat.Cholesky) []float64 {
	n, k := s.Dims()
	var l mat.TriDense
	ch.LTo(&l)
	raw := l.RawTriangular()
	out := make([]float64, n)
	y := make([]float64, k)
	for i := 0; i < n; i++ {
		row := s.RawRowView(i)
		d2 := 0.0
		for a := 0; a < k; a++ {
			v := row[a] - mu[a]
			la := raw.Data[a*raw.Stride:]
			for b := 0; b < a; b++ {
				v -= la[b] * y[b]
			}
			y[a] = v / la[a]
			d2 += y[a] * y[a]
		}
		out[i] = d2
	}
	return out
}

// smallest returns the indices of the h smallest values, ascending by index
// (ties at the h-th value broken by index, so the subset is deterministic).
func smallest(v []float64, h int) []int {
	sorted := slices.Clone(v)
	slices.Sort(sorted)
	thr := sorted[h-1]
	below := 0
	for _, x := range sorted[:h] {
		if x < thr {
			below++
		}
	}
	ties := h - below // values equal to thr to take, the first by index
	out := make([]int, 0, h)
	for i, x := range v {
		switch {
		case x < thr:
			out = append(out, i)
		case x == thr && ties > 0:
			out = append(out, i)
			ties--
		}
	}
	return out
}

// sphericalPCA is spherical PCA (Locantore et al. 1999, Test 8:1–73) on the
// n × m coordinates t: the spatial median as centre; the eigenvectors of the
// second moment of the centred samples projected onto the unit sphere as
// loadings (the first k); and, as eigenvalues, the squared MAD of the
// samples' scores on each, sorted descending with their loadings.
func sphericalPCA(t *mat.Dense, k int) robustCoords {
	n, m := t.Dims()
	c := spatialMedian(t)
	v := sphericalDirections(t, c)
	scale := make([]float64, k)
	score := make([]float64, n)
	cen := make([]float64, m)
	for a := 0; a < k; a++ {
		for i := 0; i < n; i++ {
			row := t.RawRowView(i)
			for j := range cen {
				cen[j] = row[j] - c[j]
			}
			sc := 0.0
			for j := 0; j < m; j++ {
				sc += cen[j] * v.At(j, a)
			}
			score[i] = sc
		}
		_, mad := medianMAD(score)
		scale[a] = mad * mad
	}
	order := make([]int, k)
	for a := range order {
		order[a] = a
	}
	slices.SortStableFunc(order, func(a, b int) int { return cmp.Compare(scale[b], scale[a]) })
	out := robustCoords{center: c, loadings: mat.NewDense(m, k, nil), eigen: make([]float64, k)}
	for a, src := range order {
		out.eigen[a] = scale[src]
		for j := 0; j < m; j++ {
			out.loadings.Set(j, a, v.At(j, src))
		}
	}
	return out
}

// sphericalDirections returns the right singular vectors of the rows of t
// centred at c and projected onto the unit sphere (columns, by decreasing
// singular value), as the eigenvectors of their m × m cross-product,
// accumulated row by row so that the n × m projected matrix is never held.
// The rows have unit length, so the cross-product's entries are bounded by
// n and forming it loses nothing that matters for directions whose
// eigenvalues are well apart; the eigenvalues themselves are not used.
func sphericalDirections(t *mat.Dense, c []float64) *mat.Dense {
	n, m := t.Dims()
	cross := make([]float64, m*m)
	y := make([]float64, m)
	for i := 0; i < n; i++ {
		row := t.RawRowView(i)
		norm := 0.0
		for j := range y {
			y[j] = row[j] - c[j]
			norm += y[j] * y[j]
		}
		if norm == 0 {
			continue
		}
		for j := range y {
			y[j] /= math.Sqrt(norm)
		}
		for j := 0; j < m; j++ {
			for l := j; l < m; l++ {
				cross[j*m+l] += y[j] * y[l]
			}
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(mat.NewSymDense(m, cross), true) {
		// EigenSym fails only on non-finite input, which the table reader
		// and the magnitude check rule out.
		panic("analysis: spherical PCA: eigendecomposition failed")
	}
	var vecs mat.Dense
	eig.VectorsTo(&vecs)
	v := mat.NewDense(m, m, nil)
	for a := 0; a < m; a++ { // EigenSym sorts ascending
		for j := 0; j < m; j++ {
			v.Set(j, a, vecs.At(j, m-1-a))
		}
	}
	return v
}

// spatialMedian returns the point minimising the sum of Euclidean
// distances to the rows of t, by Weiszfeld's iteration from the
// coordinate-wise median (rows at the current estimate are left out of a
// step, the usual safeguard; Vardi & Zhang 2000, PNAS 97:1423–1426, give
// the exact modification).
func spatialMedian(t *mat.Dense) []float64 {
	n, m := t.Dims()
	c := make([]float64, m)
	col := make([]float64, n)
	spread := 0.0
	for j := 0; j < m; j++ {
		for i := 0; i < n; i++ {
			col[i] = t.At(i, j)
		}
		slices.Sort(col)
		c[j] = percentile(col, 50)
		spread += (col[n-1] - col[0]) * (col[n-1] - col[0])
	}
	tol := 1e-10 * math.Sqrt(spread)
	next := make([]float64, m)
	for iter := 0; iter < 500; iter++ {
		clear(next)
		wsum := 0.0
		for i := 0; i < n; i++ {
			row := t.RawRowView(i)
			d := 0.0
			for j, v := range row {
				d += (v - c[j]) * (v - c[j])
			}
			if d <= tol*tol {
				continue
			}
			w := 1 / math.Sqrt(d)
			wsum += w
			for j, v := range row {
				next[j] += w * v
			}
		}
		if wsum == 0 {
			return c
		}
		move := 0.0
		for j := range next {
			next[j] /= wsum
			move += (next[j] - c[j]) * (next[j] - c[j])
		}
		copy(c, next)
		if math.Sqrt(move) <= tol {
			break
		}
	}
	return c
}

// sphericalFit is spherical PCA of r's data whatever the size rule says,
// for tests that compare the two methods.
func sphericalFit(r *Result) RobustFit {
	t, vm := robustSpace(r.Z, r.Decomp)
	return finishRobust(t, vm, r.Retained, sphericalPCA(t, r.Retained), RobustFit{Method: RobustSpherical})
}
