package report

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/yuin/goldmark/ast"

	"pcqc/checks"
)

// The measured-value and limit columns write a probability as the
// messages do: never 0, and a confidence near 1 as 1 − ε.
func TestFormatMeasureProbabilities(t *testing.T) {
	cases := []struct {
		name string
		v    any
		want string
	}{
		// A p-value that underflowed to 0 (scipy 1.10.1: chi2.sf(2860, 78)
		// is 0.0 in double precision) reads as the message's floor.
		{"p underflowed to 0", checks.Probability(0), "< 1e-16"},
		{"p below the floor", checks.Probability(3e-300), "< 1e-16"},
		{"p just above the floor", checks.Probability(2.5e-16), "2.5e-16"},
		{"p ordinary", checks.Probability(0.0123), "0.012"},
		{"p large", checks.Probability(0.66), "0.66"},
		// A measurement of 0 that is not a probability stays 0.
		{"count 0", 0, "0"},
		{"float 0", 0.0, "0"},
		{"absent", nil, "–"},
		{"Šidák confidence, 240 samples", map[string]float64{"family_confidence": 0.9999581244774146, "limit_family": 24.657},
			"family-wise: 24.66; per-sample confidence: 1 − 4.19e-05"},
		{"judged limit first, unknown keys last", map[string]float64{"zeta_extra": 2, "limit_95": 7.861, "limit_99": 11.29, "limit_family": 21.47, "binomial_alpha": 0.001},
			"family-wise: 21.47; 95 %: 7.861; 99 %: 11.29; count test α: 0.001; zeta extra: 2"},
	}
	for _, c := range cases {
		if got := formatMeasure(c.v); got != c.want {
			t.Errorf("%s: formatMeasure(%v) = %q, want %q", c.name, c.v, got, c.want)
		}
	}
	// The same floor and precision as the messages' "p < 1e-16", "p = 0.012".
	for _, p := range []float64{0, 1e-20, 0.0123, 0.5} {
		msg := map[bool]string{true: "p " + checks.FormatP(p), false: "p = " + checks.FormatP(p)}[p < checks.PFloor]
		if got := formatMeasure(checks.Probability(p)); !strings.HasSuffix(msg, got) {
			t.Errorf("p = %g: table shows %q, message %q", p, got, msg)
		}
	}
}

// The demo's Bartlett test has χ² = 2860 on 78 degrees of freedom, so its
// p underflows to 0; the table must show "< 1e-16", as the message does.
func TestNoZeroPValueInCheckTable(t *testing.T) {
	res, results := demoAudit(t, 0)
	_, rows := verdictBlock(results)
	seen := 0
	for i, r := range results {
		p, ok := r.Value.(checks.Probability)
		if !ok {
			continue
		}
		seen++
		if rows[i].Measured == "0" || rows[i].Measured != checks.FormatP(float64(p)) {
			t.Errorf("%s: measured %q for p = %g", r.ID, rows[i].Measured, float64(p))
		}
		if !strings.Contains(r.Message, "p "+rows[i].Measured) && !strings.Contains(r.Message, "p = "+rows[i].Measured) {
			t.Errorf("%s: table shows %q, message says %q", r.ID, rows[i].Measured, r.Message)
		}
	}
	if b := res.Adequacy.Bartlett; seen == 0 || b.P >= checks.PFloor {
		t.Fatalf("the demo should give a Bartlett p below the floor (%d probabilities, p = %g)", seen, b.P)
	}
}

// row is a check row with a status and a title.
func row(status checks.Status, title string) CheckRow {
	return CheckRow{ID: strings.ToLower(strings.ReplaceAll(title, " ", "-")), Title: title, Word: string(status), Symbol: status.Symbol()}
}

// verdictOf mirrors verdictBlock's headline fields for hand-made rows.
func verdictOf(rows []CheckRow) VerdictBlock {
	results := make([]checks.Result, len(rows))
	for i, r := range rows {
		results[i] = checks.Result{Status: checks.Status(r.Word)}
	}
	v, _ := verdictBlock(results)
	return v
}

// Page 1: the headline says the verdict in words and marks, the checks
// that did not pass come first (fail, warn, skip; report order within),
// and the passing ones follow.
func TestOverviewOrdersChecks(t *testing.T) {
	cases := []struct {
		name      string
		rows      []CheckRow
		headline  string
		attention []string
		passed    int
	}{
		{"all pass", []CheckRow{row(checks.Pass, "A"), row(checks.Pass, "B")}, "+ PASS: all 2 checks passed", nil, 2},
		{"pass with a skip", []CheckRow{row(checks.Pass, "A"), row(checks.Skip, "B"), row(checks.Pass, "C")},
			"+ PASS: every applicable check passed (2 of 3; 1 not applicable)", []string{"B"}, 2},
		{"one warning", []CheckRow{row(checks.Pass, "A"), row(checks.Warn, "B"), row(checks.Pass, "C")},
			"! WARN: 1 of 3 checks calls for attention", []string{"B"}, 2},
		{"two warnings", []CheckRow{row(checks.Warn, "A"), row(checks.Pass, "B"), row(checks.Warn, "C")},
			"! WARN: 2 of 3 checks call for attention", []string{"A", "C"}, 1},
		{"fail first, then warn, then skip", []CheckRow{row(checks.Skip, "A"), row(checks.Warn, "B"), row(checks.Pass, "C"), row(checks.Fail, "D"), row(checks.Warn, "E")},
			"× FAIL: 1 of 5 checks failed, 2 more warn", []string{"D", "B", "E", "A"}, 1},
	}
	for _, c := range cases {
		o := overview(verdictOf(c.rows), c.rows)
		if o.Headline != c.headline {
			t.Errorf("%s: headline %q, want %q", c.name, o.Headline, c.headline)
		}
		var got []string
		for _, r := range o.Attention {
			got = append(got, r.Title)
		}
		if strings.Join(got, " ") != strings.Join(c.attention, " ") || len(o.Passed) != c.passed {
			t.Errorf("%s: attention %v and %d passed, want %v and %d", c.name, got, len(o.Passed), c.attention, c.passed)
		}
	}
}

// Acceptance (page 1): the report opens with the verdict banner (words
// and marks), then the checks that did not pass with their reasons, and
// the passing checks as one compact paragraph, all on page 1 of the PDF;
// every check keeps its full row in the appendix.
func TestPageOneOfTheDemo(t *testing.T) {
	skipRenderingWhenShort(t)
	res, results := demoAudit(t, 50)
	dir := t.TempDir()
	writeAll(t, dir, res, results)
	md, err := os.ReadFile(filepath.Join(dir, "report.md"))
	if err != nil {
		t.Fatal(err)
	}
	d := BuildDocument(Audit{Result: res, Checks: results}, testMeta, ReportOptions{Date: "2026-01-02"})
	o := overview(d.Verdict, d.Checks)
	if len(o.Attention) == 0 || len(o.Passed) == 0 {
		t.Fatalf("the demo should have checks on both sides (%d not passing, %d passing)", len(o.Attention), len(o.Passed))
	}

	// The first block after the title, date and note is the banner.
	doc := parseMarkdown(md)
	var first ast.Node
	for n := doc.FirstChild(); n != nil; n = n.NextSibling() {
		if _, ok := n.(*ast.Heading); ok {
			if n.(*ast.Heading).Level > 1 {
				break
			}
			continue
		}
		if _, ok := n.(*ast.Blockquote); ok {
			first = n
			break
		}
	}
	if first == nil || bannerStatus(first, md) != string(checks.Verdict(results)) {
		t.Fatalf("report.md does not open with a verdict banner of status %s", checks.Verdict(results))
	}
	banner := plainText(first, md)
	for _, w := range []string{d.Verdict.Symbol + " " + d.Verdict.Word, o.Headline, o.Counts} {
		if !strings.Contains(banner, w) {
			t.Errorf("the banner %q lacks %q", banner, w)
		}
	}

	// The Verdict section lists the non-pass checks in one table, and no
	// passing check there; the passing checks are one paragraph.
	verdict := string(md[strings.Index(string(md), "## Verdict"):strings.Index(string(md), "## Data")])
	tableRows := 0
	for _, line := range strings.Split(verdict, "\n") {
		if strings.HasPrefix(line, "| ") && !strings.HasPrefix(line, "| Status") {
			tableRows++
			if strings.Contains(line, "pass |") {
				t.Errorf("a passing check in the table of checks that did not pass: %s", line)
			}
		}
	}
	if tableRows != len(o.Attention) {
		t.Errorf("the Verdict table has %d rows, want %d", tableRows, len(o.Attention))
	}
	for _, r := range o.Attention {
		if !strings.Contains(verdict, escapeCell(r.Meaning)) {
			t.Errorf("%s: its reason is not on page 1", r.ID)
		}
	}
	// The appendix has every check's full row.
	appendix := string(md[strings.Index(string(md), "## Appendix"):])
	for _, r := range d.Checks {
		if !strings.Contains(appendix, "| "+escapeCell(r.Title)+" | "+escapeCell(r.Measured)+" |") {
			t.Errorf("%s: no full row in the appendix", r.ID)
		}
	}

	// In the PDF, page 1 holds the banner, every non-pass check and every
	// passing check's title.
	pdftotext(t, filepath.Join(dir, "report.pdf")) // skips without poppler
	out, err := exec.Command("pdftotext", "-f", "1", "-l", "1", "-enc", "UTF-8", filepath.Join(dir, "report.pdf"), "-").Output()
	if err != nil {
		t.Fatal(err)
	}
	page1 := normal(string(out))
	want := []string{o.Headline}
	for _, r := range d.Checks {
		want = append(want, r.Title)
	}
	for _, w := range want {
		if !strings.Contains(page1, normal(w)) {
			t.Errorf("page 1 of the PDF lacks %q", w)
		}
	}
}
