package checks

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

func analyzeText(t *testing.T, text string, read intake.ReadOptions, opt analysis.Options) *analysis.Result {
	t.Helper()
	tab, err := intake.ReadTableFrom("t.csv", strings.NewReader(text), read)
	if err != nil {
		t.Fatal(err)
	}
	if opt.Components.Kind == "" {
		opt.Components = analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 1}
	}
	res, err := analysis.Analyze(tab, opt)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// table writes n rows of p columns from f(i, j) as CSV with ids.
func table(n, p int, f func(i, j int) float64) string {
	var b strings.Builder
	b.WriteString("id")
	for j := 0; j < p; j++ {
		fmt.Fprintf(&b, ",v%d", j+1)
	}
	b.WriteString("\n")
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "s%d", i+1)
		for j := 0; j < p; j++ {
			v := f(i, j)
			if math.IsNaN(v) {
				b.WriteString(",NA")
			} else {
				fmt.Fprintf(&b, ",%g", v)
			}
		}
		b.WriteString("\n")
	}
	return b.String()
}

func TestAdequacyChecksReachTheirStatuses(t *testing.T) {
	rng := synth.RNG(1, 40)
	noise := synth.Gaussian(rng, 400, 6)
	factor, _ := synth.LowRank(synth.RNG(2, 40), 400, 6, []float64{3}, 1)
	cell := func(i, j int) float64 { return factor.At(i, j) }

	cases := []struct {
		name   string
		text   string
		read   intake.ReadOptions
		opt    analysis.Options
		check  Check
		status Status
		inMsg  string
	}{
		{"no missing", table(400, 6, cell), intake.ReadOptions{}, analysis.Options{}, missingValues, Pass, "No cell"},
		{"many dropped", table(400, 6, func(i, j int) float64 {
			if j == 0 && i%10 == 0 {
				return math.NaN()
			}
			return cell(i, j)
		}), intake.ReadOptions{Missing: intake.MissingDrop}, analysis.Options{}, missingValues, Warn, "40 rows of 400 (10.0 %) dropped"},
		{"few imputed", table(400, 6, func(i, j int) float64 {
			if j == 0 && i < 3 {
				return math.NaN()
			}
			return cell(i, j)
		}), intake.ReadOptions{Missing: intake.MissingMean}, analysis.Options{}, missingValues, Pass, "3 cells of 2400"},
		// The 80 % rule (Bijlsma et al. 2006): v2 missing in 25 % of the
		// rows is named with its share under every policy; 20 % exactly
		// is not over the limit.
		{"gappy variable, mean", table(400, 6, func(i, j int) float64 {
			if j == 1 && i%4 == 0 {
				return math.NaN()
			}
			return cell(i, j)
		}), intake.ReadOptions{Missing: intake.MissingMean}, analysis.Options{}, missingValues, Warn, "v2 (25.0 %)"},
		{"gappy variable, iterative", table(400, 6, func(i, j int) float64 {
			if (j == 1 && i%4 == 0) || (j == 3 && i%3 == 0) || (j == 4 && i%5 == 0) {
				return math.NaN()
			}
			return cell(i, j)
		}), intake.ReadOptions{Missing: intake.MissingIterative}, analysis.Options{}, missingValues, Warn, "rows read: v4 (33.5 %), v2 (25.0 %)."},
		{"gappy variable, drop", table(400, 6, func(i, j int) float64 {
			if j == 0 && i%4 == 1 {
				return math.NaN()
			}
			return cell(i, j)
		}), intake.ReadOptions{Missing: intake.MissingDrop}, analysis.Options{}, missingValues, Warn, "v1 (25.0 %)"},
		{"20 % exactly, iterative", table(400, 6, func(i, j int) float64 {
			if j == 4 && i%5 == 0 {
				return math.NaN()
			}
			return cell(i, j)
		}), intake.ReadOptions{Missing: intake.MissingIterative}, analysis.Options{}, missingValues, Pass, "80 cells of 2400 (3.3 %) imputed"},
		{"constant dropped", table(400, 6, func(i, j int) float64 {
			if j == 5 {
				return 7
			}
			return cell(i, j)
		}), intake.ReadOptions{}, analysis.Options{}, constantVariables, Warn, "v6"},
		{"duplicate rows", table(400, 6, func(i, j int) float64 { return cell(i%399, j) }), intake.ReadOptions{}, analysis.Options{}, duplicateRows, Warn, "s1 = s400"},
		{"few samples", table(20, 6, cell), intake.ReadOptions{}, analysis.Options{}, sampleSize, Pass, "Fewer than 5"},
		{"wide", table(10, 30, func(i, j int) float64 { return noise.At(i+10*(j/6), j%6) }), intake.ReadOptions{}, analysis.Options{}, sampleSize, Pass, "More variables than samples"},
		{"units dominate", table(400, 6, func(i, j int) float64 {
			if j == 2 {
				return 1000 * cell(i, j)
			}
			return cell(i, j)
		}), intake.ReadOptions{}, analysis.Options{Scaling: analysis.ScaleNone}, scaling, Warn, "v3 will dominate PC1"},
		{"near-constant under unit scaling", table(400, 6, func(i, j int) float64 {
			if j == 4 {
				if i%20 == 0 {
					return 1.1
				}
				return 1
			}
			return cell(i, j)
		}), intake.ReadOptions{}, analysis.Options{Scaling: analysis.ScaleUnit}, scaling, Warn, "v5"},
		{"skewed positive", table(400, 6, func(i, j int) float64 {
			if j == 1 {
				return math.Exp(2 * noise.At(i, 1))
			}
			return cell(i, j)
		}), intake.ReadOptions{}, analysis.Options{}, skewness, Warn, "--transform log"},
		{"symmetric", table(400, 6, cell), intake.ReadOptions{}, analysis.Options{}, skewness, Pass, "No variable"},
		{"noise has no structure", table(400, 6, func(i, j int) float64 { return noise.At(i, j) }), intake.ReadOptions{}, analysis.Options{}, sphericity, Warn, "no shared structure"},
		{"factor structure", table(400, 6, cell), intake.ReadOptions{}, analysis.Options{}, sphericity, Pass, "share structure"},
		{"noise KMO", table(400, 6, func(i, j int) float64 { return noise.At(i, j) }), intake.ReadOptions{}, analysis.Options{}, samplingAdequacy, Fail, "unacceptable"},
		{"factor KMO", table(400, 6, cell), intake.ReadOptions{}, analysis.Options{}, samplingAdequacy, Pass, "Kaiser's words"},
		{"wide KMO skipped", table(10, 30, func(i, j int) float64 { return noise.At(i+10*(j/6), j%6) }), intake.ReadOptions{}, analysis.Options{}, samplingAdequacy, Skip, "p = 30 ≥ n = 10"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			res := analyzeText(t, c.text, c.read, c.opt)
			r := c.check.Run(Input{Run: res})
			if r.Status != c.status || !strings.Contains(r.Message, c.inMsg) {
				t.Errorf("%s: %s %q; want %s containing %q", c.check.ID, r.Status, r.Message, c.status, c.inMsg)
			}
		})
	}
}

func TestComponentChecks(t *testing.T) {
	// Two well-separated planted components: the rules agree, eigenvalues
	// are separated.
	x, _ := synth.LowRank(synth.RNG(3, 41), 500, 10, []float64{4, 2}, 0.5)
	res, err := analysis.Analyze(intake.TableFromMatrix("t", x, nil, nil), analysis.Options{Scaling: analysis.ScaleUnit, Permutations: 100, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	if r := componentCount.Run(Input{Run: res}); r.Status != Pass {
		t.Errorf("component-count: %s %s", r.Status, r.Message)
	}
	if r := eigenvalueSeparation.Run(Input{Run: res}); r.Status != Pass {
		t.Errorf("eigenvalue-separation: %s %s", r.Status, r.Message)
	}
	// Two planted components of equal strength (each drives five of ten
	// variables): their eigenvalues overlap.
	rng := synth.RNG(4, 41)
	f := synth.Gaussian(rng, 100, 2)
	x = synth.Gaussian(rng, 100, 10)
	for i := 0; i < 100; i++ {
		for j := 0; j < 10; j++ {
			x.Set(i, j, 0.5*x.At(i, j)+3*f.At(i, j/5))
		}
	}
	res, err = analysis.Analyze(intake.TableFromMatrix("t", x, nil, nil), analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}})
	if err != nil {
		t.Fatal(err)
	}
	if r := eigenvalueSeparation.Run(Input{Run: res}); r.Status != Warn || !strings.Contains(r.Message, "PC1 and PC2") {
		t.Errorf("eigenvalue-separation on equal components: %s %s", r.Status, r.Message)
	}
}

func TestSampleChecks(t *testing.T) {
	x, _ := synth.LowRank(synth.RNG(5, 42), 300, 8, []float64{3, 2}, 0.5)
	// Plant one sample far along the first planted direction (T², leverage,
	// dominance) and one off the model plane (Q).
	for j := 0; j < 8; j++ {
		x.Set(10, j, 12*x.At(10, j))
	}
	x.Set(20, 3, x.At(20, 3)+50) // about 6 standard deviations of variable 4

	res, err := analysis.Analyze(intake.TableFromMatrix("t", x, nil, nil), analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}})
	if err != nil {
		t.Fatal(err)
	}
	in := Input{Run: res}
	for _, c := range []struct {
		check Check
		id    string
	}{{outliersT2, "11"}, {outliersQ, "21"}, {dominance, "11"}} {
		r := c.check.Run(in)
		if r.Status != Warn || !strings.Contains(r.Message, c.id) {
			t.Errorf("%s: %s %q; want warn naming sample %s", c.check.ID, r.Status, r.Message, c.id)
		}
	}
}

func TestLoadingStabilityCheck(t *testing.T) {
	x, _ := synth.LowRank(synth.RNG(6, 43), 300, 10, []float64{5, 2.5}, 0.5)
	res, err := analysis.Analyze(intake.TableFromMatrix("t", x, nil, nil), analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}, Bootstrap: 100, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	if r := loadingStability.Run(Input{Run: res}); r.Status != Pass {
		t.Errorf("well-separated components: %s %s", r.Status, r.Message)
	}
	// Two equally strong planted components mix within a stable plane: one
	// finding, raised by eigenvalue-separation alone; loading-stability
	// passes and refers to it.
	// The two factor columns are made orthogonal with equal norms in the
	// sample, so that the plane's sample eigenvalues are nearly equal too
	// and the axes inside it are arbitrary.
	rng := synth.RNG(7, 43)
	var qr mat.QR
	qr.Factorize(synth.Gaussian(rng, 200, 2))
	var f mat.Dense
	qr.QTo(&f)
	x = synth.Gaussian(rng, 200, 8)
	for i := 0; i < 200; i++ {
		for j := 0; j < 8; j++ {
			x.Set(i, j, 0.2*x.At(i, j)+40*f.At(i, j/4))
		}
	}
	res, err = analysis.Analyze(intake.TableFromMatrix("t", x, nil, nil), analysis.Options{Scaling: analysis.ScaleNone, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}, Bootstrap: 100, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	r := loadingStability.Run(Input{Run: res})
	if r.Status != Pass || !strings.Contains(r.Message, "rotate within the stable subspace (see eigenvalue-separation)") {
		t.Errorf("mixing pair, loading-stability: %s %s", r.Status, r.Message)
	}
	if r := eigenvalueSeparation.Run(Input{Run: res}); r.Status != Warn || !strings.Contains(r.Message, "PC1 and PC2") || !strings.Contains(r.Message, "rotate within a stable subspace") {
		t.Errorf("mixing pair, eigenvalue-separation: %s %s", r.Status, r.Message)
	}
	// A retained component that is noise: one planted component, two
	// retained, n = 40. The second axis belongs to no stable subspace in
	// the worst resamples (φ₅ far below 0.85), so the subspace check
	// warns, naming it.
	x, _ = synth.LowRank(synth.RNG(8, 43), 40, 10, []float64{3}, 1)
	res, err = analysis.Analyze(intake.TableFromMatrix("t", x, nil, nil), analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}, Bootstrap: 100, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	if r := loadingStability.Run(Input{Run: res}); r.Status != Warn || !strings.Contains(r.Message, "subspace itself changes") || !strings.Contains(r.Message, "(PC2)") {
		t.Errorf("noise component retained: %s %s", r.Status, r.Message)
	}
	// Pure noise, three retained: even the typical resample's subspace is
	// different (median φ < 0.85), so it fails.
	x = synth.Gaussian(synth.RNG(9, 43), 40, 10)
	res, err = analysis.Analyze(intake.TableFromMatrix("t", x, nil, nil), analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 3}, Bootstrap: 100, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	if r := loadingStability.Run(Input{Run: res}); r.Status != Fail || !strings.Contains(r.Message, "subspace itself changes") {
		t.Errorf("pure noise: %s %s", r.Status, r.Message)
	}
	res.Stability = analysis.Stability{}
	if r := loadingStability.Run(Input{Run: res}); r.Status != Skip {
		t.Errorf("no bootstrap: %s", r.Status)
	}
}
