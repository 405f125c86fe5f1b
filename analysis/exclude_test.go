package analysis

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestExcludeMatchesTableWithoutRows: leaving samples out with --exclude
// gives the eigenvalues and loadings of the table written without those
// rows (1e-10), and the excluded samples' scores are their projection,
// computed here by hand from the kept rows' means and sample standard
// deviations (n−1) and the reduced table's loadings.
func TestExcludeMatchesTableWithoutRows(t *testing.T) {
	cases := []struct {
		file    string
		read    ReadOptions
		exclude []string
	}{
		{"usarrests.csv", ReadOptions{}, []string{"Alaska", "Florida", "Vermont"}},
		{"wine.csv", ReadOptions{GroupColumn: "cultivar"}, []string{"1", "60", "122", "178"}},
		{"iris.csv", ReadOptions{GroupColumn: "species"}, []string{"42"}},
	}
	for _, tc := range cases {
		t.Run(tc.file, func(t *testing.T) {
			path := filepath.Join("..", "testdata", "datasets", tc.file)
			full, err := ReadTable(path, tc.read)
			if err != nil {
				t.Fatal(err)
			}
			var entries []ExcludeEntry
			for _, id := range tc.exclude {
				entries = append(entries, ExcludeEntry{ID: id})
			}
			rows, err := ResolveExclusions(full, entries)
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
			rt, err := ReadTable(reduced, tc.read)
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

func TestResolveExclusions(t *testing.T) {
	tab := read(t, "name,a,b\nx,1,2\ny,2,1\nz,3,5\nw,4,4\nx,5,7\n", ReadOptions{})
	cases := []struct {
		name    string
		entries []ExcludeEntry
		want    []int
		err     string // part of the error, "" for none
		line    int
	}{
		{"one id", []ExcludeEntry{{ID: "y"}}, []int{1}, "", 0},
		{"an id held twice excludes both rows", []ExcludeEntry{{ID: "x"}}, []int{0, 4}, "", 0},
		{"repeated entries count once", []ExcludeEntry{{ID: "z"}, {ID: "z"}}, []int{2}, "", 0},
		{"unknown ids listed", []ExcludeEntry{{ID: "q"}, {ID: "y"}, {ID: "r"}}, nil, `t.csv: --exclude names 2 sample ids not in the id column "name": "q", "r"`, 0},
		{"unknown id from a file", []ExcludeEntry{{ID: "y", File: "ex.txt", Line: 1}, {ID: "v", File: "ex.txt", Line: 3}}, nil, `ex.txt:3: the exclusion list names a sample id not in the id column "name" of t.csv: "v"`, 3},
		{"too few left", []ExcludeEntry{{ID: "x"}, {ID: "y"}}, nil, "leaves 2, and a PCA needs at least 3", 0},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ResolveExclusions(tab, tc.entries)
			if tc.err == "" {
				if err != nil || len(got) != len(tc.want) {
					t.Fatalf("got %v, %v; want %v", got, err, tc.want)
				}
				for i := range got {
					if got[i] != tc.want[i] {
						t.Fatalf("got %v, want %v", got, tc.want)
					}
				}
				return
			}
			var ie *InputError
			if !errors.As(err, &ie) || !strings.Contains(ie.Error(), tc.err) || ie.Line != tc.line {
				t.Fatalf("got %v, want an input error at line %d holding %q", err, tc.line, tc.err)
			}
		})
	}
}

func TestReadExcludeFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "ex.txt")
	text := "\xef\xbb\xbf# samples to leave out\n  a \n\nb#2\r\n   # indented comment\nc\n"
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	got, err := ReadExcludeFile(path)
	if err != nil {
		t.Fatal(err)
	}
	want := []ExcludeEntry{{"a", path, 2}, {"b#2", path, 4}, {"c", path, 6}}
	if len(got) != len(want) {
		t.Fatalf("got %v, want %v", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("entry %d: %v, want %v", i, got[i], want[i])
		}
	}
	if err := os.WriteFile(path, []byte("a\n\xff\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := ReadExcludeFile(path); err == nil || !strings.Contains(err.Error(), ":2: the exclusion list is not UTF-8") {
		t.Errorf("non-UTF-8 list: %v", err)
	}
}
