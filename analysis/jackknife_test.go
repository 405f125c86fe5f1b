package analysis

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// The leave-one-out eigenvalues equal those of preprocessing and
// decomposing the table without that row, directly, for tall and wide data
// and every scaling, including a variable constant without one row.
func TestJackknifeEigenvaluesAreExact(t *testing.T) {
	for _, sh := range []struct{ n, p int }{{60, 8}, {15, 40}} {
		for _, sc := range Scalings {
			name := fmt.Sprintf("%dx%d/%s", sh.n, sh.p, sc)
			rng := synth.RNG(5, 60)
			x, _ := synth.LowRank(rng, sh.n, sh.p, []float64{4, 2}, 0.5)
			synth.Stretch(rng, x)
			// The last variable is 0 except in row 9: constant without it.
			for i := 0; i < sh.n; i++ {
				x.Set(i, sh.p-1, 0)
			}
			x.Set(9, sh.p-1, 1)
			res, err := Analyze(intake.TableFromMatrix(name, x, nil, nil), Options{Scaling: sc, Components: ComponentRule{Kind: RuleFixed, Fixed: 2}})
			if err != nil {
				t.Fatal(err)
			}
			loo := LeaveOneOut(res.Z, res.Prep, res.RetainedLoadings(), res.Decomp.Eigenvalues, 2)
			eig, tot := loo.Eigenvalues, loo.Total
			if len(eig) != sh.n {
				t.Fatalf("%s: %d jackknife rows", name, len(eig))
			}
			for _, i := range []int{0, 9, sh.n - 1} {
				xi := mat.NewDense(sh.n-1, sh.p, nil)
				k := 0
				for r := 0; r < sh.n; r++ {
					if r != i {
						xi.SetRow(k, x.RawRowView(r))
						k++
					}
				}
				ev, _ := directPipeline(t, xi, res.Prep, sc, 2)
				sum := 0.0
				for _, v := range ev {
					sum += v
				}
				for a := range eig[i] {
					want := 0.0 // without a row, wide data have one eigenvalue fewer
					if a < len(ev) {
						want = ev[a]
					}
					if d := math.Abs(eig[i][a]-want) / ev[0]; d > 1e-9 {
						t.Errorf("%s without row %d: eigenvalue %d jackknife %.12g direct %.12g", name, i, a+1, eig[i][a], want)
					}
				}
				if d := math.Abs(tot[i]-sum) / sum; d > 1e-9 {
					t.Errorf("%s without row %d: total %.12g direct %.12g", name, i, tot[i], sum)
				}
			}
		}
	}
}
