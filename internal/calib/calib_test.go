package calib

import (
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"

	"pcqc/checks"
)

// quickBounds are the loose bounds of the quick harness (TestQuickHarness):
// the loose versions of the full targets. Verdict pass on ≥ 60 % of
// the clean tables (full target 95 %), retained = planted k on ≥ 80 % (95 %),
// no check alarming on more than a third of them (2 %), and every planted
// defect caught and its samples named on at least 2 of 3 seeds (95 %). With
// 30 clean tables a check that alarms at the full target's rate fails these
// bounds with negligible probability, and one that alarms on every table
// fails them always (TestBoundsCatchAlarms).
var quickBounds = Bounds{MinPass: 0.6, MinRetainedK: 0.8, DefaultMaxAlarm: 0.34, MinDetected: 2.0 / 3, MinNamed: 2.0 / 3}

// quickSettings keep the quick harness fast; the full one uses the
// defaults of pcqc run.
var quickSettings = Settings{Permutations: 300, Bootstrap: 60}

// quickSeed is the seed of the quick harness (any fixed value of our own).
const quickSeed = 0x5eed_c0de_2024

// TestQuickHarness is the go-test version of bench/calibrate: thirty clean
// tables (three per cell of a small grid: n ∈ {100, 300}, p ∈ {5, 10}, k ∈ {1, 2},
// Gaussian and t10, where feasible) and three seeds of every planted defect, audited with
// reduced resampling, against quickBounds.
func TestQuickHarness(t *testing.T) {
	if testing.Short() {
		t.Skip("the quick harness audits 54 tables")
	}
	cells, _ := Grid([]int{100, 300}, []int{5, 10}, []int{1, 2})
	specs := Plan(cells, 3, 3)
	outs := Run(specs, quickSeed, quickSettings, 2, nil)
	s := Tally(outs)
	var b strings.Builder
	s.Write(&b)
	t.Logf("quick harness:\n%s", b.String())
	for _, v := range s.Violations(quickBounds) {
		t.Error(v)
	}
}

// TestBoundsCatchAlarms shows that the bounds can fail: a check that warns
// on every clean table, a wrong count, a defect never caught and a culprit
// never named each make a violation, and a clean record makes none.
func TestBoundsCatchAlarms(t *testing.T) {
	cell := Cell{N: 300, P: 10, K: 2}
	clean := func(status checks.Status, retained int) Outcome {
		return Outcome{Cell: cell, Defect: Clean, Verdict: status, Retained: retained,
			Status: map[string]checks.Status{"always": status}, Message: map[string]string{}}
	}
	caught := func(d Defect, msg string) Outcome {
		id := ExpectedChecks(d)[0]
		return Outcome{Cell: cell, Defect: d, Planted: []string{"s0042"},
			Status: map[string]checks.Status{id: checks.Warn}, Message: map[string]string{id: msg}}
	}
	tests := []struct {
		name string
		outs []Outcome
		want []string // substrings of the violations, in order
	}{
		{"clean record", []Outcome{clean(checks.Pass, 2), caught(OffModel, "They are: s0042.")}, nil},
		{"always warns", []Outcome{clean(checks.Warn, 2), clean(checks.Warn, 2)}, []string{"verdict pass on 0.000", "always alarms on 1.000"}},
		{"wrong count", []Outcome{clean(checks.Pass, 3)}, []string{"retained = planted k on 0.000"}},
		{"not named", []Outcome{caught(OffModel, "They are: s00421, s0041.")}, []string{"off-model named"}},
		{"not caught", []Outcome{{Defect: AlongModel, Status: map[string]checks.Status{"outliers-t2": checks.Pass}}}, []string{"along-model caught", "along-model named"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := Tally(tc.outs).Violations(Targets)
			if len(got) != len(tc.want) {
				t.Fatalf("violations %q, want %d", got, len(tc.want))
			}
			for i, w := range tc.want {
				if !strings.Contains(got[i], w) {
					t.Errorf("violation %q, want one containing %q", got[i], w)
				}
			}
		})
	}
}

// TestSpectrumDesign checks the design of the clean tables against its
// stated rules: eigenvalues sum to p (a correlation matrix), the smallest
// signal eigenvalue is twice the Marchenko–Pastur edge (1 + √(p/n))²
// (Marchenko & Pastur 1967), consecutive gaps exceed four sampling errors
// λ√((2 + κ)/n) (North et al. 1982 for κ = 0; κ = 1 for t₁₀, whose excess
// kurtosis is 6/(ν − 4)), and the noise eigenvalue is at least 0.25.
func TestSpectrumDesign(t *testing.T) {
	cells, infeasible := FullGrid()
	// 36 Gaussian cells; the t₁₀ variant's wider gaps leave out three more
	// at small n: (100,20,2), (300,20,3) and (300,50,4).
	if len(cells) != 69 || len(infeasible) != 59 {
		t.Errorf("%d feasible cells and %d left out, want 69 (36 + 33) and 59 (28 + 31)", len(cells), len(infeasible))
	}
	for _, c := range cells {
		lam, _ := Spectrum(c.N, c.P, c.K, c.Tail)
		n, p, k := float64(c.N), float64(c.P), c.K
		sum := 0.0
		for _, l := range lam {
			sum += l
		}
		if math.Abs(sum-p) > 1e-9*p {
			t.Errorf("%v: eigenvalues sum to %g, want p", c, sum)
		}
		edge := math.Pow(1+math.Sqrt(p/n), 2)
		if math.Abs(lam[k-1]-2*edge) > 1e-12*edge {
			t.Errorf("%v: λ_k = %g, want 2·edge = %g", c, lam[k-1], 2*edge)
		}
		for j := 0; j+1 < k; j++ {
			kappa := 0.0
			if c.Tail == StudentT {
				kappa = 1
			}
			if gap := lam[j] - lam[j+1]; gap < 4*lam[j]*math.Sqrt((2+kappa)/n)-1e-12 {
				t.Errorf("%v: gap %d is %g, below four sampling errors", c, j+1, gap)
			}
		}
		if lam[k] < 0.25 || lam[k] >= lam[k-1] {
			t.Errorf("%v: noise eigenvalue %g", c, lam[k])
		}
	}
}

// TestCorrelationWithSpectrum checks Davies & Higham's construction: a unit
// diagonal, the planted eigenvalues (by gonum's symmetric eigensolver, an
// independent computation), and eigenvectors that diagonalise the matrix.
func TestCorrelationWithSpectrum(t *testing.T) {
	for _, c := range []Cell{{100, 5, 1, Gaussian}, {300, 20, 3, Gaussian}, {1000, 50, 4, Gaussian}} {
		lam, _ := Spectrum(c.N, c.P, c.K, c.Tail)
		a, v := correlationWithSpectrum(rand.New(rand.NewPCG(7, uint64(c.P))), lam)
		for i := range c.P {
			if d := math.Abs(a.At(i, i) - 1); d > 1e-12 {
				t.Errorf("%v: diagonal %d off by %g", c, i, d)
			}
		}
		var eig mat.EigenSym
		sym := mat.NewSymDense(c.P, nil)
		for i := range c.P {
			for j := i; j < c.P; j++ {
				sym.SetSym(i, j, (a.At(i, j)+a.At(j, i))/2)
			}
		}
		if !eig.Factorize(sym, false) {
			t.Fatal("eigendecomposition failed")
		}
		got := eig.Values(nil)
		sort.Sort(sort.Reverse(sort.Float64Slice(got)))
		for j := range lam {
			if d := math.Abs(got[j] - lam[j]); d > 1e-10 {
				t.Errorf("%v: eigenvalue %d = %g, want %g", c, j+1, got[j], lam[j])
			}
		}
		// V diag(λ) Vᵀ reproduces A.
		var back mat.Dense
		back.Mul(v, mat.NewDiagDense(c.P, lam))
		back.Mul(&back, v.T())
		if !mat.EqualApprox(&back, a, 1e-10) {
			t.Errorf("%v: eigenvectors do not reproduce the matrix", c)
		}
	}
}

// TestSampleMoments checks that both tails have unit variance and the
// planted correlation, and that the t10 scores have the excess kurtosis
// 6/(ν − 4) = 1 of Student's t (a textbook fact) while Gaussian ones have 0.
func TestSampleMoments(t *testing.T) {
	lam := []float64{1.6, 0.4}
	a, v := correlationWithSpectrum(rand.New(rand.NewPCG(3, 1)), lam)
	identity := mat.NewDense(2, 2, []float64{1, 0, 0, 1})
	for _, tc := range []struct {
		tail     Tail
		kurtosis float64
	}{{Gaussian, 0}, {StudentT, 1}} {
		const n = 200000
		x := sample(rand.New(rand.NewPCG(5, uint64(tc.tail))), n, lam, v, tc.tail)
		col0, col1 := mat.Col(nil, 0, x), mat.Col(nil, 1, x)
		if sd := stat.StdDev(col0, nil); math.Abs(sd-1) > 0.01 {
			t.Errorf("%v: sd %g, want 1", tc.tail, sd)
		}
		if r := stat.Correlation(col0, col1, nil); math.Abs(r-a.At(0, 1)) > 0.01 {
			t.Errorf("%v: correlation %g, want %g", tc.tail, r, a.At(0, 1))
		}
		// The scores themselves (identity axes, unit eigenvalues). The
		// sampling error of excess kurtosis is about √(24/n) = 0.011 for a
		// Gaussian, several times that for t10.
		z := sample(rand.New(rand.NewPCG(6, uint64(tc.tail))), n, []float64{1, 1}, identity, tc.tail)
		if k := stat.ExKurtosis(mat.Col(nil, 0, z), nil); math.Abs(k-tc.kurtosis) > 0.25 {
			t.Errorf("%v: excess kurtosis %g, want %g", tc.tail, k, tc.kurtosis)
		}
	}
}

// TestPlantedDefects checks what each defect plants, on the table itself.
func TestPlantedDefects(t *testing.T) {
	cell := DefectCell(0)
	for _, d := range Defects {
		c, err := NewCase(11, 0, cell, d)
		if err != nil {
			t.Fatal(err)
		}
		n, p := c.Table.X.Dims()
		switch d {
		case OffModel, AlongModel, DuplicateRows, LoneComponent:
			want := map[Defect]int{OffModel: 3, AlongModel: 3, DuplicateRows: 4, LoneComponent: 1}[d]
			if len(c.Planted) != want {
				t.Errorf("%s: planted %v", d, c.Planted)
			}
		}
		switch d {
		case DuplicateRows:
			for i := 0; i < 4; i += 2 {
				a, b := slices.Index(c.Table.IDs, c.Planted[i]), slices.Index(c.Table.IDs, c.Planted[i+1])
				if !slices.Equal(c.Table.X.RawRowView(a), c.Table.X.RawRowView(b)) {
					t.Errorf("rows %s and %s differ", c.Planted[i], c.Planted[i+1])
				}
			}
		case MixedUnits:
			if c.Scaling != "none" || stat.StdDev(mat.Col(nil, 0, c.Table.X), nil) < 100 {
				t.Errorf("mixed units: scaling %s", c.Scaling)
			}
		case SkewedVariable:
			col := mat.Col(nil, 0, c.Table.X)
			if slices.Min(col) <= 0 || stat.Skew(col, nil) < 2 {
				t.Errorf("skewed variable: min %g, skewness %g", slices.Min(col), stat.Skew(col, nil))
			}
		case LoneComponent:
			if p != cell.P+3 || n != cell.N {
				t.Errorf("lone component: %d × %d", n, p)
			}
		}
	}
}

// TestNewCaseRefusesCellsOutsideTheDesign: an infeasible cell, or equal
// leading eigenvalues with one component, is an error, not a table.
func TestNewCaseRefusesCellsOutsideTheDesign(t *testing.T) {
	for _, tc := range []struct {
		cell   Cell
		defect Defect
	}{{Cell{100, 5, 4, Gaussian}, Clean}, {Cell{300, 10, 1, Gaussian}, EqualEigenvalues}, {Cell{300, 10, 10, Gaussian}, Clean}} {
		if _, err := NewCase(1, 0, tc.cell, tc.defect); err == nil {
			t.Errorf("%v %s: no error", tc.cell, tc.defect)
		}
	}
}

// TestRunIndependentOfWorkers: the outcomes depend on the seed and the
// table's index only, not on how many workers audit them.
func TestRunIndependentOfWorkers(t *testing.T) {
	specs := []Spec{{Cell{100, 5, 1, Gaussian}, Clean}, {Cell{100, 5, 1, StudentT}, Clean}, {DefectCell(0), OffModel}}
	s := Settings{Permutations: 20, Bootstrap: 20}
	one, two := Run(specs, 9, s, 1, nil), Run(specs, 9, s, 3, nil)
	for i := range specs {
		if one[i].Verdict != two[i].Verdict || one[i].Retained != two[i].Retained || len(one[i].Message) != len(two[i].Message) {
			t.Fatalf("table %d differs between 1 and 3 workers", i)
		}
		for id, m := range one[i].Message {
			if two[i].Message[id] != m {
				t.Errorf("table %d, %s: %q vs %q", i, id, m, two[i].Message[id])
			}
		}
	}
}
