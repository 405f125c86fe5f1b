package analysis

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"sort"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// SummaryFile is an audit folder's summary.json, read by compare. It holds
// a few p-long lists and per-check text; a model's cap is ample.
var SummaryFile = intake.FileKind{What: "the summary", Max: 256 << 20}

// SavedAudit is what compare reads of an audit folder: the model (variables,
// retained loadings, every eigenvalue) and, from summary.json, the check
// statuses and the bootstrap intervals when the audit ran a bootstrap.
type SavedAudit struct {
	Dir     string
	Model   *Model
	Verdict string
	Checks  []SavedCheck
	// Intervals holds the bootstrap 95 % percentile intervals of each
	// eigenvalue and its percentage; nil when the audit ran no bootstrap.
	Intervals []SavedInterval
	// CongruenceP5 is, per retained component, the 5th percentile of the
	// bootstrap congruence with the audit's own loadings; nil without one.
	CongruenceP5 []float64
	// AngleP95 is the 95th percentile of the bootstrap's largest principal
	// angle to the audit's own retained subspace, in degrees; NaN without
	// a bootstrap.
	AngleP95 float64
}

// SavedCheck is one check's outcome as summary.json records it.
type SavedCheck struct {
	ID     string `json:"id"`
	Title  string `json:"title"`
	Status string `json:"status"`
}

// SavedInterval is a component's bootstrap intervals.
type SavedInterval struct {
	Low, High               float64 // of the eigenvalue
	PercentLow, PercentHigh float64 // of its percentage of the total
}

// savedSummary is the part of summary.json compare reads. Other fields are
// ignored: summary.json grows with pcqc, and compare needs none of them.
type savedSummary struct {
	Tool *struct {
		Name    string `json:"name"`
		Version string `json:"version"`
	} `json:"tool"`
	Components *struct {
		Retained    int       `json:"retained"`
		Eigenvalues []float64 `json:"eigenvalues"`
	} `json:"components"`
	Stability *struct {
		Components []struct {
			CongruenceP5 *float64 `json:"congruence_p5"`
		} `json:"components"`
		Eigenvalues []struct {
			Low         *float64 `json:"ci_low"`
			High        *float64 `json:"ci_high"`
			PercentLow  *float64 `json:"percent_ci_low"`
			PercentHigh *float64 `json:"percent_ci_high"`
		} `json:"eigenvalues"`
	} `json:"stability"`
	Limits *struct {
		AngleP95 *float64 `json:"influence_p95_deg"`
	} `json:"limits"`
	Checks  []SavedCheck `json:"checks"`
	Verdict string       `json:"verdict"`
}

// LoadAudit reads and validates an audit folder written by pcqc run (or
// demo): model.json through LoadModel, and summary.json, which must agree
// with the model. A folder that is not an audit, or a damaged one, is an
// InputError naming the file.
func LoadAudit(dir string) (*SavedAudit, error) {
	st, err := os.Stat(dir)
	if err != nil {
		return nil, &intake.InputError{File: dir, Reason: "no such audit folder"}
	}
	if !st.IsDir() {
		return nil, &intake.InputError{File: dir, Reason: "not a folder; give an audit folder written by pcqc run"}
	}
	modelPath := filepath.Join(dir, "model.json")
	if _, err := os.Stat(modelPath); errors.Is(err, fs.ErrNotExist) {
		return nil, &intake.InputError{File: dir, Reason: "not a pcqc audit folder: it holds no model.json (is this a folder written by pcqc run?)"}
	}
	m, err := LoadModel(modelPath)
	if err != nil {
		return nil, err
	}
	path := filepath.Join(dir, "summary.json")
	b, err := intake.ReadRegular(path, SummaryFile)
	if err != nil {
		return nil, err
	}
	damaged := func(line, col int, reason string) error {
		return &intake.InputError{File: path, Line: line, Column: col, Reason: "damaged audit summary: " + reason}
	}
	var s savedSummary
	if err := json.Unmarshal(b, &s); err != nil {
		return nil, damaged(jsonErrorPosition(b, err))
	}
	switch {
	case s.Tool == nil || s.Tool.Name != "pcqc":
		return nil, damaged(0, 0, "not written by pcqc (no tool name \"pcqc\")")
	case s.Components == nil:
		return nil, damaged(0, 0, "no components section (is this the summary of pcqc apply or review? compare takes audits written by pcqc run)")
	case s.Components.Retained != m.Retained:
		return nil, damaged(0, 0, fmt.Sprintf("it retains %d components where model.json retains %d", s.Components.Retained, m.Retained))
	case len(s.Components.Eigenvalues) != len(m.Eigenvalues):
		return nil, damaged(0, 0, fmt.Sprintf("it lists %d eigenvalues where model.json lists %d", len(s.Components.Eigenvalues), len(m.Eigenvalues)))
	case len(s.Checks) == 0:
		return nil, damaged(0, 0, "no check results")
	}
	for i, l := range s.Components.Eigenvalues {
		if math.Abs(l-m.Eigenvalues[i]) > 1e-9*math.Max(1, math.Abs(m.Eigenvalues[0])) {
			return nil, damaged(0, 0, fmt.Sprintf("eigenvalue %d is %g where model.json has %g (from different runs?)", i+1, l, m.Eigenvalues[i]))
		}
	}
	seen := map[string]bool{}
	for i, c := range s.Checks {
		switch c.Status {
		case "pass", "warn", "fail", "skip":
		default:
			return nil, damaged(0, 0, fmt.Sprintf("check %d (%q) has status %q, not pass, warn, fail or skip", i+1, c.ID, c.Status))
		}
		if c.ID == "" || seen[c.ID] {
			return nil, damaged(0, 0, fmt.Sprintf("check %d has an empty or repeated id %q", i+1, c.ID))
		}
		seen[c.ID] = true
	}
	a := &SavedAudit{Dir: dir, Model: m, Verdict: s.Verdict, Checks: s.Checks, AngleP95: math.NaN()}
	if s.Limits != nil {
		a.AngleP95 = orNaN(s.Limits.AngleP95)
	}
	if st := s.Stability; st != nil && len(st.Eigenvalues) == len(m.Eigenvalues) {
		for _, e := range st.Eigenvalues {
			a.Intervals = append(a.Intervals, SavedInterval{orNaN(e.Low), orNaN(e.High), orNaN(e.PercentLow), orNaN(e.PercentHigh)})
		}
		if len(st.Components) == m.Retained {
			for _, c := range st.Components {
				a.CongruenceP5 = append(a.CongruenceP5, orNaN(c.CongruenceP5))
			}
		}
	}
	return a, nil
}

func orNaN(x *float64) float64 {
	if x == nil {
		return math.NaN()
	}
	return *x
}

// AuditComparison is the comparison of two audits, A and B.
type AuditComparison struct {
	A, B *SavedAudit
	// Common lists the variables both audits hold, in A's order, with
	// their rows in each model; OnlyA and OnlyB those of one audit only.
	Common       []string
	RowA, RowB   []int
	OnlyA, OnlyB []string
	// Congruence[a][b] is Tucker's φ between A's component a and B's
	// component b over the common variables.
	Congruence [][]float64
	Pairs      []ComponentPair
	// Unpaired lists the components of the audit that retains more which
	// found no partner, 0-based.
	UnpairedA, UnpairedB []int
	// Angles are the principal angles, ascending, in degrees, between the
	// retained subspaces restricted to the common variables.
	Angles []float64
	Checks []CheckChange
}

// ComponentPair is a component of A matched with one of B.
type ComponentPair struct {
	A, B       int     // 0-based component indices
	Congruence float64 // φ after B's sign is aligned to A's: ≥ 0
	Sign       float64 // +1 or −1: the sign applied to B's loadings
	// Eigenvalues and their percentages of each audit's total variance.
	EigenA, EigenB     float64
	PercentA, PercentB float64
	// Bootstrap intervals where the audit has them (NaN otherwise).
	IntervalA, IntervalB SavedInterval
	// Largest lists the common variables whose loadings differ most,
	// largest first (B's loadings sign-aligned).
	Largest []LoadingDifference
}

// LoadingDifference is one variable's loading on a pair of components.
type LoadingDifference struct {
	Variable string
	A, B     float64 // B sign-aligned
	Diff     float64 // B − A
}

// CheckChange is one check's statuses in both audits ("" where an audit
// lacks the check).
type CheckChange struct {
	ID, Title string
	A, B      string
	Changed   bool
}

// largestDifferences is how many variables each pair lists.
const largestDifferences = 5

// CompareAudits compares two audits: variables by name (ColumnKey),
// components paired by the largest total |φ| (an optimal assignment,
// Kuhn 1955), principal angles between the retained subspaces over the
// common variables (Björck & Golub 1973), and check statuses.
func CompareAudits(a, b *SavedAudit) *AuditComparison {
	c := &AuditComparison{A: a, B: b}
	rowB := map[string]int{}
	for j, v := range b.Model.Variables {
		rowB[ColumnKey(v)] = j
	}
	inA := map[string]bool{}
	for j, v := range a.Model.Variables {
		inA[ColumnKey(v)] = true
		if k, ok := rowB[ColumnKey(v)]; ok {
			c.Common = append(c.Common, v)
			c.RowA = append(c.RowA, j)
			c.RowB = append(c.RowB, k)
		} else {
			c.OnlyA = append(c.OnlyA, v)
		}
	}
	for _, v := range b.Model.Variables {
		if !inA[ColumnKey(v)] {
			c.OnlyB = append(c.OnlyB, v)
		}
	}
	c.Checks = checkChanges(a.Checks, b.Checks)
	ka, kb := a.Model.Retained, b.Model.Retained
	if len(c.Common) == 0 {
		return c
	}
	la := commonLoadings(a.Model, c.RowA)
	lb := commonLoadings(b.Model, c.RowB)
	c.Congruence = make([][]float64, ka)
	cost := make([][]float64, ka)
	for i := 0; i < ka; i++ {
		c.Congruence[i] = make([]float64, kb)
		cost[i] = make([]float64, kb)
		for j := 0; j < kb; j++ {
			c.Congruence[i][j] = TuckerCongruence(mat.Col(nil, i, la), mat.Col(nil, j, lb))
			cost[i][j] = -math.Abs(c.Congruence[i][j])
		}
	}
	match := Assignment(cost)
	pa, pb := PercentOfTotal(a.Model.Eigenvalues), PercentOfTotal(b.Model.Eigenvalues)
	pairedB := make([]bool, kb)
	for i, j := range match {
		if j < 0 {
			c.UnpairedA = append(c.UnpairedA, i)
			continue
		}
		pairedB[j] = true
		phi := c.Congruence[i][j]
		sign := 1.0
		if phi < 0 {
			sign = -1
		}
		p := ComponentPair{A: i, B: j, Congruence: math.Abs(phi), Sign: sign,
			EigenA: a.Model.Eigenvalues[i], EigenB: b.Model.Eigenvalues[j], PercentA: pa[i], PercentB: pb[j],
			IntervalA: intervalOf(a, i), IntervalB: intervalOf(b, j)}
		for r, v := range c.Common {
			x, y := la.At(r, i), sign*lb.At(r, j)
			p.Largest = append(p.Largest, LoadingDifference{Variable: v, A: x, B: y, Diff: y - x})
		}
		sort.SliceStable(p.Largest, func(s, t int) bool { return math.Abs(p.Largest[s].Diff) > math.Abs(p.Largest[t].Diff) })
		p.Largest = p.Largest[:min(largestDifferences, len(p.Largest))]
		c.Pairs = append(c.Pairs, p)
	}
	for j, ok := range pairedB {
		if !ok {
			c.UnpairedB = append(c.UnpairedB, j)
		}
	}
	if len(c.Common) >= max(ka, kb) {
		c.Angles = PrincipalAngles(orthonormalBasis(la), orthonormalBasis(lb))
	}
	return c
}

// LargestAngle is the largest principal angle in degrees (NaN when none
// could be computed).
func (c *AuditComparison) LargestAngle() float64 {
	if len(c.Angles) == 0 {
		return math.NaN()
	}
	return c.Angles[len(c.Angles)-1]
}

// commonLoadings returns the model's retained loadings on the given rows.
func commonLoadings(m *Model, rows []int) *mat.Dense {
	out := mat.NewDense(len(rows), m.Retained, nil)
	for r, j := range rows {
		out.SetRow(r, m.Loadings[j])
	}
	return out
}

func intervalOf(a *SavedAudit, i int) SavedInterval {
	if i < len(a.Intervals) {
		return a.Intervals[i]
	}
	nan := math.NaN()
	return SavedInterval{nan, nan, nan, nan}
}

// checkChanges lists the checks of both audits, A's in order and then B's
// others, with their statuses side by side.
func checkChanges(a, b []SavedCheck) []CheckChange {
	inB := map[string]SavedCheck{}
	for _, c := range b {
		inB[c.ID] = c
	}
	seen := map[string]bool{}
	var out []CheckChange
	for _, c := range a {
		seen[c.ID] = true
		other := inB[c.ID].Status
		out = append(out, CheckChange{ID: c.ID, Title: c.Title, A: c.Status, B: other, Changed: c.Status != other})
	}
	for _, c := range b {
		if !seen[c.ID] {
			out = append(out, CheckChange{ID: c.ID, Title: c.Title, B: c.Status, Changed: true})
		}
	}
	return out
}

// PercentOfTotal returns each eigenvalue as a percentage of their sum.
func PercentOfTotal(eigen []float64) []float64 {
	total := 0.0
	for _, l := range eigen {
		total += l
	}
	out := make([]float64, len(eigen))
	for i, l := range eigen {
		out[i] = 100 * l / total
	}
	return out
}

// Assignment solves the rectangular assignment problem: it returns, for
// each row of cost, the column assigned to it (−1 when there are more rows
// than columns and the row is left out), minimising the total cost. It is
// the Hungarian method (Kuhn 1955, Naval Res. Logist. Q. 2:83–97) in the
// O(n³) form with row and column potentials (Munkres 1957); rows and
// columns are padded with zero cost to a square.
func Assignment(cost [][]float64) []int {
	rows := len(cost)
	cols := 0
	if rows > 0 {
		cols = len(cost[0])
	}
	n := max(rows, cols)
	at := func(i, j int) float64 {
		if i < rows && j < cols {
			return cost[i][j]
		}
		return 0
	}
	// 1-based potentials u (rows), v (columns); way[j] is the column
	// preceding j on the alternating path; p[j] the row matched to j.
	u := make([]float64, n+1)
	v := make([]float64, n+1)
	p := make([]int, n+1)
	way := make([]int, n+1)
	for i := 1; i <= n; i++ {
		p[0] = i
		j0 := 0
		minv := make([]float64, n+1)
		used := make([]bool, n+1)
		for j := range minv {
			minv[j] = math.Inf(1)
		}
		for {
			used[j0] = true
			i0, delta, j1 := p[j0], math.Inf(1), 0
			for j := 1; j <= n; j++ {
				if used[j] {
					continue
				}
				cur := at(i0-1, j-1) - u[i0] - v[j]
				if cur < minv[j] {
					minv[j], way[j] = cur, j0
				}
				if minv[j] < delta {
					delta, j1 = minv[j], j
				}
			}
			for j := 0; j <= n; j++ {
				if used[j] {
					u[p[j]] += delta
					v[j] -= delta
				} else {
					minv[j] -= delta
				}
			}
			j0 = j1
			if p[j0] == 0 {
				break
			}
		}
		for j0 != 0 {
			j1 := way[j0]
			p[j0] = p[j1]
			j0 = j1
		}
	}
	out := make([]int, rows)
	for i := range out {
		out[i] = -1
	}
	for j := 1; j <= n; j++ {
		if i := p[j] - 1; i >= 0 && i < rows && j-1 < cols {
			out[i] = j - 1
		}
	}
	return out
}
