package analysis

import (
	"os"
	"testing"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// Decomposition alone (preprocessing excluded), for the sizes in the
// foundation issue: tall 20,000 × 50 and wide 100 × 20,000.
func benchmarkDecompose(b *testing.B, n, p int) {
	x, _ := synth.LowRank(synth.RNG(1, 1), n, p, []float64{3, 2, 1.5}, 1)
	pp, err := FitPreprocessing(x, intake.TransformNone, ScaleUnit)
	if err != nil {
		b.Fatal(err)
	}
	z := pp.Apply(nil, x)
	b.ResetTimer()
	for b.Loop() {
		if _, err := Decompose(z); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkDecomposeTall20000x50(b *testing.B)  { benchmarkDecompose(b, 20000, 50) }
func BenchmarkDecomposeWide100x20000(b *testing.B) { benchmarkDecompose(b, 100, 20000) }

// The whole analysis (decomposition, parallel analysis, bootstrap, checks'
// inputs) for the benchmark workloads of the bootstrap issue: tall
// 10,000 × 50 and wide 100 × 5,000, k = 3, B = 200, P = 50. bench/compare.sh
// times the whole process against the numpy reference.
func benchmarkAudit(b *testing.B, n, p int) {
	x, _ := synth.LowRank(synth.RNG(1, 1), n, p, []float64{3, 2, 1.5}, 1)
	tab := intake.TableFromMatrix("bench", x, nil, nil)
	opt := Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 3}, Permutations: 50, Bootstrap: 200, Seed: 1}
	b.ResetTimer()
	for b.Loop() {
		if _, err := Analyze(tab, opt); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkAuditTall10000x50(b *testing.B) { benchmarkAudit(b, 10000, 50) }
func BenchmarkAuditWide100x5000(b *testing.B) { benchmarkAudit(b, 100, 5000) }

// BenchmarkReadTableFile reads the CSV named by PCQC_BENCH_CSV (see
// bench/large.sh) and reports its throughput; it is skipped without one.
func BenchmarkReadTableFile(b *testing.B) {
	path := os.Getenv("PCQC_BENCH_CSV")
	if path == "" {
		b.Skip("set PCQC_BENCH_CSV to a CSV file")
	}
	st, err := os.Stat(path)
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(st.Size())
	for b.Loop() {
		if _, err := intake.ReadTable(path, intake.ReadOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}
