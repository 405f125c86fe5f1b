package intake

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

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
