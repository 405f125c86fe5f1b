package analysis

import (
	"fmt"
	"math"
	"slices"

	"pcqc/analysis/intake"
)

// WhatIf is the analysis refitted without the samples the outlier and
// influence checks flag: the reviewer's first question about outliers,
// "what happens without them?", answered on every audit.
type WhatIf struct {
	// Flagged are the flagged samples (rows of Result.Table, ascending)
	// and Why, for each, what flagged it: "t2", "q", "influence".
	Flagged []int
	Why     [][]string
	// Skipped says why no refit was made, when Refit is nil.
	Skipped string
	// Refit is the analysis of the table without the flagged samples,
	// with the same options except that it draws no bootstrap resamples
	// (so its stability and influence checks do not apply) and is not
	// itself refitted.
	Refit *Result

	// Per retained component a of the full fit: Match[a] is the refit
	// component paired with it by the assignment that maximises the summed
	// |Tucker congruence| over the first k components of each (k the full
	// fit's retained count), and Congruence[a] that |φ|.
	Match      []int
	Congruence []float64
	// Eigenvalue and Share (percent of the total variance) of component a
	// in the full fit, and RefitEigenvalue, RefitShare of its match.
	Eigenvalue, RefitEigenvalue []float64
	Share, RefitShare           []float64
	// Angle is the largest principal angle, in degrees, between the full
	// fit's retained subspace and the refit's first k components
	// (Björck & Golub 1973); AngleLimit the yardstick of resampling, the
	// 95th percentile of the bootstrap subspace angles over the resamples
	// that drew every flagged sample (setAngleLimit), NaN without enough
	// of them.
	Angle, AngleLimit float64
	// AngleResamples is how many resamples set AngleLimit.
	AngleResamples int
}

// FlaggedSamples returns the samples the outlier and influence checks
// name, judged as they judge them: T² beyond its family-wise limit (the
// Phase I set when the limits were adapted), Q beyond its family-wise
// limit, and a leave-one-out angle beyond its bootstrap yardstick (or one
// that could not be judged). Rows are ascending; why says what flagged each.
func FlaggedSamples(r *Result) (rows []int, why [][]string) {
	s := r.Samples
	l := s.Limits
	reasons := map[int][]string{}
	var t2 []int
	if l.T2Flagged != nil || l.T2Phase.T2 != nil {
		t2 = l.T2Flagged
	} else if l.T2Family > 0 {
		_, t2 = CountAbove(s.T2, l.T2Family)
	}
	for _, i := range t2 {
		reasons[i] = append(reasons[i], "t2")
	}
	if l.QMethod != QNone && l.QFamily > 0 {
		_, q := CountAbove(s.Q, l.QFamily)
		for _, i := range q {
			reasons[i] = append(reasons[i], "q")
		}
	}
	inf := s.Influence
	if inf.Angle != nil && len(inf.Limit) == len(inf.Angle) && !math.IsNaN(InfluenceLimit(r.Stability)) {
		for i, a := range inf.Angle {
			if !(a <= inf.Limit[i]) {
				reasons[i] = append(reasons[i], "influence")
			}
		}
	}
	for i := range reasons {
		rows = append(rows, i)
	}
	slices.Sort(rows)
	for _, i := range rows {
		why = append(why, reasons[i])
	}
	return rows, why
}

// RefitWithoutFlagged refits r's analysis without the samples
// FlaggedSamples names and compares the two fits. It returns a WhatIf with
// no Flagged when nothing is flagged, and one with Skipped set when the
// refit cannot be made (too few samples would remain, or it fails).
func RefitWithoutFlagged(r *Result) *WhatIf {
	w := &WhatIf{}
	w.Flagged, w.Why = FlaggedSamples(r)
	if len(w.Flagged) == 0 {
		return w
	}
	n := r.Table.Rows()
	k := r.Retained
	if left := n - len(w.Flagged); left < max(3, k+2) || 2*len(w.Flagged) > n {
		w.Skipped = fmt.Sprintf("%d of %d samples are flagged; a refit without them would describe %d samples, too few or too different a table to compare", len(w.Flagged), n, left)
		return w
	}
	kept, _ := splitRows(r.Table, w.Flagged)
	if j := constantColumn(kept); j >= 0 {
		w.Skipped = fmt.Sprintf("without them the variable %s takes a single value, so the other samples cannot be analysed alone with the same variables", kept.Variables[j])
		return w
	}
	opt := r.Options
	opt.Exclude, opt.InPlace, opt.Progress = nil, true, nil
	opt.Bootstrap = 0
	opt.noWhatIf = true
	refit, err := Analyze(kept, opt)
	if err != nil {
		// The error names a cell of the whole table, which would mislead
		// here; what matters is that the other samples do not stand alone.
		w.Skipped = "the other samples cannot be analysed as a table of their own"
		return w
	}
	if refit.Decomp.Components() < k {
		w.Skipped = fmt.Sprintf("the refit has %d components, fewer than the %d retained", refit.Decomp.Components(), k)
		return w
	}
	refitTotal := sum(refit.Decomp.Eigenvalues)
	if !(refitTotal > 0) || math.IsInf(refitTotal, 0) {
		w.Skipped = "without them the other samples have no variance to decompose"
		return w
	}
	w.Refit = refit
	a := r.RetainedLoadings()
	b := refit.Decomp.Loadings.Slice(0, refit.Decomp.Vars, 0, k)
	phi := make([][]float64, k)
	p := r.Decomp.Vars
	col := func(m interface{ At(i, j int) float64 }, c int) []float64 {
		out := make([]float64, p)
		for j := range out {
			out[j] = m.At(j, c)
		}
		return out
	}
	for i := 0; i < k; i++ {
		phi[i] = make([]float64, k)
		for j := 0; j < k; j++ {
			phi[i][j] = math.Abs(TuckerCongruence(col(a, i), col(b, j)))
			if math.IsNaN(phi[i][j]) { // keeps the assignment finite
				phi[i][j] = 0
			}
		}
	}
	w.Match = AssignMaximum(phi)
	total := sum(r.Decomp.Eigenvalues)
	for i, j := range w.Match {
		w.Congruence = append(w.Congruence, phi[i][j])
		w.Eigenvalue = append(w.Eigenvalue, r.Decomp.Eigenvalues[i])
		w.RefitEigenvalue = append(w.RefitEigenvalue, refit.Decomp.Eigenvalues[j])
		w.Share = append(w.Share, 100*r.Decomp.Eigenvalues[i]/total)
		w.RefitShare = append(w.RefitShare, 100*refit.Decomp.Eigenvalues[j]/refitTotal)
	}
	w.Angle = LargestPrincipalAngle(a, b)
	for i := range w.Congruence {
		if math.IsNaN(w.Congruence[i]) || math.IsNaN(w.RefitShare[i]) || math.IsNaN(w.Angle) {
			*w = WhatIf{Flagged: w.Flagged, Why: w.Why, Skipped: "the refit's components cannot be compared with these (a congruence, share or angle is not a number)"}
			return w
		}
	}
	w.AngleLimit, w.AngleResamples = setAngleLimit(r, w.Flagged)
	return w
}

// MinAngleResamples is the fewest bootstrap resamples a 95th percentile is
// taken over for the what-if yardstick: with fewer, the percentile rests
// on one or two values (common practice: about 20 values per tail
// percentile at 95 %).
const MinAngleResamples = 20

// setAngleLimit returns the yardstick of the refit's subspace angle: the
// 95th percentile of the bootstrap subspace angles over the resamples that
// drew every flagged sample, and how many there were. As for the influence
// check (InfluenceLimits), the resamples that lose the flagged samples
// would otherwise put their own effect into the yardstick: with two gross
// outliers, one resample in seven draws neither, so the 95th percentile
// of all angles is at least the angle of leaving both out. NaN when the
// bootstrap did not run or fewer than MinAngleResamples drew them all.
func setAngleLimit(r *Result, flagged []int) (float64, int) {
	n := r.Table.Rows()
	var drawn []float64
	for b, angle := range r.Stability.SubspaceAngles {
		if math.IsNaN(angle) {
			continue
		}
		c := bootstrapDraw(r.Options.Seed, b, n)
		all := true
		for _, i := range flagged {
			if c[i] == 0 {
				all = false
				break
			}
		}
		if all {
			drawn = append(drawn, angle)
		}
	}
	if len(drawn) < MinAngleResamples {
		return math.NaN(), len(drawn)
	}
	slices.Sort(drawn)
	return percentile(drawn, 95), len(drawn)
}

func sum(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v
	}
	return s
}

// AssignMaximum returns the assignment of rows to columns of the square
// matrix w that maximises the summed weight: out[i] is row i's column, so
// that pairing components is optimal rather than greedy (a greedy pairing
// can give the best match to the wrong row). It is Assignment (the
// Hungarian method) on the negated weights.
func AssignMaximum(w [][]float64) []int {
	cost := make([][]float64, len(w))
	for i, row := range w {
		cost[i] = make([]float64, len(row))
		for j, x := range row {
			cost[i][j] = -x
		}
	}
	return Assignment(cost)
}

// constantColumn returns the first variable of t that takes a single
// value (exactly: such a column has no spread to scale by), or −1.
func constantColumn(t *intake.Table) int {
	n, p := t.X.Dims()
	for j := 0; j < p; j++ {
		first, same := t.X.At(0, j), true
		for i := 1; i < n && same; i++ {
			same = t.X.At(i, j) == first
		}
		if same {
			return j
		}
	}
	return -1
}
