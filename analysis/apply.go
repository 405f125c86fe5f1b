package analysis

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// Application is a saved model applied to new samples: their preprocessing
// with the training means and scales (never re-estimated), their scores,
// Hotelling T² against the limit for new observations, Q against the
// training limits, and, for the flagged samples, which variables push them
// out.
type Application struct {
	Model *Model
	Table *Table // the new samples; its variables are the model's that it has

	// Missing lists model variables the new data lack; nothing is scored
	// then. Extra lists columns of the new data that are not in the model.
	Missing []string
	Extra   []string

	Z        *mat.Dense // preprocessed new data, n × p, model variable order
	Scores   *mat.Dense // n × k
	T2, Q    []float64
	Leverage []float64 // 1/n₀ + T²/(n₀−1), n₀ the training size, as for training samples
	Limits   ModelLimits

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
}

// Apply scores the table against the model. Variables are matched by name;
// when some are missing the application records them and scores nothing.
func Apply(m *Model, t *Table) *Application {
	app := &Application{Model: m, Table: t, Limits: m.Limits}
	have := map[string]int{}
	for j, v := range t.Variables {
		have[v] = j
	}
	idx := make([]int, len(m.Variables))
	for j, v := range m.Variables {
		c, ok := have[v]
		if !ok {
			app.Missing = append(app.Missing, v)
		}
		idx[j] = c
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
	m := app.Model
	p := len(m.Variables)
	z, t := app.Z.RawRowView(i), app.Scores.RawRowView(i)
	c := Contribution{Sample: i, T2: make([]float64, p), Q: make([]float64, p)}
	resid := make([]float64, p)
	residuals(z, t, v, resid)
	for j := 0; j < p; j++ {
		w := 0.0
		for a := range t {
			w += v.At(j, a) * t[a] / m.Eigenvalues[a]
		}
		c.T2[j] = z[j] * w
		c.Q[j] = resid[j] * resid[j]
	}
	return c
}

// RankBeyond99 returns the indices of the samples whose Hotelling T² or Q
// residual passes its 99 % limit, worst first: a sample's severity is the
// larger of T²/limit and Q/limit, and ties keep the input order. A limit that
// is zero or not a number is ignored.
func RankBeyond99(t2, q []float64, t2Limit99, qLimit99 float64) []int {
	type ranked struct {
		i     int
		score float64
	}
	var out []ranked
	for i := range t2 {
		score := 0.0
		if t2Limit99 > 0 {
			score = t2[i] / t2Limit99
		}
		if qLimit99 > 0 && i < len(q) {
			score = math.Max(score, q[i]/qLimit99)
		}
		if score > 1 {
			out = append(out, ranked{i, score})
		}
	}
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

// Beyond lists the limits sample i passes, as SampleStats.Beyond does.
func (app *Application) Beyond(i int) []string {
	s := SampleStats{T2: app.T2, Q: app.Q, Leverage: app.Leverage,
		Limits: Limits{T2_95: app.Limits.T2_95, T2_99: app.Limits.T2_99, Q95: app.Limits.Q95, Q99: app.Limits.Q99,
			QMethod: app.Limits.QMethod, Leverage: LeverageFactor * float64(app.Model.Retained+1) / float64(app.Model.Input.Rows)}}
	return s.Beyond(i)
}
