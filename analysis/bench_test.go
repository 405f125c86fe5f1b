package analysis

import (
	"strconv"

	"gonum.org/v1/gonum/mat"
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

// benchmarkReferenceWorkload runs, through pcqc's own functions, the
// workload that ../shared/bench/ref_numpy.py times: autoscaling, the
// decomposition, T² and Q of every sample, boot bootstrap resamples of the
// whole preprocessing (pcqc's also take percentile intervals, congruences
// and subspace angles) and perm column permutations for parallel analysis.
// Like ref_numpy's seconds=, it leaves out reading the CSV. It is the
// side-by-side figure for issue 16's target; the whole audit (bench/
// compare.sh) does much more: leave-one-out influence, cross-validation,
// the robust fit, the tail limits and the checks' inputs.
func benchmarkReferenceWorkload(b *testing.B, x *mat.Dense, boot, perm int) {
	tab := intake.TableFromMatrix("bench", x, nil, nil)
	b.ResetTimer()
	for b.Loop() {
		pp, err := FitPreprocessing(tab.X, intake.TransformNone, ScaleUnit)
		if err != nil {
			b.Fatal(err)
		}
		z := pp.Apply(nil, tab.X)
		d, err := Decompose(z)
		if err != nil {
			b.Fatal(err)
		}
		r := &Result{Table: tab, Prep: pp, Z: z, Decomp: d, Retained: 3}
		r.Scores = d.Scores(z, 3)
		r.Samples = ComputeSampleStats(z, r.RetainedLoadings(), r.Scores, d.Eigenvalues)
		if st := Bootstrap(r, boot, 1, 0, nil); st.Used != boot {
			b.Fatalf("%d of %d resamples used", st.Used, boot)
		}
		if pa := ParallelAnalysis(z, d.Eigenvalues, perm, 1, 0, nil); pa.Permutations != perm {
			b.Fatalf("%d permutations, want %d", pa.Permutations, perm)
		}
	}
}

// BenchmarkReferenceWorkload reads the CSV that ref_numpy.py gen wrote,
// named by PCQC_REF_CSV, with PCQC_REF_B resamples and PCQC_REF_P
// permutations (bench/compare.sh sets all three); it is skipped without it.
func BenchmarkReferenceWorkload(b *testing.B) {
	path := os.Getenv("PCQC_REF_CSV")
	if path == "" {
		b.Skip("set PCQC_REF_CSV (bench/compare.sh does)")
	}
	tab, err := intake.ReadTable(path, intake.ReadOptions{})
	if err != nil {
		b.Fatal(err)
	}
	boot, err1 := strconv.Atoi(os.Getenv("PCQC_REF_B"))
	perm, err2 := strconv.Atoi(os.Getenv("PCQC_REF_P"))
	if err1 != nil || err2 != nil {
		b.Fatal("set PCQC_REF_B and PCQC_REF_P")
	}
	benchmarkReferenceWorkload(b, tab.X, boot, perm)
}

// The two shapes of the issue, on planted tables like ref_numpy's.
func BenchmarkReferenceWorkloadTall10000x50(b *testing.B) {
	x, _ := synth.LowRank(synth.RNG(1, 1), 10000, 50, []float64{3, 2, 1.5}, 1)
	benchmarkReferenceWorkload(b, x, 200, 50)
}

func BenchmarkReferenceWorkloadWide100x5000(b *testing.B) {
	x, _ := synth.LowRank(synth.RNG(1, 1), 100, 5000, []float64{3, 2, 1.5}, 1)
	benchmarkReferenceWorkload(b, x, 200, 50)
}
