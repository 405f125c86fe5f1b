package intake

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// streamAll collects every row of one pass.
func streamAll(t *testing.T, s *Stream) (vals [][]float64, ids, groups []string, lines []int, missing int) {
	t.Helper()
	err := s.Pass(func(r StreamRow) error {
		if r.Missing {
			missing++
			return nil
		}
		vals = append(vals, append([]float64(nil), r.Values...))
		ids, groups, lines = append(ids, r.ID), append(groups, r.Group), append(lines, r.Line)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return
}

// Every pass hands on exactly the rows ReadTable keeps, with their ids,
// groups and lines, and the hash ReadTable computes; passes repeat.
func TestStreamRowsEqualReadTable(t *testing.T) {
	dir := t.TempDir()
	withGaps := filepath.Join(dir, "gaps.csv")
	if err := os.WriteFile(withGaps, []byte("id,a,b,c\nr1,1,2,3\nr2,,5,7\nr3,4,NA,1\nr4,2,2,9\nr5,8,1,2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	layout := filepath.Join(dir, "layout.csv")
	if err := os.WriteFile(layout, []byte("River survey\nid,a,b,c\n,mg/L,µS/cm,°C\n# field note\nr1,1,2,3\nr2,3,5,7\n# resampled\nr3,4,\"1,200\",1\nr4,2,2,9\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		path string
		opt  ReadOptions
	}{
		// A preamble, a units row, comments and digit groups: the stream
		// must read them as ReadTable does (it once took the units row for
		// data).
		{"layout", layout, ReadOptions{Skip: 1, UnitsRow: true, Comment: '#', Thousands: ','}},
		{"wine", filepath.Join("..", "..", "testdata", "datasets", "wine.csv"), ReadOptions{GroupColumn: "cultivar"}},
		{"wine log", filepath.Join("..", "..", "testdata", "datasets", "wine.csv"), ReadOptions{GroupColumn: "cultivar", Transform: TransformLog, Drop: []string{"alcalinity_of_ash"}}},
		{"usarrests", filepath.Join("..", "..", "testdata", "datasets", "usarrests.csv"), ReadOptions{}},
		{"drop", withGaps, ReadOptions{Missing: MissingDrop}},
		{"mean", withGaps, ReadOptions{Missing: MissingMean}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			tab, err := ReadTable(tc.path, tc.opt)
			if err != nil {
				t.Fatal(err)
			}
			s, err := OpenStream(tc.path, tc.opt)
			if err != nil {
				t.Fatal(err)
			}
			for pass := 1; pass <= 2; pass++ {
				vals, ids, groups, lines, missing := streamAll(t, s)
				if len(vals) != tab.Rows() || missing != tab.RowsDropped {
					t.Fatalf("pass %d: %d rows (%d missing), ReadTable %d (%d dropped)", pass, len(vals), missing, tab.Rows(), tab.RowsDropped)
				}
				if s.Info.SHA256 != tab.SHA256 || s.Info.RowsRead != tab.RowsRead || s.Info.MissingCells != tab.MissingCells {
					t.Errorf("pass %d: info %+v, table hash %s rows %d missing %d", pass, s.Info, tab.SHA256, tab.RowsRead, tab.MissingCells)
				}
				for i := range vals {
					if ids[i] != tab.IDs[i] || lines[i] != tab.Lines[i] || (tab.Groups != nil && groups[i] != tab.Groups[i]) {
						t.Fatalf("row %d: %s line %d, ReadTable %s line %d", i, ids[i], lines[i], tab.IDs[i], tab.Lines[i])
					}
					for k, name := range tab.Variables {
						col := indexOf(s.Info.Variables, name)
						if v := vals[i][col]; math.Abs(v-tab.X.At(i, k)) > 1e-15*math.Abs(v) {
							t.Fatalf("row %d %s = %g, ReadTable %g", i, name, v, tab.X.At(i, k))
						}
					}
				}
			}
		})
	}
}

func indexOf(names []string, name string) int {
	for i, n := range names {
		if n == name {
			return i
		}
	}
	return -1
}

// A bad cell stops a pass with ReadTable's message; what cannot be
// streamed is refused with one clear line.
func TestStreamRefusals(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	fifo := filepath.Join(dir, "pipe.csv")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name, path string
		opt        ReadOptions
		want       string
	}{
		{"text cell", write("text.csv", "a,b\n1,2\n3,4\n5,x\n6,7\n"), ReadOptions{}, ""},
		{"missing", write("miss.csv", "a,b\n1,2\n3,\n5,6\n6,7\n"), ReadOptions{}, ""},
		{"ragged", write("ragged.csv", "a,b\n1,2\n3,4,5\n5,6\n"), ReadOptions{}, ""},
		{"transform domain", write("log.csv", "a,b\n1,2\n3,-4\n5,6\n"), ReadOptions{Transform: TransformLog}, ""},
		{"unknown column", write("cols.csv", "a,b\n1,2\n3,4\n5,6\n"), ReadOptions{Drop: []string{"zz"}}, ""},
		{"iterative", write("it.csv", "a,b\n1,2\n3,4\n5,6\n"), ReadOptions{Missing: MissingIterative}, "--missing iterative"},
		{"fifo", fifo, ReadOptions{}, "regular file"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s, err := OpenStream(tc.path, tc.opt)
			if err == nil {
				err = s.Pass(func(StreamRow) error { return nil })
			}
			if err == nil {
				t.Fatal("no error")
			}
			if _, ok := err.(*InputError); !ok {
				t.Fatalf("%T, want *InputError", err)
			}
			if tc.want != "" {
				if !strings.Contains(err.Error(), tc.want) || strings.Contains(err.Error(), "\n") {
					t.Errorf("error %q, want one line naming %q", err, tc.want)
				}
				return
			}
			_, readErr := ReadTable(tc.path, tc.opt)
			if readErr == nil || readErr.Error() != err.Error() {
				t.Errorf("stream: %v\nReadTable: %v", err, readErr)
			}
		})
	}
}
