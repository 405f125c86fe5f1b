package analysis

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// bruteLeaveOut refits the whole pipeline on x without row i: preprocessing,
// decomposition, k retained loadings and eigenvalues.
func bruteLeaveOut(t *testing.T, x *mat.Dense, scaling Scaling, i, k int) (*mat.Dense, []float64) {
	t.Helper()
	n, p := x.Dims()
	rest := mat.NewDense(n-1, p, nil)
	for r, src := 0, 0; src < n; src++ {
		if src != i {
			rest.SetRow(r, x.RawRowView(src))
			r++
		}
	}
	pp, err := FitPreprocessing(rest, intake.TransformNone, scaling)
	if err != nil {
		t.Fatal(err)
	}
	d, err := Decompose(pp.Apply(nil, rest))
	if err != nil {
		t.Fatal(err)
	}
	return mat.DenseCopyOf(d.Loadings.Slice(0, p, 0, k)), d.Eigenvalues[:k]
}

// The closed-form leave-one-out equals refitting the whole PCA without each
// sample (the reference: brute-force recomputation by the package's own
// preprocessing and SVD, which the external-reference tests tie to R and
// NumPy), for tall and wide data under every scaling.
func TestLeaveOneOutMatchesRefitting(t *testing.T) {
	for _, shape := range []struct {
		name    string
		n, p, k int
	}{{"tall", 30, 6, 2}, {"square", 9, 9, 2}, {"wide", 12, 20, 2}, {"wide k=3", 8, 15, 3}} {
		x, _ := synth.LowRank(synth.RNG(11, uint64(shape.n)), shape.n, shape.p, []float64{3, 2, 1.5}[:shape.k], 0.7)
		// Uneven units, so that scaling matters, and one far sample, so
		// that leaving it out changes a column's range and spread.
		for j := 0; j < shape.p; j++ {
			for i := 0; i < shape.n; i++ {
				x.Set(i, j, x.At(i, j)*float64(j+1)+float64(10*j))
			}
		}
		x.Set(3, 1, x.At(3, 1)+25)
		for _, scaling := range Scalings {
			t.Run(fmt.Sprintf("%s/%s", shape.name, scaling), func(t *testing.T) {
				pp, z, d := fitAndDecompose(t, x, scaling)
				v := d.Loadings.Slice(0, shape.p, 0, shape.k)
				inf := LeaveOneOut(z, pp, v, d.Eigenvalues, 2)
				if inf.Skipped != "" {
					t.Fatal(inf.Skipped)
				}
				// Sample 3 is planted to matter: the test is void if it does not.
				if inf.Angle[3] < 0.1 {
					t.Errorf("the planted sample turns the subspace by only %g°", inf.Angle[3])
				}
				for i := 0; i < shape.n; i++ {
					vi, ev := bruteLeaveOut(t, x, scaling, i, shape.k)
					want := LargestPrincipalAngle(v, vi)
					if math.Abs(inf.Angle[i]-want) > 1e-8 {
						t.Errorf("sample %d: angle %.12g°, refitted %.12g°", i, inf.Angle[i], want)
					}
					for a := 0; a < shape.k; a++ {
						wantChange := (ev[a] - d.Eigenvalues[a]) / d.Eigenvalues[a]
						if math.Abs(inf.EigenChange[i][a]-wantChange) > 1e-8 {
							t.Errorf("sample %d PC%d: eigenvalue change %.12g, refitted %.12g", i, a+1, inf.EigenChange[i][a], wantChange)
						}
					}
				}
			})
		}
	}
}

// A planted rotation: span{e1, e2} against span{e1, cos θ e2 + sin θ e3}
// has principal angles 0 and θ exactly (Björck & Golub 1973, fact of the
// trade). The sine route keeps θ = 1e-9 rad, where an arccosine of the
// cosine (1 − 5e-19 rounds to 1) gives 0.
func TestLargestPrincipalAngleKnownRotation(t *testing.T) {
	for _, theta := range []float64{1e-9, 1e-4, 0.3, math.Pi / 4, 1.2, math.Pi / 2} {
		a := mat.NewDense(4, 2, []float64{1, 0, 0, 1, 0, 0, 0, 0})
		b := mat.NewDense(4, 2, []float64{1, 0, 0, math.Cos(theta), 0, math.Sin(theta), 0, 0})
		got := LargestPrincipalAngle(a, b) * math.Pi / 180
		if math.Abs(got-theta) > 1e-12*math.Max(theta, 1e-3) {
			t.Errorf("θ = %g: got %.17g", theta, got)
		}
		// The order of the columns and their signs do not matter.
		b2 := mat.NewDense(4, 2, []float64{0, -1, math.Cos(theta), 0, math.Sin(theta), 0, 0, 0})
		if got2 := LargestPrincipalAngle(a, b2) * math.Pi / 180; math.Abs(got2-theta) > 1e-12*math.Max(theta, 1e-3) {
			t.Errorf("θ = %g, permuted: got %.17g", theta, got2)
		}
	}
}

func TestLeaveOneOutSkips(t *testing.T) {
	x, _ := synth.LowRank(synth.RNG(1, 1), 20, 4, []float64{2}, 0.5)
	pp, _ := FitPreprocessing(x, intake.TransformNone, ScaleUnit)
	z := pp.Apply(nil, x)
	d, _ := Decompose(z)
	if inf := LeaveOneOut(z, pp, d.Loadings, d.Eigenvalues, 1); inf.Skipped == "" || inf.Angle != nil {
		t.Errorf("all components retained: %+v", inf)
	}
	old := InfluenceBudget
	InfluenceBudget = 1
	defer func() { InfluenceBudget = old }()
	if inf := LeaveOneOut(z, pp, d.Loadings.Slice(0, 4, 0, 1), d.Eigenvalues, 1); inf.Skipped == "" {
		t.Error("over budget: not skipped")
	}
}

// For one retained component the largest principal angle is the angle
// between two unit vectors, arccos |φ| of Tucker's congruence (fact of the
// trade): the bootstrap's subspace angles must agree with its congruences.
func TestBootstrapSubspaceAnglesMatchCongruence(t *testing.T) {
	x, _ := synth.LowRank(synth.RNG(4, 4), 80, 6, []float64{3}, 1)
	r, err := Analyze(intake.TableFromMatrix("t", x, nil, nil), Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 1}, Bootstrap: 50, Seed: 2})
	if err != nil {
		t.Fatal(err)
	}
	st := r.Stability
	if len(st.SubspaceAngles) != 50 || st.Used != 50 {
		t.Fatalf("%d angles for %d used resamples", len(st.SubspaceAngles), st.Used)
	}
	for b, a := range st.SubspaceAngles {
		want := math.Acos(math.Min(1, st.Congruence[0][b])) * 180 / math.Pi
		if math.Abs(a-want) > 1e-6 {
			t.Errorf("resample %d: angle %g°, arccos φ %g°", b, a, want)
		}
	}
	// Every sample has a yardstick, and the samples.csv token follows it.
	lim := r.Samples.Influence.Limit
	if len(lim) != 80 || math.IsNaN(lim[0]) {
		t.Fatalf("influence limits %v", lim)
	}
	r.Samples.Influence.Limit[3] = -1
	if b := r.Samples.Beyond(3); len(b) == 0 || b[len(b)-1] != "influence" {
		t.Errorf("beyond %v: want the influence token", b)
	}
}
