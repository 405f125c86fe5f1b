package report

import (
	"bytes"
	"html/template"
	"strings"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/extension"
	"github.com/yuin/goldmark/text"

	"pcqc/templates"
)

// newMarkdown returns the one Markdown dialect every rendering uses:
// CommonMark with GitHub tables.
func newMarkdown() goldmark.Markdown {
	return goldmark.New(goldmark.WithExtensions(extension.Table))
}

// parseMarkdown parses the report source once; HTML and PDF both render
// from this tree, so they cannot disagree.
func parseMarkdown(src []byte) ast.Node {
	return newMarkdown().Parser().Parse(text.NewReader(src))
}

// RenderHTML renders the parsed report as a self-contained page: the CSS is
// inline and the figures are the SVG files beside the report.
func RenderHTML(src []byte, doc ast.Node, d Page) ([]byte, error) {
	// The Markdown names the PNG figures (for the PDF and for Markdown
	// viewers); the HTML page uses their SVG twins.
	ast.Walk(doc, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if img, ok := n.(*ast.Image); ok && entering {
			if dest := string(img.Destination); strings.HasPrefix(dest, "figures/") && strings.HasSuffix(dest, ".png") {
				img.Destination = []byte(strings.TrimSuffix(dest, ".png") + ".svg")
			}
		}
		return ast.WalkContinue, nil
	})
	var body bytes.Buffer
	if err := newMarkdown().Renderer().Render(&body, src, doc); err != nil {
		return nil, err
	}
	page, err := template.ParseFS(templates.FS, "page.html.tmpl")
	if err != nil {
		return nil, err
	}
	var out bytes.Buffer
	err = page.Execute(&out, struct {
		Title, Version, Date, ShortHash string
		Body                            template.HTML
	}{oneLine(d.Title), d.Version, d.Date, shortHash(d.SHA256), template.HTML(body.String())})
	return out.Bytes(), err
}

func shortHash(h string) string {
	if len(h) > 12 {
		return h[:12]
	}
	return h
}
