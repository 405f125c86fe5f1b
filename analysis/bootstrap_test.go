package analysis

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// directResample preprocesses and decomposes the resampled rows explicitly —
// the definition the fast paths must reproduce. A variable constant in the
// resample keeps the divisor of the full data (ref), as documented in
// scaleFactor.
func directResample(t *testing.T, x *mat.Dense, counts []int32, scaling Scaling, k int) ([]float64, *mat.Dense) {
	t.Helper()
	n, p := x.Dims()
	xb := mat.NewDense(n, p, nil)
	r := 0
	for i, c := range counts {
		for ; c > 0; c-- {
			xb.SetRow(r, x.RawRowView(i))
			r++
		}
	}
	ref, err := FitPreprocessing(x, intake.TransformNone, scaling)
	if err != nil {
		t.Fatal(err)
	}
	return directPipeline(t, xb, ref, scaling, k)
}

// directPipeline preprocesses xb with its own means and scales, except that
// a variable constant in xb keeps the divisor of ref, and decomposes it.
func directPipeline(t *testing.T, xb *mat.Dense, ref Preprocessing, scaling Scaling, k int) ([]float64, *mat.Dense) {
	t.Helper()
	_, p := xb.Dims()
	pp, err := FitPreprocessing(xb, intake.TransformNone, scaling)
	if err != nil {
		t.Fatal(err)
	}
	for j := 0; j < p; j++ {
		if pp.SDs[j] <= 1e-12*ref.SDs[j] {
			pp.Scales[j] = ref.Scales[j]
		}
	}
	d, err := Decompose(pp.Apply(nil, xb))
	if err != nil {
		t.Fatal(err)
	}
	return d.Eigenvalues, mat.DenseCopyOf(d.Loadings.Slice(0, p, 0, k))
}

// Acceptance: each fast path equals direct recomputation to 1e-8, on tall,
// wide and square data, with every scaling.
func TestBootstrapFastPathsAreExact(t *testing.T) {
	// "rare" shapes add a variable that is 0 in all rows but two, so that
	// some resamples draw it constant (about (1 − 2/n)ⁿ of them: 12 % at
	// n = 40): those must match the direct definition too.
	shapes := []struct {
		name      string
		n, p      int
		rare      bool
		resamples int
	}{{"tall", 200, 12, false, 5}, {"wide", 25, 300, false, 5}, {"square", 40, 40, false, 5},
		{"tall-rare", 40, 8, true, 40}, {"wide-rare", 25, 60, true, 40}}
	for _, sh := range shapes {
		for _, sc := range Scalings {
			name := fmt.Sprintf("%s/%s", sh.name, sc)
			rng := synth.RNG(7, 50)
			// Well-separated leading components, so their loadings are well
			// determined in every resample.
			x, _ := synth.LowRank(rng, sh.n, sh.p, []float64{6, 3, 1.5}, 0.3)
			synth.Stretch(rng, x)
			if sh.rare {
				for i := 0; i < sh.n; i++ {
					x.Set(i, sh.p-1, 0)
				}
				x.Set(3, sh.p-1, 1)
				x.Set(17, sh.p-1, 1)
			}
			res, err := Analyze(intake.TableFromMatrix(name, x, nil, nil), Options{Scaling: sc, Components: ComponentRule{Kind: RuleFixed, Fixed: 3}})
			if err != nil {
				t.Fatal(err)
			}
			b := newBootstrapper(res)
			w := &bootWorkspace{}
			constant := 0
			for i := 0; i < sh.resamples; i++ {
				counts := drawCounts(taskRNG(3, streamBootstrap, i), sh.n)
				fast := b.resample(w, counts)
				if !fast.ok {
					t.Fatalf("%s: resample %d degenerate", name, i)
				}
				if fast.constant {
					constant++
				}
				ev, v := directResample(t, x, counts, sc, 3)
				for a := range fast.eigen {
					if d := math.Abs(fast.eigen[a]-ev[a]) / ev[0]; d > 1e-8 {
						t.Errorf("%s resample %d: eigenvalue %d fast %.12g direct %.12g", name, i, a+1, fast.eigen[a], ev[a])
					}
				}
				var fv *mat.Dense
				if fast.loadings != nil {
					fv = mat.NewDense(sh.p, 3, fast.loadings)
				} else {
					means, g, tmp := make([]float64, sh.p), make([]float64, sh.p), make([]float64, sh.p)
					weights := make([]float64, sh.n)
					for r, c := range counts {
						weights[r] = float64(c)
					}
					b.resampleScaling(counts, weights, 0, sh.p, means, g, tmp)
					fv = b.wideLoadings(means, g, fast.coef, 0, sh.p)
				}
				for a := 0; a < 3; a++ {
					sign := 1.0
					if mat.Dot(fv.ColView(a), v.ColView(a)) < 0 {
						sign = -1
					}
					for j := 0; j < sh.p; j++ {
						if d := math.Abs(fv.At(j, a) - sign*v.At(j, a)); d > 1e-8 {
							t.Fatalf("%s resample %d: loading [%d,%d] fast %.12g direct %.12g", name, i, j, a+1, fv.At(j, a), sign*v.At(j, a))
						}
					}
				}
			}
			// Without scaling no divisor depends on the resample, so
			// "constant" is never reported there.
			if sh.rare && sc != ScaleNone && constant == 0 {
				t.Errorf("%s: no resample drew the rare variable constant; the case is not exercised", name)
			}
		}
	}
}

func TestBootstrapIndependentOfThreads(t *testing.T) {
	for _, sh := range []struct{ n, p int }{{150, 10}, {20, 200}} {
		x, _ := synth.LowRank(synth.RNG(8, 51), sh.n, sh.p, []float64{4, 2}, 0.5)
		res, err := Analyze(intake.TableFromMatrix("t", x, nil, nil), Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 2}})
		if err != nil {
			t.Fatal(err)
		}
		a := Bootstrap(res, 60, 9, 1, nil)
		b := Bootstrap(res, 60, 9, 2, nil)
		if fmt.Sprintf("%v", a) != fmt.Sprintf("%v", b) {
			t.Errorf("%dx%d: bootstrap differs between 1 and 2 threads", sh.n, sh.p)
		}
		c := Bootstrap(res, 60, 10, 2, nil)
		if fmt.Sprintf("%v", a) == fmt.Sprintf("%v", c) {
			t.Errorf("%dx%d: a different seed gave the same bootstrap", sh.n, sh.p)
		}
	}
}

// Acceptance: on planted data with known loadings, the 95 % percentile
// intervals cover the true loadings at roughly the nominal rate, and
// well-separated components have a 5th-percentile congruence ≥ 0.95.
func TestBootstrapCoverageOnPlantedData(t *testing.T) {
	skipSimulationWhenShort(t)
	const n, p, k, reps = 300, 6, 2, 30
	// Covariance with orthonormal eigenvectors Q and eigenvalues 8, 3, then
	// 0.5 …: covariance PCA (no scaling) has the columns of Q as its true
	// loadings.
	spectrum := []float64{8, 3, 0.5, 0.4, 0.3, 0.2}
	cov, q := synth.SpectrumCovariance(synth.RNG(1, 52), spectrum)
	covered, total := 0, 0
	for rep := 0; rep < reps; rep++ {
		x := synth.WithCovariance(synth.RNG(uint64(rep+1), 53), n, cov)
		res, err := Analyze(intake.TableFromMatrix("t", x, nil, nil), Options{Scaling: ScaleNone, Components: ComponentRule{Kind: RuleFixed, Fixed: k}})
		if err != nil {
			t.Fatal(err)
		}
		st := Bootstrap(res, 200, uint64(rep+1), 0, nil)
		for a := 0; a < k; a++ {
			if st.Components[a].CongruenceP5 < 0.95 {
				t.Errorf("rep %d PC%d: congruence 5th percentile %.3f < 0.95", rep, a+1, st.Components[a].CongruenceP5)
			}
			// Orient the true loading like the estimate.
			sign := 1.0
			if mat.Dot(q.ColView(a), res.Decomp.Loadings.ColView(a)) < 0 {
				sign = -1
			}
			for j := 0; j < p; j++ {
				truth := sign * q.At(j, a)
				li := st.Loadings[j][a]
				if li.Low <= truth && truth <= li.High {
					covered++
				}
				total++
			}
		}
	}
	// Percentile intervals of eigenvectors are known to run slightly below
	// nominal at moderate n (Timmerman et al. 2007); accept 0.88–0.99.
	if rate := float64(covered) / float64(total); rate < 0.88 || rate > 0.99 {
		t.Errorf("coverage of the true loadings %.3f (%d of %d), nominal 0.95", rate, covered, total)
	}
}

// A planted pair of near-equal eigenvalues mixes under resampling: the
// sign-aligned congruence is low, but the Procrustes-aligned plane is stable.
func TestBootstrapDetectsMixingPair(t *testing.T) {
	rng := synth.RNG(2, 54)
	f := synth.Gaussian(rng, 200, 3)
	x := synth.Gaussian(rng, 200, 12)
	for i := 0; i < 200; i++ {
		for j := 0; j < 12; j++ {
			// Variables 0–3 follow factor 0, 4–7 factor 1, 8–11 factor 2,
			// factors 0 and 1 equally strong.
			sd := []float64{3, 3, 1.5}[j/4]
			x.Set(i, j, 0.4*x.At(i, j)+sd*f.At(i, j/4))
		}
	}
	res, err := Analyze(intake.TableFromMatrix("t", x, nil, nil), Options{Scaling: ScaleNone, Components: ComponentRule{Kind: RuleFixed, Fixed: 3}})
	if err != nil {
		t.Fatal(err)
	}
	st := Bootstrap(res, 200, 1, 0, nil)
	c := st.Components
	if c[0].CongruenceP5 > 0.85 || c[1].CongruenceP5 > 0.85 {
		t.Errorf("near-equal pair not unstable: φ5 %.3f %.3f", c[0].CongruenceP5, c[1].CongruenceP5)
	}
	if c[0].ProcrustesP5 < 0.95 || c[1].ProcrustesP5 < 0.95 {
		t.Errorf("the plane of the pair should be stable: Procrustes φ5 %.3f %.3f", c[0].ProcrustesP5, c[1].ProcrustesP5)
	}
	if c[2].CongruenceP5 < 0.95 {
		t.Errorf("the separate third component should be stable: φ5 %.3f", c[2].CongruenceP5)
	}
}

// Acceptance (issue 12): on a 40-row table with a variable of few distinct
// values, resamples in which it is constant are kept, so the summary rests
// on all B resamples.
func TestBootstrapKeepsConstantVariableResamples(t *testing.T) {
	const n, p, B = 40, 6, 500
	x, _ := synth.LowRank(synth.RNG(4, 56), n, p, []float64{3, 1.5}, 0.5)
	for i := 0; i < n; i++ {
		v := 0.0
		if i%13 == 0 { // rows 0, 13, 26, 39: a 0/1 variable with four ones
			v = 1
		}
		x.Set(i, p-1, v)
	}
	for _, sc := range []Scaling{ScaleUnit, ScalePareto, ScaleRange} {
		res, err := Analyze(intake.TableFromMatrix("t", x, nil, nil), Options{Scaling: sc, Components: ComponentRule{Kind: RuleFixed, Fixed: 2}, Bootstrap: B})
		if err != nil {
			t.Fatal(err)
		}
		st := res.Stability
		if st.Used != B || st.Degenerate != 0 {
			t.Errorf("%s: used %d degenerate %d of %d", sc, st.Used, st.Degenerate, B)
		}
		// P(no 1 drawn) = (36/40)^40 ≈ 1.5 %: expect about 7 of 500.
		if st.ConstantResamples < 1 || st.ConstantResamples > 25 {
			t.Errorf("%s: %d resamples with a constant variable, expected about 7", sc, st.ConstantResamples)
		}
		if len(st.Congruence[0]) != B {
			t.Errorf("%s: congruence over %d resamples, want %d", sc, len(st.Congruence[0]), B)
		}
		for a, iv := range st.Eigenvalues {
			if math.IsNaN(iv.Low) || math.IsNaN(iv.High) || iv.Low > iv.High {
				t.Errorf("%s: eigenvalue %d interval %v", sc, a+1, iv)
			}
		}
	}
}

func TestBootstrapOff(t *testing.T) {
	x, _ := synth.LowRank(synth.RNG(2, 55), 50, 5, []float64{2}, 1)
	res, err := Analyze(intake.TableFromMatrix("t", x, nil, nil), Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 1}})
	if err != nil {
		t.Fatal(err)
	}
	if res.Stability.Resamples != 0 || res.Stability.Components != nil {
		t.Errorf("bootstrap ran with 0 resamples: %+v", res.Stability)
	}
}
