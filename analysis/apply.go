package analysis

import (
	"fmt"
	"golang.org/x/text/unicode/norm"
	"math"
	"slices"
	"strconv"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// Application is a saved model applied to new samples: their preprocessing
// with the training means and scales (never re-estimated), their scores,
// Hotelling T² against the limit for new observations, Q against the
// training limits, and, for the flagged samples, which variables push them
// out.
type Application struct {
	Model *Model
	Table *intake.Table // the new samples; its variables are the model's that it has

	// Missing lists model variables the new data lack; nothing is scored
	// then. Extra lists columns of the new data that are not in the model.
	Missing []string
	Extra   []string

	Z        *mat.Dense // preprocessed new data, n × p, model variable order
	Scores   *mat.Dense // n × k
	T2, Q    []float64
	Leverage []float64 // 1/n₀ + T²/(n₀−1), n₀ the training size, as for training samples
	Limits   ModelLimits
	// FamilyConf is the Šidák per-sample confidence for this batch of n
	// new samples, (1 − α)^(1/n) with α = FamilyAlpha, and T2Family and
	// QFamily the new-observation T² limit and the Q limit at it.
	FamilyConf        float64
	T2Family, QFamily float64

	// Shift is, per variable, the new batch's mean in training standard
	// deviations from the training mean (transformed units).
	Shift []float64

	// Flagged lists the samples beyond a 99 % limit of T² or Q, worst
	// first, and Contributions their per-variable contributions.
	Flagged       []int
	Contributions []Contribution
}

// Contribution is one flagged sample's breakdown by variable.
type Contribution struct {
	Sample int
	// T2 is each variable's contribution to the sample's T², summing to T²
	// (Westerhuis, Gurden & Smilde 2000, Chemometr. Intell. Lab. Syst.
	// 51:95–114): c_j = z_j Σ_a v_ja t_a / λ_a; it may be negative.
	T2 []float64
	// Q is each variable's squared residual, summing to Q (Miller, Swanson
	// & Heckler 1998, Appl. Math. Comput. Sci. 8:775–792).
	Q []float64
	// Residual is each variable's signed residual, e = z − t Vᵀ in
	// preprocessed units (Q[j] = Residual[j]²): its sign says whether the
	// sample is above or below what the model reconstructs.
	Residual []float64
}

// MaxPreprocessed is the largest magnitude a preprocessed value may have.
// Below it, squares and sums of squares of a few million of them stay far
// inside double precision (1e200 × 1e6 < 1.8e308), so T², Q and the
// contributions are finite; the same bound applies to the training data.
const MaxPreprocessed = 1e100

// ColumnKey is the form in which column names are compared: Unicode NFC,
// so that a name typed with a precomposed "ä" and one written as "a" plus a
// combining diaeresis (as some systems save file names and headers) are one
// name.
func ColumnKey(name string) string { return norm.NFC.String(name) }

// modelColumns returns, for each model variable, its column in t, or −1
// when t lacks it.
func modelColumns(m *Model, t *intake.Table) []int {
	have := map[string]int{}
	for j, v := range t.Variables {
		have[ColumnKey(v)] = j
	}
	idx := make([]int, len(m.Variables))
	for j, v := range m.Variables {
		c, ok := have[ColumnKey(v)]
		if !ok {
			c = -1
		}
		idx[j] = c
	}
	return idx
}

// CheckNewValues refuses new samples that the model cannot score in double
// precision: a cell whose value, after the model's transform and the
// training centring and scaling, exceeds MaxPreprocessed in magnitude (a
// 1e160 where the training data held tens makes T² overflow to +Inf). The
// error names the first such cell in file order: its line, column, variable
// and value. Variables the table lacks are Apply's business, not this one's.
func CheckNewValues(m *Model, t *intake.Table) error {
	idx := modelColumns(m, t)
	n := t.Rows()
	for i := 0; i < n; i++ {
		for j, c := range idx {
			if c < 0 {
				continue
			}
			x := t.X.At(i, c)
			z := (x - m.Means[j]) / m.Scales[j]
			if math.Abs(z) <= MaxPreprocessed {
				continue // NaN fails this test too, and is refused below
			}
			reason := fmt.Sprintf("after the training centring and scaling this value is %.1e, beyond the ±1e100 within which T² and Q stay finite in double precision; check the cell and its units:", z)
			if math.IsNaN(z) || math.IsInf(z, 0) {
				reason = "after the training centring and scaling this value is not a finite number, so T² and Q cannot be computed; check the cell and its units:"
			}
			return cellError(t, i, c, rawValue(t.Transform, x, true), reason)
		}
	}
	return nil
}

// cellError reports the value of variable c of sample i of t, named by its
// line and column in the file where the table records them.
func cellError(t *intake.Table, i, c int, value, reason string) *intake.InputError {
	e := &intake.InputError{File: t.File, Sheet: t.Sheet, Name: t.Variables[c], Text: value, Reason: reason}
	if i < len(t.Lines) {
		e.Line = t.Lines[i]
	}
	if c < len(t.Columns) {
		e.Column = t.Columns[c]
	}
	return e
}

// rawValue writes a transformed value back in the units of the file, for
// messages: exactly when there is no transform and v is exact, to six
// digits otherwise.
func rawValue(tr intake.Transform, v float64, exact bool) string {
	switch tr {
	case intake.TransformLog:
		v = math.Exp(v)
	case intake.TransformLog10:
		v = math.Pow(10, v)
	case intake.TransformLog1p:
		v = math.Expm1(v)
	default:
		if exact {
			return strconv.FormatFloat(v, 'g', -1, 64)
		}
	}
	return strconv.FormatFloat(v, 'g', 6, 64)
}

// Apply scores the table against the model. Variables are matched by name;
// when some are missing the application records them and scores nothing.
// Values are expected to have passed CheckNewValues; if one has not, its
// sample's T² or Q may come out infinite, and such a sample is ranked as
// the worst (RankBeyond99) rather than dropped.
func Apply(m *Model, t *intake.Table) *Application {
	app := &Application{Model: m, Table: t, Limits: m.Limits}
	idx := modelColumns(m, t)
	for j, v := range m.Variables {
		if idx[j] < 0 {
			app.Missing = append(app.Missing, v)
		}
	}
	inModel := map[string]bool{}
	for _, v := range m.Variables {
		inModel[v] = true
	}
	for _, v := range t.Variables {
		if !inModel[v] {
			app.Extra = append(app.Extra, v)
		}
	}
	if len(app.Missing) > 0 {
		return app
	}
	n := t.Rows()
	p, k := len(m.Variables), m.Retained
	app.Z = mat.NewDense(n, p, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < p; j++ {
			app.Z.Set(i, j, (t.X.At(i, idx[j])-m.Means[j])/m.Scales[j])
		}
	}
	v := m.LoadingsMatrix()
	app.Scores = mat.NewDense(n, k, nil)
	app.Scores.Mul(app.Z, v)
	app.T2, app.Q, app.Leverage = make([]float64, n), make([]float64, n), make([]float64, n)
	n0 := float64(m.Input.Rows)
	resid := make([]float64, p)
	for i := 0; i < n; i++ {
		t2 := 0.0
		for a := 0; a < k; a++ {
			ta := app.Scores.At(i, a)
			t2 += ta * ta / m.Eigenvalues[a]
		}
		app.T2[i] = t2
		app.Leverage[i] = 1/n0 + t2/(n0-1)
		app.Q[i] = residuals(app.Z.RawRowView(i), app.Scores.RawRowView(i), v, resid)
	}
	app.Shift = make([]float64, p)
	for j := 0; j < p; j++ {
		app.Shift[j] = (ColumnMean(t.X, idx[j]) - m.Means[j]) / m.SDs[j]
	}
	app.FamilyConf = SidakConfidence(FamilyAlpha, n)
	app.T2Family = T2LimitNew(m.Input.Rows, k, app.FamilyConf)
	if k < len(m.Eigenvalues) {
		app.QFamily, _ = QLimit(m.Eigenvalues[k:], app.FamilyConf)
	}
	app.Flagged = RankBeyond99(app.T2, app.Q, app.Limits.T2_99, app.Limits.Q99)
	for _, i := range app.Flagged {
		app.Contributions = append(app.Contributions, app.contribution(i, v))
	}
	return app
}

// residuals writes z − t Vᵀ into resid and returns its squared length.
func residuals(z, t []float64, v *mat.Dense, resid []float64) float64 {
	copy(resid, z)
	for a, ta := range t {
		for j := range resid {
			resid[j] -= ta * v.At(j, a)
		}
	}
	q := 0.0
	for _, r := range resid {
		q += r * r
	}
	return q
}

func (app *Application) contribution(i int, v *mat.Dense) Contribution {
	return contributionOf(i, app.Z.RawRowView(i), app.Scores.RawRowView(i), v, app.Model.Eigenvalues, nil)
}

// contributionOf breaks sample i's T² and Q down by variable, from its
// preprocessed row z, its scores t, the retained loadings v (p × k) and the
// eigenvalues. A component with live[a] false (a null one, left out of T²)
// adds nothing to the T² contributions; nil live counts every component.
func contributionOf(i int, z, t []float64, v *mat.Dense, eigenvalues []float64, live []bool) Contribution {
	p := len(z)
	c := Contribution{Sample: i, T2: make([]float64, p), Q: make([]float64, p), Residual: make([]float64, p)}
	contributionInto(&c, z, t, v, eigenvalues, live)
	return c
}

// contributionInto is contributionOf writing into c's slices (each of
// length p), for callers that go through many samples.
func contributionInto(c *Contribution, z, t []float64, v *mat.Dense, eigenvalues []float64, live []bool) {
	residuals(z, t, v, c.Residual)
	for j := range z {
		w := 0.0
		for a := range t {
			if live == nil || live[a] {
				w += v.At(j, a) * t[a] / eigenvalues[a]
			}
		}
		c.T2[j] = z[j] * w
		c.Q[j] = c.Residual[j] * c.Residual[j]
	}
}

// RankBeyond99 returns the indices of the samples whose Hotelling T² or Q
// residual passes its 99 % limit, worst first: a sample's severity is the
// larger of T²/limit and Q/limit, and ties keep the input order. A limit that
// is zero or not a number is ignored; a T² or Q that is not a finite number
// ranks first.
func RankBeyond99(t2, q []float64, t2Limit99, qLimit99 float64) []int {
	var out []ranked
	for i := range t2 {
		score := 0.0
		if t2Limit99 > 0 {
			score = t2[i] / t2Limit99
		}
		if qLimit99 > 0 && i < len(q) {
			score = math.Max(score, q[i]/qLimit99)
		}
		// A statistic that is not a finite number is beyond any limit:
		// the sample cannot be judged and must be looked at first.
		if math.IsNaN(t2[i]) || math.IsInf(t2[i], 0) || i < len(q) && (math.IsNaN(q[i]) || math.IsInf(q[i], 0)) {
			score = math.Inf(1)
		}
		if score > 1 {
			out = append(out, ranked{i, score})
		}
	}
	return worstFirst(out)
}

// Beyond lists the limits sample i passes, as SampleStats.Beyond does.
func (app *Application) Beyond(i int) []string {
	s := SampleStats{T2: app.T2, Q: app.Q, Leverage: app.Leverage,
		Limits: Limits{T2_95: app.Limits.T2_95, T2_99: app.Limits.T2_99, Q95: app.Limits.Q95, Q99: app.Limits.Q99,
			QMethod: app.Limits.QMethod, Leverage: LeverageFactor * float64(app.Model.Retained+1) / float64(app.Model.Input.Rows),
			FamilyConf: app.FamilyConf, T2Family: app.T2Family, QFamily: app.QFamily}}
	return s.Beyond(i)
}

// ranked is a sample and how far beyond its limits it lies.
type ranked struct {
	i     int
	score float64
}

// worstFirst returns the samples of out ordered by score, largest first,
// ties in their given order.
func worstFirst(out []ranked) []int {
	slices.SortStableFunc(out, func(a, b ranked) int {
		switch {
		case a.score > b.score:
			return -1
		case a.score < b.score:
			return 1
		}
		return 0
	})
	idx := make([]int, len(out))
	for j, r := range out {
		idx[j] = r.i
	}
	return idx
}
