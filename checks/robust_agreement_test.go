package checks

import (
	"strings"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// TestRobustAgreement: on clean low-rank tables the robust and classical
// subspaces agree (pass on at least 95 % of seeds); two gross outliers
// planted off the structure, far enough to turn the classical PC1 towards
// them, make the check warn and name both, most outlying first. Planted
// structure: one component (score sd 4, Gaussian loadings: variance about
// 16·8 = 128) in 8 variables, noise 1, n = 150; the outliers sit at 200 on
// variable 8 and 0 elsewhere, without scaling, where they alone give
// variable 8 a variance of 2·200²/149 ≈ 537, so the classical PC1 turns to
// them.
func TestRobustAgreement(t *testing.T) {
	seeds := 20
	if testing.Short() {
		seeds = 6
	}
	for _, planted := range []bool{false, true} {
		pass := 0
		for seed := 1; seed <= seeds; seed++ {
			x, _ := synth.LowRank(synth.RNG(uint64(seed), 5), 150, 8, []float64{4}, 1)
			if planted {
				for _, i := range []int{3, 77} {
					for j := 0; j < 8; j++ {
						x.Set(i, j, 0)
					}
					x.Set(i, 7, 200)
				}
			}
			res, err := analysis.Analyze(intake.TableFromMatrix("t.csv", x, nil, nil), analysis.Options{Scaling: analysis.ScaleNone, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 1}, NoCrossValidation: true, Bootstrap: 100, Seed: 1})
			if err != nil {
				t.Fatal(err)
			}
			r := robustAgreement.Run(Input{Run: res})
			if r.Status == Pass {
				pass++
			}
			if planted {
				ids := res.Table.IDs
				named := "the most outlying " + ids[3] + ", " + ids[77]
				if r.Status != Warn || !strings.Contains(r.Message, named) {
					t.Errorf("seed %d planted: %s, %s", seed, r.Status, r.Message)
				}
			}
		}
		if !planted && pass*100 < 95*seeds {
			t.Errorf("clean tables: passed on %d of %d seeds, want ≥ 95 %%", pass, seeds)
		}
	}
}

// TestRobustAgreementSkips: without the bootstrap there is no yardstick.
func TestRobustAgreementSkips(t *testing.T) {
	x, _ := synth.LowRank(synth.RNG(1, 5), 60, 5, []float64{3}, 1)
	res, err := analysis.Analyze(intake.TableFromMatrix("t.csv", x, nil, nil), analysis.Options{Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 1}, NoCrossValidation: true})
	if err != nil {
		t.Fatal(err)
	}
	if r := robustAgreement.Run(Input{Run: res}); r.Status != Skip {
		t.Errorf("without bootstrap: %s, want skip", r.Status)
	}
}
