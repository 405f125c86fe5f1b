package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/internal/synth"
)

// auditOf runs pcqc run on data into a folder of dir and returns it.
func auditOf(t *testing.T, dir, name, data string, extra ...string) string {
	t.Helper()
	out := filepath.Join(dir, name)
	args := append([]string{"run", data, "--out", out, "--format", "none", "--quiet"}, extra...)
	if status, _, stderr := runPCQC(t, args...); status != exitOK && status != exitChecks {
		t.Fatalf("pcqc run %s: status %d: %s", data, status, stderr)
	}
	return out
}

type compareSummaryJSON struct {
	Variables struct {
		Common []string `json:"common"`
		OnlyA  []string `json:"only_a"`
		OnlyB  []string `json:"only_b"`
	} `json:"variables"`
	Pairs []struct {
		A           string  `json:"component_a"`
		B           string  `json:"component_b"`
		Congruence  float64 `json:"congruence"`
		EigenDiff   float64 `json:"eigenvalue_difference"`
		PercentDiff float64 `json:"percent_difference"`
		IntervalsA  *struct {
			Low float64 `json:"eigenvalue_low"`
		} `json:"intervals_a"`
		Largest []struct {
			Variable string  `json:"variable"`
			Diff     float64 `json:"difference"`
		} `json:"largest_loading_differences"`
	} `json:"pairs"`
	Angles []float64 `json:"principal_angles_deg"`
	Checks []struct {
		ID     string `json:"id"`
		Status string `json:"status"`
	} `json:"checks"`
	Verdict string `json:"verdict"`
}

func readCompareSummary(t *testing.T, dir string) compareSummaryJSON {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var s compareSummaryJSON
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	return s
}

// TestCompareMatchesReference compares the audits of two halves of the
// wine data (B without "ash" and with its columns reversed) with values
// computed independently by testdata/compare/make_reference.py (numpy
// 1.24.2, scipy 1.10.1: linear_sum_assignment, subspace_angles).
func TestCompareMatchesReference(t *testing.T) {
	var ref struct {
		OnlyA      []string    `json:"only_a"`
		OnlyB      []string    `json:"only_b"`
		Congruence [][]float64 `json:"congruence"`
		Pairs      []struct {
			A, B                 int
			Congruence           float64
			EigenvalueDifference float64 `json:"eigenvalue_difference"`
			PercentDifference    float64 `json:"percent_difference"`
			LargestVariable      string  `json:"largest_variable"`
			LargestDifference    float64 `json:"largest_difference"`
		} `json:"pairs"`
		Angles []float64 `json:"principal_angles_deg"`
	}
	b, err := os.ReadFile("../../testdata/compare/reference.json")
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	flags := []string{"--group", "cultivar", "--components", "3", "--permutations", "0", "--bootstrap", "0"}
	a := auditOf(t, dir, "a", "../../testdata/compare/wine_a.csv", flags...)
	bb := auditOf(t, dir, "b", "../../testdata/compare/wine_b.csv", flags...)
	out := filepath.Join(dir, "cmp")
	status, _, stderr := runPCQC(t, "compare", a, bb, "--out", out, "--format", "none", "--fail-on", "never")
	if status != exitOK {
		t.Fatalf("compare: status %d: %s", status, stderr)
	}
	s := readCompareSummary(t, out)
	if fmt.Sprint(s.Variables.OnlyA) != fmt.Sprint(ref.OnlyA) || fmt.Sprint(s.Variables.OnlyB) != fmt.Sprint(ref.OnlyB) {
		t.Errorf("only in A %v, in B %v; numpy %v, %v", s.Variables.OnlyA, s.Variables.OnlyB, ref.OnlyA, ref.OnlyB)
	}
	const tol = 1e-9
	// Signs of components are arbitrary in both programs: compare |φ|.
	cong := readCSV(t, filepath.Join(out, "compare-congruence.csv"))
	for i, row := range ref.Congruence {
		for j, want := range row {
			got, err := strconv.ParseFloat(cong[i+1][j+1], 64)
			if err != nil || math.Abs(math.Abs(got)-math.Abs(want)) > tol {
				t.Errorf("|φ(A PC%d, B PC%d)| = %s, numpy %g", i+1, j+1, cong[i+1][j+1], math.Abs(want))
			}
		}
	}
	if len(s.Pairs) != len(ref.Pairs) {
		t.Fatalf("%d pairs, scipy %d", len(s.Pairs), len(ref.Pairs))
	}
	for k, want := range ref.Pairs {
		got := s.Pairs[k]
		if got.A != fmt.Sprintf("PC%d", want.A+1) || got.B != fmt.Sprintf("PC%d", want.B+1) {
			t.Errorf("pair %d: %s–%s, scipy PC%d–PC%d", k, got.A, got.B, want.A+1, want.B+1)
		}
		for _, c := range []struct {
			name      string
			got, want float64
		}{
			{"congruence", got.Congruence, want.Congruence},
			{"eigenvalue difference", got.EigenDiff, want.EigenvalueDifference},
			{"percentage difference", got.PercentDiff, want.PercentDifference},
			// The difference's sign follows A's arbitrary sign.
			{"largest loading difference", math.Abs(got.Largest[0].Diff), math.Abs(want.LargestDifference)},
		} {
			if math.Abs(c.got-c.want) > tol*math.Max(1, math.Abs(c.want)) {
				t.Errorf("pair %d %s: %.12g, numpy %.12g", k, c.name, c.got, c.want)
			}
		}
		if got.Largest[0].Variable != want.LargestVariable {
			t.Errorf("pair %d: largest difference in %s, numpy %s", k, got.Largest[0].Variable, want.LargestVariable)
		}
	}
	if len(s.Angles) != len(ref.Angles) {
		t.Fatalf("%d angles, scipy %d", len(s.Angles), len(ref.Angles))
	}
	for i, want := range ref.Angles {
		if math.Abs(s.Angles[i]-want) > 1e-7 {
			t.Errorf("angle %d: %.10g°, scipy %.10g°", i+1, s.Angles[i], want)
		}
	}
	if statusOf(s, "compare-variables") != "warn" {
		t.Errorf("compare-variables %s, want warn: ash is in A only", statusOf(s, "compare-variables"))
	}
}

func statusOf(s compareSummaryJSON, id string) string {
	for _, c := range s.Checks {
		if c.ID == id {
			return c.Status
		}
	}
	return ""
}

// writeMatrix writes x as a CSV table with columns v1…vp.
func writeMatrix(t *testing.T, path string, x *mat.Dense, rows func(i int) bool) {
	t.Helper()
	n, p := x.Dims()
	var b strings.Builder
	for j := 0; j < p; j++ {
		if j > 0 {
			b.WriteByte(',')
		}
		fmt.Fprintf(&b, "v%d", j+1)
	}
	b.WriteByte('\n')
	for i := 0; i < n; i++ {
		if !rows(i) {
			continue
		}
		for j := 0; j < p; j++ {
			if j > 0 {
				b.WriteByte(',')
			}
			b.WriteString(strconv.FormatFloat(x.At(i, j), 'g', -1, 64))
		}
		b.WriteByte('\n')
	}
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestCompareHalvesAndChangedStructure: an audit compared with itself
// gives congruence 1 and angle 0 (a fact of the trade); two halves of a
// clean table with planted structure pass; a table whose structure was
// planted along other axes warns, naming the components.
func TestCompareHalvesAndChangedStructure(t *testing.T) {
	dir := t.TempDir()
	sd := []float64{5, 3, 2}
	x, _ := synth.LowRank(synth.RNG(14, 1), 600, 8, sd, 1)
	other, _ := synth.LowRank(synth.RNG(14, 2), 300, 8, sd, 1)
	full := filepath.Join(dir, "full.csv")
	writeMatrix(t, full, x, func(int) bool { return true })
	writeMatrix(t, filepath.Join(dir, "odd.csv"), x, func(i int) bool { return i%2 == 1 })
	writeMatrix(t, filepath.Join(dir, "even.csv"), x, func(i int) bool { return i%2 == 0 })
	writeMatrix(t, filepath.Join(dir, "other.csv"), other, func(int) bool { return true })
	flags := []string{"--components", "3", "--permutations", "0", "--bootstrap", "200"}
	audits := map[string]string{}
	for _, name := range []string{"full", "odd", "even", "other"} {
		audits[name] = auditOf(t, dir, name+"-audit", filepath.Join(dir, name+".csv"), flags...)
	}
	cases := []struct {
		a, b       string
		wantStatus int
		wantWarn   []string
	}{
		{"full", "full", exitOK, nil},
		{"odd", "even", exitOK, nil},
		{"even", "other", exitChecks, []string{"compare-components", "compare-subspace"}},
	}
	for _, c := range cases {
		t.Run(c.a+"-"+c.b, func(t *testing.T) {
			out := filepath.Join(dir, c.a+"-vs-"+c.b)
			status, _, stderr := runPCQC(t, "compare", audits[c.a], audits[c.b], "--out", out, "--format", "none", "--fail-on", "warn")
			if status != c.wantStatus {
				t.Fatalf("status %d, want %d: %s", status, c.wantStatus, stderr)
			}
			s := readCompareSummary(t, out)
			for _, w := range c.wantWarn {
				if statusOf(s, w) != "warn" {
					t.Errorf("%s is %s, want warn", w, statusOf(s, w))
				}
			}
			if c.a != c.b {
				return
			}
			for _, p := range s.Pairs {
				if p.A != p.B || math.Abs(p.Congruence-1) > 1e-12 || p.EigenDiff != 0 || p.IntervalsA == nil {
					t.Errorf("self-comparison pair %+v: want PCk–PCk, congruence 1, no difference, intervals", p)
				}
			}
			for _, a := range s.Angles {
				if a != 0 {
					t.Errorf("self-comparison angles %v, want 0", s.Angles)
				}
			}
		})
	}
}

// TestCompareRefusesNonAudits: a folder that is not an audit, or a damaged
// one, is exit status 2 with one line naming the file, and nothing is
// written.
func TestCompareRefusesNonAudits(t *testing.T) {
	dir := t.TempDir()
	good := auditOf(t, dir, "good", "../../testdata/datasets/usarrests.csv", "--components", "1", "--permutations", "0", "--bootstrap", "0")
	summary, err := os.ReadFile(filepath.Join(good, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	model, err := os.ReadFile(filepath.Join(good, "model.json"))
	if err != nil {
		t.Fatal(err)
	}
	damage := func(name string, files map[string]string) string {
		d := filepath.Join(dir, name)
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
		for f, text := range files {
			if err := os.WriteFile(filepath.Join(d, f), []byte(text), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		return d
	}
	cases := []struct {
		name   string
		folder string
		want   []string
	}{
		{"missing folder", filepath.Join(dir, "nowhere"), []string{"nowhere", "no such audit folder"}},
		{"a file", filepath.Join(good, "summary.json"), []string{"summary.json", "not a folder"}},
		{"no model", damage("empty", map[string]string{"notes.txt": "x"}), []string{"empty", "not a pcqc audit folder"}},
		{"no summary", damage("nosummary", map[string]string{"model.json": string(model)}), []string{"nosummary", "summary.json"}},
		{"truncated summary", damage("truncated", map[string]string{"model.json": string(model), "summary.json": string(summary[:len(summary)/2])}),
			[]string{"truncated", "summary.json", "damaged audit summary"}},
		{"other tool", damage("othertool", map[string]string{"model.json": string(model), "summary.json": strings.Replace(string(summary), `"name": "pcqc"`, `"name": "other"`, 1)}),
			[]string{"othertool", "summary.json", "not written by pcqc"}},
		{"bad status", damage("badstatus", map[string]string{"model.json": string(model), "summary.json": strings.Replace(string(summary), `"status": "pass"`, `"status": "great"`, 1)}),
			[]string{"badstatus", "summary.json", `"great"`}},
		{"other run", damage("otherrun", map[string]string{"model.json": string(model), "summary.json": strings.Replace(string(summary), `"retained": 1`, `"retained": 2`, 1)}),
			[]string{"otherrun", "summary.json", "retains 2 components"}},
		{"damaged model", damage("badmodel", map[string]string{"model.json": "{\"format\": 1,", "summary.json": string(summary)}),
			[]string{"badmodel", "model.json", "damaged model"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out := filepath.Join(dir, "out-"+strings.ReplaceAll(c.name, " ", "-"))
			status, stdout, stderr := runPCQC(t, "compare", good, c.folder, "--out", out)
			if status != exitUsage {
				t.Fatalf("status %d, want 2; stderr %q", status, stderr)
			}
			if strings.Count(stderr, "\n") != 1 || stdout != "" {
				t.Errorf("want one line on stderr and nothing on stdout; got %q / %q", stderr, stdout)
			}
			for _, w := range c.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("stderr %q lacks %q", stderr, w)
				}
			}
			if _, err := os.Stat(out); err == nil {
				t.Errorf("output folder %s was written", out)
			}
		})
	}
}

// TestCompareReport renders the comparison of the wine halves: the report
// names what differs, cites its methods with full references, and writes
// every format.
func TestCompareReport(t *testing.T) {
	skipRenderingWhenShort(t)
	dir := t.TempDir()
	flags := []string{"--group", "cultivar", "--components", "3", "--permutations", "0", "--bootstrap", "0"}
	a := auditOf(t, dir, "a", "../../testdata/compare/wine_a.csv", flags...)
	b := auditOf(t, dir, "b", "../../testdata/compare/wine_b.csv", flags...)
	out := filepath.Join(dir, "cmp")
	if status, _, stderr := runPCQC(t, "compare", a, b, "--out", out, "--date", "2026-01-02"); status != exitOK {
		t.Fatalf("status %d: %s", status, stderr)
	}
	md, err := os.ReadFile(filepath.Join(out, "report.md"))
	if err != nil {
		t.Fatal(err)
	}
	bib, err := os.ReadFile(filepath.Join(out, "references.bib"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"**Only in A:** ash", "## Check statuses", "Kuhn, H. W. (1955)", "Björck, Å. & Golub, G. H. (1973)", "Tucker, L. R. (1951)", "Principal angles between the retained subspaces: 4.77°"} {
		if !strings.Contains(string(md), want) {
			t.Errorf("report.md lacks %q", want)
		}
	}
	if !strings.Contains(string(bib), "@article{kuhn1955") {
		t.Errorf("references.bib lacks kuhn1955")
	}
	for _, f := range []string{"report.pdf", "report.html"} {
		if st, err := os.Stat(filepath.Join(out, f)); err != nil || st.Size() == 0 {
			t.Errorf("%s missing or empty: %v", f, err)
		}
	}
}
