package analysis

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"pcqc/analysis/intake"
	"pcqc/internal/safetext"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
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
	var ie *intake.InputError
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
		if r != utf8.RuneError && safetext.NeedsEscape(r) {
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
		for _, opt := range []intake.ReadOptions{{}, {Missing: intake.MissingMean, Decimal: ','}, {Missing: intake.MissingDrop, Transform: intake.TransformLog1p},
			{Encoding: intake.EncodingLatin1, Delimiter: ';'}, {Encoding: intake.EncodingCP1252, Missing: intake.MissingMean}} {
			tab, err := intake.ReadTableFrom("fuzz.csv", bytes.NewReader(data), opt)
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
		if _, err := intake.ReadLooseTableFrom("their.csv", bytes.NewReader(data), intake.EncodingCP1252); err != nil {
			checkInputError(t, err, data)
		}
		lt, err := intake.ReadLooseTableFrom("their.csv", bytes.NewReader(data))
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
		if v, err := ParseVariance(lt); err != nil {
			checkInputError(t, err, data)
		} else if len(v.Values) == 0 {
			t.Fatal("no variance values and no error")
		}
	})
}

// FuzzLoadModel: the model loader never panics. It refuses what it cannot
// use with an InputError whose reason starts "damaged model: " (or names a
// newer format); what it accepts is consistent, and Apply scores a small
// table of the model's variables with it, without a NaN and with finite T²
// and Q wherever the model's numbers allow them to be finite.
func FuzzLoadModel(f *testing.F) {
	addSeeds(f, "../testdata/fuzz/FuzzLoadModel/*", "../testdata/bad/*.json")
	f.Fuzz(func(t *testing.T, data []byte) {
		m, err := decodeModel("model.json", data)
		if err != nil {
			checkInputError(t, err, data)
			var ie *intake.InputError
			errors.As(err, &ie)
			if !strings.HasPrefix(ie.Reason, "damaged model: ") && !strings.Contains(ie.Reason, "newer than the format") {
				t.Fatalf("refused without saying the model is damaged: %v", err)
			}
			return
		}
		p, k, n := len(m.Variables), m.Retained, m.Input.Rows
		if p < 2 || len(m.Means) != p || len(m.Scales) != p || len(m.SDs) != p || len(m.Loadings) != p ||
			k < 1 || k > len(m.Eigenvalues) || len(m.Eigenvalues) > min(p, n-1) {
			t.Fatalf("inconsistent model accepted: %d variables, %d retained, %d eigenvalues, %d samples", p, k, len(m.Eigenvalues), n)
		}
		if e := OrthonormalityError(m.LoadingsMatrix()); !(e <= orthonormalTol) {
			t.Fatalf("loadings with max |VᵀV − I| = %g accepted", e)
		}
		// New samples at the training means and a few scales from them.
		steps := []float64{0, 1, -2, 3.5}
		x := mat.NewDense(len(steps), p, nil)
		for i, u := range steps {
			for j := 0; j < p; j++ {
				x.Set(i, j, m.Means[j]+u*float64(j%3+1)*m.Scales[j])
			}
		}
		app := Apply(m, intake.TableFromMatrix("new.csv", x, slices.Clone(m.Variables), nil))
		if len(app.Missing) > 0 || len(app.T2) != len(steps) || len(app.Q) != len(steps) {
			t.Fatalf("apply on the model's own variables: missing %v, %d T², %d Q", app.Missing, len(app.T2), len(app.Q))
		}
		invLambda := 0.0
		for a := 0; a < k; a++ {
			invLambda += 1 / m.Eigenvalues[a]
		}
		for i := range steps {
			zz, finite := 0.0, true
			for j := 0; j < p; j++ {
				z := (x.At(i, j) - m.Means[j]) / m.Scales[j]
				finite = finite && isFinite(x.At(i, j)) && isFinite(z) && math.Abs(z) <= 1e6
				zz += z * z
			}
			if !finite {
				continue
			}
			if math.IsNaN(app.T2[i]) || math.IsNaN(app.Q[i]) || app.T2[i] < 0 || app.Q[i] < 0 {
				t.Fatalf("sample %d: T² %v, Q %v", i, app.T2[i], app.Q[i])
			}
			// |t_a| ≤ ‖z‖‖v_a‖ with ‖v_a‖ ≈ 1, so T² ≤ ‖z‖² Σ 1/λ_a; Q ≤ (2‖z‖)².
			if isFinite(4*zz*invLambda) && (!isFinite(app.T2[i]) || !isFinite(app.Q[i]) || !isFinite(app.Leverage[i])) {
				t.Fatalf("sample %d with ‖z‖² = %g: T² %v, Q %v, leverage %v", i, zz, app.T2[i], app.Q[i], app.Leverage[i])
			}
		}
	})
}

// reviewSeeds adds the seed sets of FuzzReviewFiles: every NAME.loadings.*
// with the NAME.scores.* and NAME.variance.* beside it (empty when absent).
func reviewSeeds(f *testing.F, dir string) {
	files, _ := filepath.Glob(filepath.Join(dir, "*.loadings.*"))
	for _, l := range files {
		name := strings.SplitN(filepath.Base(l), ".loadings.", 2)[0]
		read := func(role string) []byte {
			m, _ := filepath.Glob(filepath.Join(dir, name+"."+role+".*"))
			if len(m) == 0 {
				return nil
			}
			b, _ := os.ReadFile(m[0])
			return b
		}
		f.Add(read("loadings"), read("scores"), read("variance"))
	}
}

// FuzzReviewFiles: review never panics on another person's loadings, scores
// and variances. Every refusal is an InputError; what is accepted is
// compared with a fixed table (the first 12 states of USArrests, small so
// that the eight recomputations stay fast) into finite measurements.
func FuzzReviewFiles(f *testing.F) {
	reviewSeeds(f, "../testdata/fuzz/FuzzReviewFiles")
	b, err := os.ReadFile("../testdata/datasets/usarrests.csv")
	if err != nil {
		f.Fatal(err)
	}
	lines := bytes.SplitAfter(b, []byte{'\n'})
	tab, err := intake.ReadTableFrom("usarrests.csv", bytes.NewReader(bytes.Join(lines[:13], nil)), intake.ReadOptions{})
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, loadings, scores, variance []byte) {
		read := func(name string, b []byte) *intake.LooseTable {
			lt, err := intake.ReadLooseTableFrom(name, bytes.NewReader(b))
			if err != nil {
				checkInputError(t, err, b)
				return nil
			}
			return lt
		}
		lt := read("loadings.csv", loadings)
		if lt == nil {
			return
		}
		l, err := ParseLoadings(lt, tab.Variables)
		if err != nil {
			checkInputError(t, err, loadings)
			return
		}
		sub := tab.Subset(l.Variables)
		_, k := l.V.Dims()
		var s *TheirScores
		if st := read("scores.csv", scores); st != nil {
			if s, err = ParseScores(st, sub.IDs, k); err != nil {
				checkInputError(t, err, scores)
				s = nil
			}
		}
		var v *TheirVariance
		if vt := read("variance.csv", variance); vt != nil {
			if v, err = ParseVariance(vt); err != nil {
				checkInputError(t, err, variance)
				v = nil
			}
		}
		rv, err := CompareReview(sub, l, s, v, "")
		if err != nil {
			checkInputError(t, err, loadings)
			return
		}
		finite := func(what string, xs ...float64) {
			for _, x := range xs {
				if !isFinite(x) {
					t.Fatalf("%s: %v", what, xs)
				}
			}
		}
		finite("orthonormality", rv.Orthonormality)
		finite("column norms", rv.ColumnNorms...)
		finite("component variance", rv.ComponentVariance...)
		finite("congruence", rv.Congruence...)
		for _, v := range rv.Variants {
			finite("angles of "+v.Name(), v.Angles...)
			finite("score residual of "+v.Name(), v.ScoreResidual)
		}
		finite("score residuals", rv.ScoreResiduals...)
		finite("variance", rv.VariancePercent...)
		finite("variance difference", rv.VarianceDiff...)
		if rv.Loadings.Decimals < 0 || rv.Loadings.Decimals > intake.MaxDecimals {
			t.Fatalf("%d decimals", rv.Loadings.Decimals)
		}
	})
}
