package analysis

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pcqc/analysis/intake"
)

// TestExcludeMatchesTableWithoutRows: leaving samples out with --exclude
// gives the eigenvalues and loadings of the table written without those
// rows (1e-10), and the excluded samples' scores are their projection,
// computed here by hand from the kept rows' means and sample standard
// deviations (n−1) and the reduced table's loadings.
func TestExcludeMatchesTableWithoutRows(t *testing.T) {
	cases := []struct {
		file    string
		read    intake.ReadOptions
		exclude []string
	}{
		{"usarrests.csv", intake.ReadOptions{}, []string{"Alaska", "Florida", "Vermont"}},
		{"wine.csv", intake.ReadOptions{GroupColumn: "cultivar"}, []string{"1", "60", "122", "178"}},
		{"iris.csv", intake.ReadOptions{GroupColumn: "species"}, []string{"42"}},
	}
	for _, tc := range cases {
		t.Run(tc.file, func(t *testing.T) {
			path := filepath.Join("..", "testdata", "datasets", tc.file)
			full, err := intake.ReadTable(path, tc.read)
			if err != nil {
				t.Fatal(err)
			}
			var entries []intake.ExcludeEntry
			for _, id := range tc.exclude {
				entries = append(entries, intake.ExcludeEntry{ID: id})
			}
			rows, err := intake.ResolveExclusions(full, entries)
			if err != nil {
				t.Fatal(err)
			}
			opt := Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 2}, Permutations: 50}
			opt.Exclude = rows
			got, err := Analyze(full, opt)
			if err != nil {
				t.Fatal(err)
			}

			// The same file with the excluded data lines deleted.
			b, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			lines := strings.Split(string(b), "\n")
			drop := map[int]bool{}
			for _, i := range rows {
				drop[full.Lines[i]] = true
			}
			var kept []string
			for i, l := range lines {
				if !drop[i+1] {
					kept = append(kept, l)
				}
			}
			reduced := filepath.Join(t.TempDir(), tc.file)
			if err := os.WriteFile(reduced, []byte(strings.Join(kept, "\n")), 0o644); err != nil {
				t.Fatal(err)
			}
			rt, err := intake.ReadTable(reduced, tc.read)
			if err != nil {
				t.Fatal(err)
			}
			opt.Exclude = nil
			want, err := Analyze(rt, opt)
			if err != nil {
				t.Fatal(err)
			}
			if got.Table.Rows() != rt.Rows() || got.Excluded == nil || len(got.Excluded.IDs()) != len(tc.exclude) {
				t.Fatalf("fit on %d rows with %v excluded, want %d rows", got.Table.Rows(), got.Excluded.IDs(), rt.Rows())
			}
			for a, l := range want.Decomp.Eigenvalues {
				if d := math.Abs(got.Decomp.Eigenvalues[a] - l); d > 1e-10*math.Max(1, l) {
					t.Errorf("eigenvalue %d: %v, without the rows %v", a+1, got.Decomp.Eigenvalues[a], l)
				}
			}
			p := len(full.Variables)
			sign := make([]float64, 2)
			for a := 0; a < 2; a++ {
				dot := 0.0
				for j := 0; j < p; j++ {
					dot += got.Decomp.Loadings.At(j, a) * want.Decomp.Loadings.At(j, a)
				}
				sign[a] = math.Copysign(1, dot) // the sign of a component is a convention
				for j := 0; j < p; j++ {
					if d := math.Abs(got.Decomp.Loadings.At(j, a) - sign[a]*want.Decomp.Loadings.At(j, a)); d > 1e-10 {
						t.Errorf("loading %d,%d differs by %g", j+1, a+1, d)
					}
				}
			}

			// Projection by hand: means and sample standard deviations of
			// the kept rows of the raw table, then z·v.
			n := rt.Rows()
			for e, i := range rows {
				for a := 0; a < 2; a++ {
					score := 0.0
					for j := 0; j < p; j++ {
						mean, ss := 0.0, 0.0
						for r := 0; r < n; r++ {
							mean += rt.X.At(r, j)
						}
						mean /= float64(n)
						for r := 0; r < n; r++ {
							d := rt.X.At(r, j) - mean
							ss += d * d
						}
						z := (full.X.At(i, j) - mean) / math.Sqrt(ss/float64(n-1))
						score += z * want.Decomp.Loadings.At(j, a)
					}
					gotScore := got.Excluded.Application.Scores.At(e, a)
					if d := math.Abs(gotScore - sign[a]*score); d > 1e-10*math.Max(1, math.Abs(score)) {
						t.Errorf("excluded %s PC%d score %v, by hand %v", full.IDs[i], a+1, gotScore, sign[a]*score)
					}
				}
			}
		})
	}
}
