package report

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/yuin/goldmark/ast"
	"golang.org/x/net/html"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
	"pcqc/internal/synth"
)

// longRTL is a long right-to-left name (Hebrew, which Liberation covers).
var longRTL = strings.TrimSpace(strings.Repeat("תחנת ניטור צפונית מספר שבע ליד הנהר הגדול ", 3))

// hostileNames are the variable names, ids and group labels of the
// hostile table: each would break a report that pasted it in as Markdown.
var (
	hostileVariables = []string{"line\n~~~\ncode", "x\n## Verdict\nfake", "pi|pe", "back`tick``s",
		"<script>alert(1)</script>", "[link](http://x)", "**bold**", longRTL, "محطة الرصد", "plain_name"}
	hostileIDs    = []string{"id\n# Heading", "`code` id", "<img src=x onerror=alert(1)>", "[a](b)", longRTL}
	hostileGroups = []string{"g\n## Verdict", "<b>grp</b>", "**ok**", longRTL}
	hostileTitle  = "Audit\n## Verdict\n~~~ of <script>x</script>"
)

// hostileCSV writes a table with those names: three latent factors and
// one gross outlier (sample 7), so that flagged ids and groups are listed.
func hostileCSV() []byte {
	x, _ := synth.LowRank(synth.RNG(12, 92), 40, len(hostileVariables), []float64{4, 2, 1}, 0.5)
	q := func(s string) string { return `"` + strings.ReplaceAll(s, `"`, `""`) + `"` }
	var b bytes.Buffer
	b.WriteString("id,grp")
	for _, v := range hostileVariables {
		b.WriteString("," + q(v))
	}
	b.WriteString("\n")
	for i := 0; i < 40; i++ {
		fmt.Fprintf(&b, "%s,%s", q(fmt.Sprintf("%s %d", hostileIDs[i%len(hostileIDs)], i)), q(hostileGroups[i%len(hostileGroups)]))
		for j := range hostileVariables {
			v := x.At(i, j)
			if i == 7 {
				v *= 12
			}
			fmt.Fprintf(&b, ",%.6f", v)
		}
		b.WriteString("\n")
	}
	return b.Bytes()
}

// headings lists the headings of a Markdown document as "level text".
func headings(t *testing.T, md []byte) []string {
	t.Helper()
	var out []string
	doc := parseMarkdown(md)
	ast.Walk(doc, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if h, ok := n.(*ast.Heading); ok && entering {
			out = append(out, fmt.Sprintf("%d %s", h.Level, plainText(h, md)))
		}
		return ast.WalkContinue, nil
	})
	return out
}

// htmlReport parses report.html into element counts, image sources and text.
func htmlReport(t *testing.T, path string) (elements map[string]int, images []string, text string) {
	t.Helper()
	page, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	root, err := html.Parse(bytes.NewReader(page))
	if err != nil {
		t.Fatalf("%s does not parse: %v", path, err)
	}
	elements = map[string]int{}
	var b strings.Builder
	var walk func(n *html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.ElementNode {
			elements[n.Data]++
			for _, a := range n.Attr {
				if n.Data == "img" && a.Key == "src" {
					images = append(images, a.Val)
				}
			}
		}
		if n.Type == html.TextNode {
			b.WriteString(n.Data)
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(root)
	return elements, images, b.String()
}

// rtlMarks are the embedding marks pdftotext puts around right-to-left words.
var rtlMarks = strings.NewReplacer("\u202a", "", "\u202b", "", "\u202c", "", "\u202d", "", "\u202e", "")

// Column names, sample ids and group labels that hold newlines, fences,
// headings, pipes, backticks, HTML, links, emphasis and long right-to-left
// text come out as literal text in all three renderings of the audit and
// apply reports, and add or swallow no section.
func TestHostileNamesStayLiteral(t *testing.T) {
	skipRenderingWhenShort(t)
	read := func() *intake.Table {
		tab, err := intake.ReadTableFrom("hostile.csv", bytes.NewReader(hostileCSV()), intake.ReadOptions{IDColumn: "id", GroupColumn: "grp"})
		if err != nil {
			t.Fatal(err)
		}
		// Units are user text too (--units-row): the hostile names again,
		// in reverse order, so that each label joins two of them.
		tab.Units = make([]string, len(tab.Variables))
		for j := range tab.Units {
			tab.Units[j] = tab.Variables[len(tab.Variables)-1-j]
		}
		return tab
	}
	res, err := analysis.Analyze(read(), analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.DefaultComponentRule, Permutations: 100, Bootstrap: 20, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	if res.Retained < 2 {
		t.Fatalf("%d components retained; the test needs score plots", res.Retained)
	}
	results := checks.RunAll(checks.Input{Run: res})
	meta := Meta{Version: "test", Command: []string{"pcqc", "run", "hostile.csv", "--title", hostileTitle, "--author", "```"}, Options: Options{{Name: "title", Value: hostileTitle}}}
	opt := ReportOptions{Title: hostileTitle, Author: "```\n> quoted", Date: "2026-01-02"}
	dir := t.TempDir()
	if err := WriteTables(dir, Audit{Result: res, Checks: results}, meta); err != nil {
		t.Fatal(err)
	}
	if err := WriteReport(dir, Audit{Result: res, Checks: results}, meta, opt, allFormats); err != nil {
		t.Fatal(err)
	}
	app := analysis.Apply(analysis.NewModel(res, "test"), read())
	run := ApplyRun{App: app, Checks: checks.RunAll(checks.Input{Apply: app})}
	applyDir := t.TempDir()
	if err := WriteApplyReport(applyDir, run, meta, opt, allFormats); err != nil {
		t.Fatal(err)
	}
	if len(app.Flagged) == 0 {
		t.Fatal("no sample flagged; the test needs flagged ids in the tables")
	}

	// The tables name every variable and the flagged samples with their
	// groups; the score plots' legends name every group.
	flagged := flaggedSamples(res)
	names := append([]string{res.Table.IDs[flagged[0]], res.Table.Groups[flagged[0]]}, hostileVariables...)
	title := literal(hostileTitle)
	svg, _ := os.ReadFile(filepath.Join(dir, "figures", "scores-pc1-pc2.svg"))
	for _, g := range hostileGroups {
		if label := html.EscapeString(figureText(g, maxLabelRunes)); !bytes.Contains(svg, []byte(">"+label+"</text>")) {
			t.Errorf("the score plot's legend lacks %q", label)
		}
	}

	// report.md: exactly the template's sections.
	md, _ := os.ReadFile(filepath.Join(dir, "report.md"))
	want := []string{"1 " + title, "2 Verdict", "3 What the checks that did not pass found", "2 Data", "2 Components", "2 Loadings", "2 Scores",
		"2 Outliers", "2 Without the flagged samples", "2 Robust cross-check", "2 Stability", "2 Methods", "3 References", "2 Reproduce", "2 Cautions", "2 Appendix: every check", "3 What each check found"}
	if got := headings(t, md); strings.Join(got, "\n") != strings.Join(want, "\n") {
		t.Errorf("report.md headings:\n%s\nwant:\n%s", strings.Join(got, "\n"), strings.Join(want, "\n"))
	}
	applyMD, _ := os.ReadFile(filepath.Join(applyDir, "report.md"))
	wantApply := []string{"1 " + title, "2 Verdict", "3 What the checks that did not pass found", "2 Data", "2 New samples", "2 Drift",
		"2 Contributions", "2 Methods", "3 References", "2 Reproduce", "2 Cautions", "2 Appendix: every check", "3 What each check found"}
	if got := headings(t, applyMD); strings.Join(got, "\n") != strings.Join(wantApply, "\n") {
		t.Errorf("apply report.md headings:\n%s\nwant:\n%s", strings.Join(got, "\n"), strings.Join(wantApply, "\n"))
	}

	// report.html: no script, link or extra block from user text (the
	// one block quote is the verdict banner), and the names as text.
	for _, c := range []struct {
		dir      string
		h2, pre  int
		sections []string
	}{{dir, 13, 1, want}, {applyDir, 9, 1, wantApply}} {
		elements, images, text := htmlReport(t, filepath.Join(c.dir, "report.html"))
		for _, tag := range []string{"script", "a", "ol", "h4", "b", "iframe", "img"} {
			if elements[tag] > 0 {
				t.Errorf("%s: report.html has %d <%s> elements", c.dir, elements[tag], tag)
			}
		}
		if elements["blockquote"] != 1 {
			t.Errorf("%s: report.html has %d <blockquote> elements; want the banner only", c.dir, elements["blockquote"])
		}
		if elements["h1"] != 1 || elements["h2"] != c.h2 || elements["pre"] != c.pre {
			t.Errorf("%s: report.html has %d h1, %d h2, %d pre; want 1, %d, %d", c.dir, elements["h1"], elements["h2"], elements["pre"], c.h2, c.pre)
		}
		if len(images) > 0 {
			t.Errorf("report.html shows images %q; its figures are inline SVG", images)
		}
		for _, s := range append(names, title) {
			if !strings.Contains(text, literal(s)) {
				t.Errorf("%s: report.html lacks %q", c.dir, literal(s))
			}
		}
	}

	// report.pdf: every section and the names as text (pdftotext gives
	// right-to-left words one by one, marked).
	for _, c := range []struct {
		dir      string
		sections []string
	}{{dir, want}, {applyDir, wantApply}} {
		text := rtlMarks.Replace(normal(pdftotext(t, filepath.Join(c.dir, "report.pdf"))))
		for _, h := range c.sections {
			if !strings.Contains(text, h[2:]) {
				t.Errorf("%s: report.pdf lacks the heading %q", c.dir, h[2:])
			}
		}
		for _, s := range []string{"line ~~~ code", "x ## Verdict fake", "pi|pe", "back`tick``s", "<script>alert(1)</script>", "[link](http://x)", "**bold**"} {
			if !strings.Contains(text, s) {
				t.Errorf("%s: report.pdf lacks %q", c.dir, s)
			}
		}
		for _, word := range strings.Fields(longRTL)[:7] {
			if !strings.Contains(text, word) {
				t.Errorf("%s: report.pdf lacks the right-to-left word %q", c.dir, word)
			}
		}
		if !strings.Contains(text, "□□□□ □□□□□") {
			t.Errorf("%s: report.pdf does not show the Arabic name (not in Liberation) as boxes", c.dir)
		}
	}
}
