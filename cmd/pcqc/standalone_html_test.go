package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"pcqc/analysis"
)

// cssURL finds url(…) references in CSS, which could fetch a file as
// surely as src= does.
var cssURL = regexp.MustCompile(`url\(\s*['"]?([^'")\s]*)`)

// allowedReference tells whether report.html may hold a reference: an
// embedded data: URI, an anchor in the page, or an absolute https address
// (a published reference). Anything else would be a file beside the page,
// lost when report.html is mailed on its own.
func allowedReference(v string) bool {
	v = strings.TrimSpace(v)
	return strings.HasPrefix(v, "data:") || strings.HasPrefix(v, "#") || strings.HasPrefix(v, "https://")
}

// standaloneProblems lists every reference in an HTML page to anything
// but itself, and counts its inline figures.
func standaloneProblems(t *testing.T, path string) (problems []string, figures int) {
	t.Helper()
	page, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	root, err := html.Parse(bytes.NewReader(page))
	if err != nil {
		t.Fatalf("%s does not parse: %v", path, err)
	}
	var walk func(n *html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.ElementNode {
			if n.Data == "svg" {
				for _, a := range n.Attr {
					if a.Key == "class" && a.Val == "figure" {
						figures++
					}
				}
			}
			switch n.Data {
			case "link", "script", "iframe", "object", "embed", "base":
				problems = append(problems, "<"+n.Data+">")
			}
			for _, a := range n.Attr {
				switch a.Key {
				case "src", "href", "srcset", "poster", "data", "action", "background":
					if !allowedReference(a.Val) {
						problems = append(problems, fmt.Sprintf("<%s %s=%q>", n.Data, a.Key, a.Val))
					}
				case "style":
					for _, m := range cssURL.FindAllStringSubmatch(a.Val, -1) {
						if !allowedReference(m[1]) {
							problems = append(problems, fmt.Sprintf("<%s style=url(%s)>", n.Data, m[1]))
						}
					}
				}
			}
		}
		if n.Type == html.TextNode && n.Parent != nil && n.Parent.Data == "style" {
			for _, m := range cssURL.FindAllStringSubmatch(n.Data, -1) {
				if !allowedReference(m[1]) {
					problems = append(problems, "CSS url("+m[1]+")")
				}
			}
			if strings.Contains(n.Data, "@import") {
				problems = append(problems, "CSS @import")
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(root)
	if !bytes.Contains(page, []byte("@media print")) {
		problems = append(problems, "no print style")
	}
	return problems, figures
}

// Acceptance (HTML that stands alone): report.html of an audit, an
// application and a review references no file: every figure is inline
// SVG, one for each figure drawn, and the figure files stay on disk.
func TestReportHTMLStandsAlone(t *testing.T) {
	skipRenderingWhenShort(t)
	dir := t.TempDir()
	demoOut := filepath.Join(dir, "demo")
	if status, _, stderr := runPCQC(t, "demo", "--out", demoOut); status != exitOK {
		t.Fatalf("demo: status %d: %s", status, stderr)
	}
	o := usarrestsOther(t, true, analysis.ScaleUnit, 2)
	loadings := writeFile(t, dir, "their-loadings.csv", o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) }))
	reviewOut := filepath.Join(dir, "review")
	if status, _, stderr := runPCQC(t, "review", usarrestsPath, "--loadings", loadings, "--out", reviewOut,
		"--bootstrap", "50", "--permutations", "20", "--format", "html"); status != exitOK && status != exitChecks {
		t.Fatalf("review: status %d: %s", status, stderr)
	}
	for _, out := range []string{demoOut, filepath.Join(demoOut, "later-batch"), reviewOut} {
		problems, figures := standaloneProblems(t, filepath.Join(out, "report.html"))
		for _, p := range problems {
			t.Errorf("%s/report.html: %s", out, p)
		}
		drawn, _ := filepath.Glob(filepath.Join(out, "figures", "*.svg"))
		if figures == 0 || figures != len(drawn) {
			t.Errorf("%s/report.html holds %d inline figures; %d were drawn", out, figures, len(drawn))
		}
	}
}

// The check itself: a page that names a file beside it is caught.
func TestStandaloneCheckCatchesLocalFiles(t *testing.T) {
	for _, c := range []struct {
		page string
		bad  bool
	}{
		{`<p><img src="figures/scree.svg"></p>`, true},
		{`<p><a href="samples.csv">x</a></p>`, true},
		{`<svg><image href="figures/x.png"/></svg>`, true},
		{`<svg><use xlink:href="other.svg#a"/></svg>`, true},
		{`<p style="background: url(bg.png)">x</p>`, true},
		{`<link rel="stylesheet" href="https://example.org/a.css">`, true},
		{`<p><img src="data:image/png;base64,AAAA"><a href="#verdict">v</a><a href="https://doi.org/10.1000/1">doi</a></p>`, false},
	} {
		path := filepath.Join(t.TempDir(), "report.html")
		if err := os.WriteFile(path, []byte("<style>@media print {}</style>"+c.page), 0o644); err != nil {
			t.Fatal(err)
		}
		problems, _ := standaloneProblems(t, path)
		if (len(problems) > 0) != c.bad {
			t.Errorf("%s: problems %q", c.page, problems)
		}
	}
}
