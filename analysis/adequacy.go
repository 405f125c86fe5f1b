package analysis

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Adequacy describes whether the data suit a PCA, measured on the
// transformed table before centring and scaling.
type Adequacy struct {
	// Variance and Skewness per variable (sample variance, n−1; adjusted
	// Fisher–Pearson skewness G1).
	Variance []float64
	Skewness []float64
	Positive []bool // every value of the variable is > 0
	// NearConstant lists variables that barely vary: at least
	// NearConstantModeShare of their values identical, or a coefficient of
	// variation below NearConstantCV.
	NearConstant []int
	// DuplicateRows groups the indices of rows whose variable values are
	// identical; only groups of two or more are kept.
	DuplicateRows [][]int
	// DuplicateIDs groups the indices of rows that share a sample id.
	DuplicateIDs [][]int

	Bartlett Bartlett
	KMO      KMO
	// ImputedShare is the share of cells imputed by iterative PCA, and
	// EffectiveN the sample size Bartlett's test and KMO's noise terms
	// used in its place (EffectiveSamples); 0 without imputation.
	ImputedShare float64
	EffectiveN   int
}

// Near-constant detection (common practice): a variable whose values are
// mostly one number, or whose spread is below a thousandth of its level,
// carries little beyond measurement noise, which unit scaling would inflate
// to the weight of any other variable.
const (
	NearConstantModeShare = 0.8
	NearConstantCV        = 1e-3
)

// MaxCorrelationVariables caps p for the statistics that need the p×p
// correlation matrix and its inverse (Bartlett, KMO): beyond it their cost
// (order p³) outgrows the rest of the audit.
const MaxCorrelationVariables = 2000

// Bartlett is Bartlett's (1951) test of sphericity.
type Bartlett struct {
	Computed   bool
	SkipReason string
	Chi2       float64
	DF         int
	P          float64
	Singular   bool // the correlation matrix is singular (collinear variables)
}

// KMO is the Kaiser–Meyer–Olkin measure of sampling adequacy.
type KMO struct {
	Computed    bool
	SkipReason  string
	Overall     float64
	PerVariable []float64
	// SumR2 and SumQ2 are Σ_{i≠j} r_ij² and Σ_{i≠j} q_ij², the two sums
	// of the overall measure.
	SumR2, SumQ2 float64
	// NoiseR2 and NoiseQ2 are what sampling noise alone adds to those sums
	// when the variables are independent: E r² = 1/(n−1) for a correlation
	// of n normal samples (Fisher 1915), and a partial correlation holding
	// p−2 variables fixed is distributed as a simple correlation of
	// n−p+2 samples (Fisher 1924), so E q² = 1/(n−p+1); each times
	// p(p−1) ordered pairs. At p = 50 and n = 100 noise alone puts the
	// measure near 0.34, below Kaiser's floor, whatever the structure.
	NoiseR2, NoiseQ2 float64
	// NoiseCorrected is the overall measure with that noise taken out of
	// both sums, (ΣR − NoiseR)/((ΣR − NoiseR) + max(ΣQ − NoiseQ, 0)); 0
	// when the correlations do not exceed noise at all.
	NoiseCorrected float64
}

// correctKMONoise fills the noise terms of k for n samples of p variables.
func correctKMONoise(k *KMO, n, p int) {
	if !k.Computed || n <= p {
		return
	}
	pairs := float64(p * (p - 1))
	k.NoiseR2 = pairs / float64(n-1)
	k.NoiseQ2 = pairs / float64(n-p+1)
	r := k.SumR2 - k.NoiseR2
	q := max(k.SumQ2-k.NoiseQ2, 0)
	if r > 0 {
		k.NoiseCorrected = r / (r + q)
	}
}

// Skewness returns the adjusted Fisher–Pearson skewness
// G1 = g1·√(n(n−1))/(n−2), g1 = m3/m2^(3/2) with central moments m_r
// (Joanes & Gill 1998, The Statistician 47:183–189, type 2; the estimator of
// most statistics packages). It is 0 for n < 3 or a constant column.
func Skewness(x []float64) float64 {
	n := float64(len(x))
	if n < 3 {
		return 0
	}
	mean := 0.0
	for _, v := range x {
		mean += v
	}
	mean /= n
	// Scale by the largest deviation so that cubes cannot overflow.
	scale := 0.0
	for _, v := range x {
		scale = math.Max(scale, math.Abs(v-mean))
	}
	if scale == 0 {
		return 0
	}
	var m2, m3 float64
	for _, v := range x {
		d := (v - mean) / scale
		m2 += d * d
		m3 += d * d * d
	}
	m2 /= n
	m3 /= n
	if m2 == 0 {
		return 0
	}
	g1 := m3 / math.Pow(m2, 1.5)
	return g1 * math.Sqrt(n*(n-1)) / (n - 2)
}

// MeasureAdequacy computes the adequacy statistics of the transformed table
// x (n × p) that need the raw values; Bartlett's test and KMO, which need
// only the correlations, come from the preprocessed matrix (correlationTests).
func MeasureAdequacy(x *mat.Dense) Adequacy {
	n, p := x.Dims()
	a := Adequacy{
		Variance: make([]float64, p),
		Skewness: make([]float64, p),
		Positive: make([]bool, p),
	}
	col := make([]float64, n)
	for j := 0; j < p; j++ {
		mat.Col(col, j, x)
		m := ColumnMean(x, j)
		raw := x.RawMatrix()
		sd := centredNorm(raw.Data, raw.Stride, n, j, m) / math.Sqrt(float64(n-1))
		a.Variance[j] = sd * sd
		a.Skewness[j] = Skewness(col)
		pos := true
		for _, v := range col {
			if v <= 0 {
				pos = false
				break
			}
		}
		a.Positive[j] = pos
		if m != 0 && sd/math.Abs(m) < NearConstantCV || majorityShare(col) >= NearConstantModeShare {
			a.NearConstant = append(a.NearConstant, j)
		}
	}
	a.DuplicateRows = duplicateRows(x)
	return a
}

// majorityShare returns the share of x held by its majority value (one
// occurring in more than half of the cells), or 0 when there is none. It
// finds the candidate by the Boyer–Moore majority vote (Boyer & Moore
// 1991), in one pass and no memory, and counts it in a second. The
// near-constant rule needs 80 %, so only a majority can qualify.
func majorityShare(x []float64) float64 {
	var cand float64
	votes := 0
	for _, v := range x {
		switch {
		case votes == 0:
			cand, votes = v, 1
		case v == cand: // identical values as read, not a tolerance question
			votes++
		default:
			votes--
		}
	}
	count := 0
	for _, v := range x {
		if v == cand {
			count++
		}
	}
	if 2*count <= len(x) {
		return 0
	}
	return float64(count) / float64(len(x))
}

// duplicateRows groups rows with identical values (bit for bit, as read),
// groups in order of first occurrence. Rows are sorted by a 64-bit hash of
// their values and only rows with equal hashes are compared, so memory is
// 16 bytes a row whatever p is.
func duplicateRows(x *mat.Dense) [][]int {
	n, _ := x.Dims()
	type hashed struct {
		h uint64
		i int32
	}
	hs := make([]hashed, n)
	for i := 0; i < n; i++ {
		hs[i] = hashed{rowHash(x.RawRowView(i)), int32(i)}
	}
	slices.SortFunc(hs, func(a, b hashed) int {
		if c := cmp.Compare(a.h, b.h); c != 0 {
			return c
		}
		return cmp.Compare(a.i, b.i)
	})
	var out [][]int
	for s := 0; s < n; {
		e := s + 1
		for e < n && hs[e].h == hs[s].h {
			e++
		}
		// Within a run of equal hashes, group rows that are truly equal.
		used := make([]bool, e-s)
		for a := s; a < e; a++ {
			if used[a-s] {
				continue
			}
			group := []int{int(hs[a].i)}
			for b := a + 1; b < e; b++ {
				if !used[b-s] && sameRow(x.RawRowView(int(hs[a].i)), x.RawRowView(int(hs[b].i))) {
					used[b-s] = true
					group = append(group, int(hs[b].i))
				}
			}
			if len(group) > 1 {
				out = append(out, group)
			}
		}
		s = e
	}
	slices.SortFunc(out, func(a, b []int) int { return cmp.Compare(a[0], b[0]) })
	return out
}

// rowHash is FNV-1a over the bits of the values (−0 folded into +0).
func rowHash(row []float64) uint64 {
	h := uint64(14695981039346656037)
	for _, v := range row {
		if v == 0 {
			v = 0
		}
		b := math.Float64bits(v)
		for s := 0; s < 64; s += 8 {
			h ^= (b >> s) & 0xff
			h *= 1099511628211
		}
	}
	return h
}

func sameRow(a, b []float64) bool {
	for j := range a {
		if a[j] != b[j] && !(a[j] == 0 && b[j] == 0) {
			return false
		}
	}
	return true
}

// correlationTests computes Bartlett's test of sphericity and the KMO
// measure from the correlation matrix of the preprocessed data. Both are
// skipped when p ≥ n (the correlation matrix is then singular by
// construction) or p exceeds MaxCorrelationVariables.
func correlationTests(z *mat.Dense) (Bartlett, KMO) {
	n, _ := z.Dims()
	return correlationTestsN(z, n)
}

// correlationTestsN is correlationTests with the statistics' sample size n
// given (see EffectiveSamples); the correlations come from all rows of z.
func correlationTestsN(z *mat.Dense, n int) (Bartlett, KMO) {
	rows, p := z.Dims()
	var b Bartlett
	var k KMO
	if p >= rows {
		reason := fmt.Sprintf("p = %d ≥ n = %d: the correlation matrix is singular by construction", p, rows)
		return Bartlett{SkipReason: reason}, KMO{SkipReason: reason}
	}
	if p >= n {
		reason := fmt.Sprintf("p = %d ≥ %d, the samples' worth of observed cells once imputed cells are discounted", p, n)
		return Bartlett{SkipReason: reason}, KMO{SkipReason: reason}
	}
	if p > MaxCorrelationVariables {
		reason := fmt.Sprintf("p = %d > %d variables: the p×p correlation matrix is too costly here", p, MaxCorrelationVariables)
		return Bartlett{SkipReason: reason}, KMO{SkipReason: reason}
	}
	r := CorrelationMatrix(z)
	b = BartlettSphericity(r, n)
	k = KaiserMeyerOlkin(r)
	correctKMONoise(&k, n, p)
	return b, k
}

// CorrelationMatrix returns the p×p correlation matrix of the columns of z,
// which must be centred.
func CorrelationMatrix(z *mat.Dense) *mat.SymDense {
	_, p := z.Dims()
	raw := z.RawMatrix()
	c := blas64.Symmetric{N: p, Stride: p, Uplo: blas.Upper, Data: make([]float64, p*p)}
	blas64.Syrk(blas.Trans, 1, raw, 0, c)
	r := mat.NewSymDense(p, c.Data)
	d := make([]float64, p)
	for j := 0; j < p; j++ {
		d[j] = math.Sqrt(r.At(j, j))
	}
	for i := 0; i < p; i++ {
		for j := i; j < p; j++ {
			v := 1.0
			if i != j {
				v = r.At(i, j) / (d[i] * d[j])
			}
			r.SetSym(i, j, v)
		}
	}
	return r
}

// BartlettSphericity tests whether the correlation matrix r of n samples is
// the identity (Bartlett 1950, Brit. J. Psychol. Statist. Sect. 3:77–85,
// with the multiplying factor of Bartlett 1951, Biometrika 38:337–344):
//
//	χ² = −(n − 1 − (2p+5)/6) ln|R|,  df = p(p−1)/2.
//
// A small p-value says the variables share structure worth reducing. ln|R|
// is taken from the eigenvalues of R; a singular R (collinear variables)
// gives p = 0.
func BartlettSphericity(r *mat.SymDense, n int) Bartlett {
	p := r.SymmetricDim()
	b := Bartlett{Computed: true, DF: p * (p - 1) / 2}
	var eig mat.EigenSym
	if !eig.Factorize(r, false) {
		return Bartlett{SkipReason: "the eigendecomposition of the correlation matrix failed"}
	}
	logDet := 0.0
	for _, l := range eig.Values(nil) {
		if l <= 1e-12 {
			b.Singular = true
			b.Chi2, b.P = math.Inf(1), 0
			return b
		}
		logDet += math.Log(l)
	}
	b.Chi2 = -(float64(n) - 1 - float64(2*p+5)/6) * logDet
	b.P = distuv.ChiSquared{K: float64(b.DF)}.Survival(b.Chi2)
	return b
}

// KaiserMeyerOlkin returns the Kaiser–Meyer–Olkin measure of sampling
// adequacy (Kaiser 1970, Psychometrika 35:401–415; Kaiser & Rice 1974, Educ.
// Psychol. Meas. 34:111–117), overall and per variable:
//
//	KMO = Σ_{i≠j} r_ij² / (Σ_{i≠j} r_ij² + Σ_{i≠j} q_ij²)
//
// where q_ij = −(R⁻¹)_ij / √((R⁻¹)_ii (R⁻¹)_jj) are the partial correlations.
// Values near 1 say the correlations are explained by shared components,
// not by pairs of variables.
func KaiserMeyerOlkin(r *mat.SymDense) KMO {
	p := r.SymmetricDim()
	var ch mat.Cholesky
	if !ch.Factorize(r) || ch.Cond() > 1e12 {
		return KMO{SkipReason: "the correlation matrix is singular or nearly so (collinear variables), so partial correlations are undefined"}
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return KMO{SkipReason: "the correlation matrix could not be inverted: " + err.Error()}
	}
	k := KMO{Computed: true, PerVariable: make([]float64, p)}
	var totR, totQ float64
	for i := 0; i < p; i++ {
		var ri, qi float64
		for j := 0; j < p; j++ {
			if i == j {
				continue
			}
			rij := r.At(i, j)
			qij := -inv.At(i, j) / math.Sqrt(inv.At(i, i)*inv.At(j, j))
			ri += rij * rij
			qi += qij * qij
		}
		if ri+qi > 0 {
			k.PerVariable[i] = ri / (ri + qi)
		}
		totR += ri
		totQ += qi
	}
	k.SumR2, k.SumQ2 = totR, totQ
	if totR+totQ > 0 {
		k.Overall = totR / (totR + totQ)
	}
	return k
}

// KMOLabel returns Kaiser's (1974, Psychometrika 39:31–36) words for a KMO
// value.
func KMOLabel(v float64) string {
	switch {
	case v >= 0.9:
		return "marvellous"
	case v >= 0.8:
		return "meritorious"
	case v >= 0.7:
		return "middling"
	case v >= 0.6:
		return "mediocre"
	case v >= 0.5:
		return "miserable"
	}
	return "unacceptable"
}

// Separation is North's rule of thumb for one pair of neighbouring
// eigenvalues.
type Separation struct {
	A            int     // 0-based index of the first of the pair (the second is A+1)
	DeltaA       float64 // λ_A·√(2/n)
	DeltaB       float64
	Overlap      bool
	BothRetained bool
	// AndersonChi2 and AndersonP test that the two population eigenvalues
	// are equal (Anderson 1963, Ann. Math. Statist. 34:122–148, the
	// likelihood-ratio test for q = 2 roots):
	//
	//	χ² = (n−1)·[2·ln((λ_A+λ_B)/2) − ln λ_A − ln λ_B],  df = q(q+1)/2 − 1 = 2.
	//
	// A large p says the data do not show the two eigenvalues apart.
	AndersonChi2 float64
	AndersonP    float64
}

// AndersonEqualPair returns Anderson's (1963) likelihood-ratio statistic
// for the equality of two eigenvalues la ≥ lb of a covariance matrix of n
// samples and its χ²₂ p-value. A zero second eigenvalue (wide data) is
// infinitely far from the first: χ² = +Inf, p = 0.
func AndersonEqualPair(la, lb float64, n int) (chi2, p float64) {
	if lb <= 0 || la <= 0 {
		return math.Inf(1), 0
	}
	chi2 = float64(n-1) * (2*math.Log((la+lb)/2) - math.Log(la) - math.Log(lb))
	chi2 = max(chi2, 0) // rounding when la == lb
	// The χ² survival function with 2 degrees of freedom is exp(−x/2).
	return chi2, math.Exp(-chi2 / 2)
}

// EigenvalueSeparation applies North, Bell, Cahalan & Moeng's (1982, Mon.
// Weather Rev. 110:699–706) rule of thumb: the sampling error of an
// eigenvalue is about δλ = λ·√(2/n), and when the intervals λ ± δλ of
// neighbouring eigenvalues overlap, their components can mix: only the plane
// they span is well determined. Pairs (a, a+1) for a = 1..k are returned, the
// last one pairing the last retained component with the first discarded.
func EigenvalueSeparation(eigenvalues []float64, n, k int) []Separation {
	f := math.Sqrt(2 / float64(n))
	var out []Separation
	for a := 0; a < k && a+1 < len(eigenvalues); a++ {
		la, lb := eigenvalues[a], eigenvalues[a+1]
		s := Separation{A: a, DeltaA: la * f, DeltaB: lb * f, BothRetained: a+1 < k}
		s.Overlap = la-s.DeltaA <= lb+s.DeltaB
		s.AndersonChi2, s.AndersonP = AndersonEqualPair(la, lb, n)
		out = append(out, s)
	}
	return out
}

// duplicateIDs groups the rows that share a sample id, in order of first
// occurrence.
func duplicateIDs(ids []string) [][]int {
	first := make(map[string]int, len(ids))
	var groups [][]int
	where := map[string]int{}
	for i, id := range ids {
		j, seen := first[id]
		if !seen {
			first[id] = i
			continue
		}
		g, ok := where[id]
		if !ok {
			g = len(groups)
			where[id] = g
			groups = append(groups, []int{j})
		}
		groups[g] = append(groups[g], i)
	}
	return groups
}
