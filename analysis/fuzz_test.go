package analysis

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"testing"
	"unicode/utf8"
)

// addSeeds adds every file of the given folders as a seed.
func addSeeds(f *testing.F, globs ...string) {
	for _, g := range globs {
		files, _ := filepath.Glob(g)
		for _, name := range files {
			if filepath.Ext(name) == ".want" || filepath.Base(name) == "README.md" {
				continue
			}
			if b, err := os.ReadFile(name); err == nil && len(b) < 1<<20 {
				f.Add(b)
			}
		}
	}
}

// lineCount is the most lines b can have (a last line without its line end
// counts): LF and CRLF end a line, and so does a lone CR in a file read
// with CR line ends.
func lineCount(b []byte) int {
	n := bytes.Count(b, []byte{'\n'}) + 1
	for i, c := range b {
		if c == '\r' && (i+1 == len(b) || b[i+1] != '\n') {
			n++
		}
	}
	return n
}

// checkInputError requires err to be an InputError naming the file, a line
// within the input (or none), and a reason.
func checkInputError(t *testing.T, err error, input []byte) {
	t.Helper()
	var ie *InputError
	if !errors.As(err, &ie) {
		t.Fatalf("error %v (%T) is not an InputError", err, err)
	}
	if ie.File == "" || ie.Reason == "" {
		t.Fatalf("error without file or reason: %#v", ie)
	}
	if ie.Line < 0 || ie.Line > lineCount(input) {
		t.Fatalf("error names line %d of a %d-line input: %v", ie.Line, lineCount(input), err)
	}
	// The message reaches a terminal: it must be UTF-8 without controls.
	msg := ie.Error()
	if !utf8.ValidString(msg) {
		t.Fatalf("error is not UTF-8: %q", msg)
	}
	for _, r := range msg {
		if r != utf8.RuneError && mustEscape(r) {
			t.Fatalf("error holds control character %U: %q", r, msg)
		}
	}
}

// FuzzReadTable: the data-table reader never panics or hangs; it returns a
// consistent table of finite numbers or an InputError that names the file
// and, when it has one, a line of the input.
func FuzzReadTable(f *testing.F) {
	addSeeds(f, "../testdata/fuzz/table/*", "../testdata/bad/*", "../testdata/datasets/*.csv")
	f.Fuzz(func(t *testing.T, data []byte) {
		for _, opt := range []ReadOptions{{}, {Missing: MissingMean, Decimal: ','}, {Missing: MissingDrop, Transform: TransformLog1p},
			{Encoding: EncodingLatin1, Delimiter: ';'}, {Encoding: EncodingCP1252, Missing: MissingMean}} {
			tab, err := ReadTableFrom("fuzz.csv", bytes.NewReader(data), opt)
			if err != nil {
				checkInputError(t, err, data)
				continue
			}
			n, p := tab.X.Dims()
			if n < 3 || p < 2 || len(tab.IDs) != n || len(tab.Lines) != n || len(tab.Variables) != p {
				t.Fatalf("inconsistent table: %d×%d, %d ids, %d lines, %d names", n, p, len(tab.IDs), len(tab.Lines), len(tab.Variables))
			}
			if tab.Groups != nil && len(tab.Groups) != n {
				t.Fatalf("%d groups for %d rows", len(tab.Groups), n)
			}
			for _, v := range tab.X.RawMatrix().Data {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("non-finite value %v in a table that was accepted", v)
				}
			}
			for _, l := range tab.Lines {
				if l < 2 || l > lineCount(data) {
					t.Fatalf("row on line %d of a %d-line input", l, lineCount(data))
				}
			}
		}
	})
}

// FuzzReadReviewTables: the reader of other people's tables never panics;
// it returns tables that fit the data or an InputError.
func FuzzReadReviewTables(f *testing.F) {
	addSeeds(f, "../testdata/fuzz/review/*", "../testdata/fuzz/table/*")
	variables := []string{"Murder", "Assault", "UrbanPop", "Rape"}
	ids := []string{"Alabama", "Alaska", "Arizona", "Arkansas"}
	f.Fuzz(func(t *testing.T, data []byte) {
		if _, err := ReadLooseTableFrom("their.csv", bytes.NewReader(data), EncodingCP1252); err != nil {
			checkInputError(t, err, data)
		}
		lt, err := ReadLooseTableFrom("their.csv", bytes.NewReader(data))
		if err != nil {
			checkInputError(t, err, data)
			return
		}
		for _, r := range lt.Rows {
			if len(r) != len(lt.Header) {
				t.Fatalf("row of %d fields under a header of %d", len(r), len(lt.Header))
			}
		}
		if l, err := ParseLoadings(lt, variables); err != nil {
			checkInputError(t, err, data)
		} else {
			p, k := l.V.Dims()
			if p != len(l.Variables) || k != len(l.Components) || k >= p || p > len(variables) {
				t.Fatalf("loadings %d×%d for %d variables and %d components", p, k, len(l.Variables), len(l.Components))
			}
		}
		if s, err := ParseScores(lt, ids, 2); err != nil {
			checkInputError(t, err, data)
		} else if n, _ := s.T.Dims(); n != len(ids) {
			t.Fatalf("scores for %d samples, want %d", n, len(ids))
		}
		if v, _, err := ParseVarianceValues(lt); err != nil {
			checkInputError(t, err, data)
		} else if len(v) == 0 {
			t.Fatal("no variance values and no error")
		}
	})
}
