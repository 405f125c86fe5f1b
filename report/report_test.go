package report

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"codeberg.org/go-fonts/liberation/liberationmonoregular"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"golang.org/x/image/font/sfnt"
	"golang.org/x/net/html"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
	"pcqc/demo"
	"pcqc/internal/synth"
)

func demoAudit(t *testing.T, bootstrap int) (*analysis.Result, []checks.Result) {
	t.Helper()
	tab, err := intake.ReadTableFrom("demo-data.csv", bytes.NewReader(demo.Survey()), intake.ReadOptions{IDColumn: demo.SampleID, GroupColumn: demo.Station})
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Analyze(tab, analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.DefaultComponentRule, Permutations: 100, Bootstrap: bootstrap, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	return res, checks.RunAll(checks.Input{Run: res})
}

var testMeta = Meta{Version: "test", Command: []string{"pcqc", "demo", "--date", "2026-01-02"}, Options: Options{{Name: "scale", Value: "unit"}}}

func writeAll(t *testing.T, dir string, res *analysis.Result, results []checks.Result) {
	t.Helper()
	opt := ReportOptions{Title: "Demo audit", Author: "A. Tester", Date: "2026-01-02", Invented: "Invented data."}
	if err := WriteReport(dir, Audit{Result: res, Checks: results}, testMeta, opt, Formats{Markdown: true, PDF: true, HTML: true}); err != nil {
		t.Fatal(err)
	}
}

// Acceptance: two runs with the same inputs and date give byte-identical
// report files, figures included.
func TestReportIsReproducible(t *testing.T) {
	skipRenderingWhenShort(t)
	res, results := demoAudit(t, 100)
	a, b := t.TempDir(), t.TempDir()
	writeAll(t, a, res, results)
	writeAll(t, b, res, results)
	var files []string
	filepath.WalkDir(a, func(path string, d os.DirEntry, err error) error {
		if err == nil && !d.IsDir() {
			rel, _ := filepath.Rel(a, path)
			files = append(files, rel)
		}
		return nil
	})
	for _, want := range []string{"report.md", "report.pdf", "report.html", "references.bib", "figures/scree.png", "figures/scree.svg"} {
		if !strings.Contains(strings.Join(files, " "), want) {
			t.Errorf("%s not written", want)
		}
	}
	for _, f := range files {
		x, _ := os.ReadFile(filepath.Join(a, f))
		y, err := os.ReadFile(filepath.Join(b, f))
		if err != nil || !bytes.Equal(x, y) {
			t.Errorf("%s differs between two identical runs", f)
		}
	}
}

// Acceptance: report.html parses, holds its figures inline, and it
// names every check; report.md renders with goldmark with no template
// syntax left.
func TestHTMLAndMarkdown(t *testing.T) {
	skipRenderingWhenShort(t)
	res, results := demoAudit(t, 50)
	dir := t.TempDir()
	writeAll(t, dir, res, results)
	md, _ := os.ReadFile(filepath.Join(dir, "report.md"))
	if bytes.Contains(md, []byte("{{")) || bytes.Contains(md, []byte("}}")) || bytes.Contains(md, []byte("<no value>")) {
		t.Error("template syntax left in report.md")
	}
	var rendered bytes.Buffer
	if err := newMarkdown().Convert(md, &rendered); err != nil {
		t.Fatalf("goldmark: %v", err)
	}
	if strings.Count(rendered.String(), "<table>") < 5 {
		t.Errorf("report.md renders %d tables", strings.Count(rendered.String(), "<table>"))
	}

	page, _ := os.ReadFile(filepath.Join(dir, "report.html"))
	root, err := html.Parse(bytes.NewReader(page))
	if err != nil {
		t.Fatalf("report.html does not parse: %v", err)
	}
	var images, figures []string
	var text strings.Builder
	var walk func(n *html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.ElementNode && n.Data == "img" {
			images = append(images, n.Data)
		}
		if n.Type == html.ElementNode && n.Data == "svg" {
			for _, a := range n.Attr {
				if a.Key == "aria-label" {
					figures = append(figures, a.Val)
				}
			}
		}
		if n.Type == html.TextNode {
			text.WriteString(n.Data)
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(root)
	// Every figure is inline SVG, named by its alternative text.
	if len(figures) < 8 || len(images) > 0 {
		t.Errorf("report.html shows %d inline figures and %d images", len(figures), len(images))
	}
	body := text.String()
	for _, r := range results {
		if !strings.Contains(body, r.Title) || !strings.Contains(body, r.ID) {
			t.Errorf("report.html does not name check %s", r.ID)
		}
	}
	if strings.Contains(string(page), "<script") {
		t.Error("report.html contains a script")
	}
}

// Every character of the report must exist in the fonts the PDF embeds,
// or it would come out as a blank box.
func TestReportGlyphsInFonts(t *testing.T) {
	res, results := demoAudit(t, 50)
	d := BuildDocument(Audit{Result: res, Checks: results}, testMeta, ReportOptions{Date: "2026-01-02"})
	md, err := RenderMarkdown(d)
	if err != nil {
		t.Fatal(err)
	}
	for _, ttf := range [][]byte{liberationsansregular.TTF, liberationmonoregular.TTF} {
		f, err := sfnt.Parse(ttf)
		if err != nil {
			t.Fatal(err)
		}
		var buf sfnt.Buffer
		missing := map[rune]bool{}
		for _, r := range string(md) {
			if r < ' ' {
				continue
			}
			if gi, _ := f.GlyphIndex(&buf, r); gi == 0 {
				missing[r] = true
			}
		}
		if len(missing) > 0 {
			var list []string
			for r := range missing {
				list = append(list, fmt.Sprintf("%q", r))
			}
			t.Errorf("characters missing from the embedded font: %s", strings.Join(list, " "))
		}
	}
}

// pdftotext returns the text of a PDF, or skips when poppler-utils are not
// installed (CI installs them and sets PCQC_REQUIRE_POPPLER=1, which turns
// the skip into a failure).
func pdftotext(t *testing.T, path string) string {
	t.Helper()
	if _, err := exec.LookPath("pdftotext"); err != nil {
		if os.Getenv("PCQC_REQUIRE_POPPLER") != "" {
			t.Fatal("pdftotext not found; install poppler-utils")
		}
		t.Skip("pdftotext not installed (Debian poppler-utils)")
	}
	out, err := exec.Command("pdftotext", "-raw", "-enc", "UTF-8", path, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	// Drop the running footer, which a page break puts inside the text.
	var kept []string
	for _, line := range strings.Split(string(out), "\n") {
		line = strings.Trim(line, "\f")
		if footerLine.MatchString(line) {
			continue
		}
		kept = append(kept, line)
	}
	return strings.Join(kept, "\n")
}

var footerLine = regexp.MustCompile(`^(pcqc \S+ · .* · input SHA-256 [0-9a-f]+)?\s*(page \d+ of \d+)?$`)

var spaces = regexp.MustCompile(`\s+`)

func normal(s string) string { return strings.TrimSpace(spaces.ReplaceAllString(s, " ")) }

// Acceptance: the demo's report.pdf opens in a real PDF reader, which finds
// the title, the verdict, every check title and the methods paragraph.
func TestPDFReadsInPoppler(t *testing.T) {
	skipRenderingWhenShort(t)
	res, results := demoAudit(t, 100)
	dir := t.TempDir()
	writeAll(t, dir, res, results)
	path := filepath.Join(dir, "report.pdf")
	text := normal(pdftotext(t, path))
	info, err := exec.Command("pdfinfo", path).Output()
	if err != nil {
		t.Fatalf("pdfinfo: %v", err)
	}
	if !strings.Contains(string(info), "Title:") || !strings.Contains(string(info), "Demo audit") {
		t.Errorf("pdfinfo: %s", info)
	}
	d := BuildDocument(Audit{Result: res, Checks: results}, testMeta, ReportOptions{Title: "Demo audit", Date: "2026-01-02"})
	want := []string{"Demo audit", overview(d.Verdict, d.Checks).Headline, normal(d.Methods)}
	for _, r := range results {
		want = append(want, r.Title)
	}
	for _, w := range want {
		if !strings.Contains(text, w) {
			t.Errorf("PDF text lacks %q", w)
		}
	}
}

// Acceptance: long tables break across PDF pages with their header repeated,
// and long sample ids stay inside their cells.
func TestLongTablesInPDF(t *testing.T) {
	skipRenderingWhenShort(t)
	const n, p = 260, 200
	x, _ := synth.LowRank(synth.RNG(3, 60), n, p, []float64{4, 3}, 1)
	ids := make([]string, n)
	for i := range ids {
		ids[i] = fmt.Sprintf("sample-%03d", i)
	}
	// A sample id far wider than its column, with no place to break.
	ids[5] = strings.Repeat("VeryLongSampleIdentifierWithoutSpaces", 4)
	for j := 0; j < p; j++ {
		x.Set(5, j, 25*x.At(5, j)) // make it an outlier, so it is listed
	}
	tab := intake.TableFromMatrix("wide-table.csv", x, nil, ids)
	tab.SHA256 = strings.Repeat("ab", 32)
	res, err := analysis.Analyze(tab, analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}})
	if err != nil {
		t.Fatal(err)
	}
	results := checks.RunAll(checks.Input{Run: res})
	d := BuildDocument(Audit{Result: res, Checks: results}, testMeta, ReportOptions{Date: "2026-01-02"})
	if len(d.Loadings.Rows) != p {
		t.Fatalf("loadings table has %d rows, want all %d", len(d.Loadings.Rows), p)
	}
	dir := t.TempDir()
	if err := d.saveFigures(dir); err != nil {
		t.Fatal(err)
	}
	md, err := RenderMarkdown(d)
	if err != nil {
		t.Fatal(err)
	}
	pdf, stats, err := renderPDF(md, parseMarkdown(md), d.page(), dir)
	if err != nil {
		t.Fatal(err)
	}
	// 200 rows of the loadings table span at least three pages.
	if stats.headerRepeats < 3 {
		t.Errorf("table headers repeated %d times after page breaks", stats.headerRepeats)
	}
	path := filepath.Join(dir, "report.pdf")
	os.WriteFile(path, pdf, 0o644)
	if text := pdftotext(t, path); strings.Count(text, "Variable PC1 PC2") < 4 {
		t.Errorf("the loadings header appears %d times in the PDF text", strings.Count(text, "Variable PC1 PC2"))
	}
}

func TestWrapCellKeepsTextInside(t *testing.T) {
	d := &Document{Title: "t", Date: "2026-01-02", Version: "test", Data: DataBlock{SHA256: "00"}}
	w, err := newPDFWriter(nil, d.page(), t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	w.size = pdfTableSize
	w.setFont()
	for _, text := range []string{
		strings.Repeat("VeryLongSampleIdentifierWithoutSpaces", 4),
		"ordinary words that wrap across several lines of a narrow cell",
		"ST05-2024-07",
	} {
		for _, width := range []float64{12, 25, 60} {
			for _, line := range w.wrapCell(text, width) {
				if got := w.pdf.GetStringWidth(line); got > width+1e-9 {
					t.Errorf("line %q is %.1f mm wide in a %.0f mm cell", line, got, width)
				}
			}
		}
	}
}

func TestParseFormats(t *testing.T) {
	cases := map[string]Formats{
		"md,pdf,html": {true, true, true},
		"pdf":         {PDF: true},
		"html, md":    {Markdown: true, HTML: true},
		"none":        {},
	}
	for s, want := range cases {
		got, err := ParseFormats(s)
		if err != nil || got != want {
			t.Errorf("%q: %+v %v", s, got, err)
		}
	}
	if _, err := ParseFormats("docx"); err == nil {
		t.Error("docx accepted")
	}
}

func TestMarkdownEscaping(t *testing.T) {
	// Ids and names may hold characters that mean something in Markdown;
	// they must come out as written.
	cases := []string{"a|b", "*x*", "_y_", "snake_case_name", "[z](w)", "<b>", "x < 5", "- item", "#5", "1. first", "12) twelve",
		`back\slash`, "a & b", "&amp;", "> quote", "a`b"}
	for _, s := range cases {
		for _, md := range []string{markdownTable([]string{"h"}, [][]string{{s}}), escapeMarkdown(s)} {
			var out bytes.Buffer
			newMarkdown().Convert([]byte(md), &out)
			got := strings.TrimSpace(html.UnescapeString(regexp.MustCompile(`<[^>]+>`).ReplaceAllString(out.String(), "")))
			if !strings.Contains(got, s) {
				t.Errorf("%q renders as %q from %q", s, got, md)
			}
			if strings.Contains(out.String(), "<li>") || strings.Contains(out.String(), "<blockquote>") || strings.Contains(out.String(), "<em>") || strings.Contains(out.String(), "<h1>") {
				t.Errorf("%q renders as markup: %s", s, out.String())
			}
		}
	}
	// Names with underscores stay readable in the Markdown source.
	for _, plain := range []string{"water_temp_C", "18.46", "3 components retained", "p < 0.05"} {
		if got := escapeMarkdown(plain); got != plain {
			t.Errorf("%q escaped as %q", plain, got)
		}
	}
}

// skipRenderingWhenShort skips a test that renders whole reports when
// -short is given: CI runs the race detector with -short, since these
// tests exercise no concurrency of their own and take minutes under it;
// the full run (go test ./...) always includes them.
func skipRenderingWhenShort(t *testing.T) {
	t.Helper()
	if testing.Short() {
		t.Skip("renders whole reports; run without -short")
	}
}
