package analysis

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// writeCSV writes x with ids s1…sn to a file and returns its path.
func writeCSV(t *testing.T, x *mat.Dense) string {
	t.Helper()
	n, p := x.Dims()
	var b strings.Builder
	b.WriteString("id")
	for j := 0; j < p; j++ {
		fmt.Fprintf(&b, ",v%d", j+1)
	}
	b.WriteString("\n")
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "s%d", i+1)
		for j := 0; j < p; j++ {
			fmt.Fprintf(&b, ",%.17g", x.At(i, j))
		}
		b.WriteString("\n")
	}
	path := filepath.Join(t.TempDir(), "table.csv")
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// withGaps writes x with every 97th cell (in row-major order) missing.
func withGaps(t *testing.T, x *mat.Dense) string {
	path := writeCSV(t, x)
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(raw), "\n")
	cell := 0
	for i := 1; i < len(lines); i++ {
		fields := strings.Split(lines[i], ",")
		for j := 1; j < len(fields); j++ {
			if cell++; cell%97 == 0 {
				fields[j] = "NA"
			}
		}
		lines[i] = strings.Join(fields, ",")
	}
	if err := os.WriteFile(path, []byte(strings.Join(lines, "\n")), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func near(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol*math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
}

// The streamed audit equals the in-memory one to 1e-9 on the decomposition,
// the control limits and every sample's T², Q and leverage, on an open
// dataset and a generated table that fit both ways, for each scaling.
func TestStreamAnalyzeMatchesInMemory(t *testing.T) {
	gen, _ := synth.LowRank(synth.RNG(11, 1), 3000, 7, []float64{4, 2, 1}, 0.4)
	tables := []struct {
		name string
		path string
		read intake.ReadOptions
	}{
		{"wine", filepath.Join("..", "testdata", "datasets", "wine.csv"), intake.ReadOptions{GroupColumn: "cultivar"}}, // UCI wine via scikit-learn 1.2
		{"generated", writeCSV(t, gen), intake.ReadOptions{}},
		{"gaps dropped", withGaps(t, gen), intake.ReadOptions{Missing: intake.MissingDrop}},
		{"gaps filled", withGaps(t, gen), intake.ReadOptions{Missing: intake.MissingMean}},
	}
	for _, tb := range tables {
		for _, sc := range []Scaling{ScaleUnit, ScaleRange, ScaleNone} {
			t.Run(tb.name+"/"+string(sc), func(t *testing.T) {
				tab, err := intake.ReadTable(tb.path, tb.read)
				if err != nil {
					t.Fatal(err)
				}
				rule := ComponentRule{Kind: RuleFixed, Fixed: 3}
				want, err := Analyze(tab, Options{Scaling: sc, Components: rule, NoCrossValidation: true})
				if err != nil {
					t.Fatal(err)
				}
				var t2, q, lev []float64
				var ids []string
				got, err := StreamAnalyze(tb.path, tb.read, StreamOptions{Scaling: sc, Components: rule}, func(s StreamSample) error {
					t2, q, lev, ids = append(t2, s.T2), append(q, s.Q), append(lev, s.Lev), append(ids, s.ID)
					return nil
				}, nil)
				if err != nil {
					t.Fatal(err)
				}
				assertDecompositionsEqual(t, got.Decomp, want.Decomp, 1e-9)
				wl, gl := TrainingLimits(tab.Rows(), 3, want.Decomp.Eigenvalues), got.Limits
				for _, c := range [][3]any{{"T2_95", gl.T2_95, wl.T2_95}, {"T2_99", gl.T2_99, wl.T2_99}, {"Q95", gl.Q95, wl.Q95},
					{"Q99", gl.Q99, wl.Q99}, {"T2Family", gl.T2Family, wl.T2Family}, {"QFamily", gl.QFamily, wl.QFamily}, {"Leverage", gl.Leverage, wl.Leverage}} {
					if !near(c[1].(float64), c[2].(float64), 1e-9) {
						t.Errorf("%s = %.15g, in memory %.15g", c[0], c[1], c[2])
					}
				}
				if len(t2) != tab.Rows() {
					t.Fatalf("%d samples streamed, %d in memory", len(t2), tab.Rows())
				}
				scale := want.Decomp.TotalVariance()
				for i := range t2 {
					if ids[i] != tab.IDs[i] || !near(t2[i], want.Samples.T2[i], 1e-9) || math.Abs(q[i]-want.Samples.Q[i]) > 1e-9*scale || !near(lev[i], want.Samples.Leverage[i], 1e-9) {
						t.Fatalf("sample %s: T² %.12g Q %.12g h %.12g, in memory %s %.12g %.12g %.12g", ids[i], t2[i], q[i], lev[i], tab.IDs[i], want.Samples.T2[i], want.Samples.Q[i], want.Samples.Leverage[i])
					}
				}
				for a := 0; a < 3; a++ {
					if !near(got.Dominance[a], want.Samples.Dominance[a], 1e-9) || got.DominanceID[a] != tab.IDs[want.Samples.DominanceSample[a]] {
						t.Errorf("dominance PC%d = %g (%s), in memory %g (%s)", a+1, got.Dominance[a], got.DominanceID[a], want.Samples.Dominance[a], tab.IDs[want.Samples.DominanceSample[a]])
					}
				}
			})
		}
	}
}

// Parallel analysis on the reservoir: on a table that fits in it, it is the
// in-memory run exactly; on a subsample of a larger table it keeps the
// components the full permutations keep.
func TestStreamParallelAnalysisAgreesWithFullPermutations(t *testing.T) {
	if testing.Short() {
		t.Skip("permutations on 10,000 rows")
	}
	cases := []struct {
		name      string
		n         int
		sd        []float64
		reservoir int
	}{
		{"fits", 800, []float64{3, 1.5}, 0},
		{"subsample, strong", 10000, []float64{3, 2, 1}, 2000},
		{"subsample, one weak", 10000, []float64{2, 0.8}, 5000},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			x, _ := synth.LowRank(synth.RNG(5, uint64(tc.n)), tc.n, 8, tc.sd, 0.5)
			path := writeCSV(t, x)
			tab, err := intake.ReadTable(path, intake.ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			want, err := Analyze(tab, Options{Permutations: 500, Bootstrap: 0, NoCrossValidation: true})
			if err != nil {
				t.Fatal(err)
			}
			got, err := StreamAnalyze(path, intake.ReadOptions{}, StreamOptions{Permutations: 500, Reservoir: tc.reservoir}, func(StreamSample) error { return nil }, nil)
			if err != nil {
				t.Fatal(err)
			}
			gp, wp := got.Counts.Parallel, want.Counts.Parallel
			if gp.Count != wp.Count || gp.Count < 1 {
				t.Errorf("parallel analysis keeps %d on the reservoir, %d on all rows", gp.Count, wp.Count)
			}
			if tc.reservoir == 0 && (gp.Permutations != wp.Permutations || got.Subsampled) {
				t.Errorf("a table that fits: %d permutations (subsampled %v), in memory %d", gp.Permutations, got.Subsampled, wp.Permutations)
			}
			if got.Retained != want.Retained {
				t.Errorf("retained %d, in memory %d", got.Retained, want.Retained)
			}
		})
	}
}

// The Poisson bootstrap of the streamed audit agrees with the in-memory
// multinomial bootstrap within Monte Carlo error: per loading, the interval
// centres differ by less than a quarter of the interval width and the
// widths by less than 30 %; the median congruences by less than 0.01.
// With B = 300 the standard error of a 2.5 % percentile is about 10 % of
// the width (Efron & Tibshirani 1993, §19.3), so these bounds are 2–3 SE.
func TestStreamBootstrapAgreesWithInMemory(t *testing.T) {
	if testing.Short() {
		t.Skip("two bootstraps")
	}
	x, _ := synth.LowRank(synth.RNG(9, 3), 1500, 6, []float64{3, 1.5}, 0.6)
	path := writeCSV(t, x)
	tab, err := intake.ReadTable(path, intake.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	rule := ComponentRule{Kind: RuleFixed, Fixed: 2}
	want, err := Analyze(tab, Options{Components: rule, Bootstrap: 300, NoCrossValidation: true})
	if err != nil {
		t.Fatal(err)
	}
	got, err := StreamAnalyze(path, intake.ReadOptions{}, StreamOptions{Components: rule, Bootstrap: 300}, func(StreamSample) error { return nil }, nil)
	if err != nil {
		t.Fatal(err)
	}
	if got.Stability.Used != 300 {
		t.Fatalf("%d resamples used of 300 (%s)", got.Stability.Used, got.BootstrapNote)
	}
	for j := range want.Stability.Loadings {
		for a := 0; a < 2; a++ {
			g, w := got.Stability.Loadings[j][a], want.Stability.Loadings[j][a]
			gw, ww := g.High-g.Low, w.High-w.Low
			if math.Abs((g.High+g.Low)/2-(w.High+w.Low)/2) > ww/4 || math.Abs(gw-ww) > 0.3*ww {
				t.Errorf("loading [%d,PC%d]: Poisson [%.4f, %.4f], multinomial [%.4f, %.4f]", j+1, a+1, g.Low, g.High, w.Low, w.High)
			}
		}
	}
	for a := 0; a < 2; a++ {
		if g, w := got.Stability.Components[a].CongruenceMedian, want.Stability.Components[a].CongruenceMedian; math.Abs(g-w) > 0.01 {
			t.Errorf("PC%d median congruence %.4f, multinomial %.4f", a+1, g, w)
		}
	}
}
