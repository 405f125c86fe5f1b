package report

import (
	"bytes"
	"fmt"
	"html"
	"html/template"
	"os"
	"path/filepath"
	"regexp"
	"strings"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/extension"
	"github.com/yuin/goldmark/renderer"
	"github.com/yuin/goldmark/text"
	"github.com/yuin/goldmark/util"

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

// bannerStatus reads the verdict banner (a block quote whose text opens
// with a status mark, as checks.md.tmpl writes it) and returns its status
// word, or "" when the block quote is not a banner. The renderings use it
// for the banner's colour; the mark and the word stay in the text, so that
// colour is never the only sign.
func bannerStatus(n ast.Node, src []byte) string {
	t := strings.TrimSpace(plainText(n, src))
	for _, s := range []struct{ mark, word string }{{"+ PASS", "pass"}, {"! WARN", "warn"}, {"× FAIL", "fail"}} {
		if strings.HasPrefix(t, s.mark) {
			return s.word
		}
	}
	return ""
}

// RenderHTML renders the parsed report as a page that stands alone: the
// CSS is inline and every figure is its SVG drawing, read from dir/figures
// and written into the page, so that report.html can be mailed or attached
// on its own.
func RenderHTML(src []byte, doc ast.Node, d Page, dir string) ([]byte, error) {
	ast.Walk(doc, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if q, ok := n.(*ast.Blockquote); ok && entering {
			if s := bannerStatus(q, src); s != "" {
				q.SetAttributeString("class", []byte("banner banner-"+s))
			}
		}
		return ast.WalkContinue, nil
	})
	figures := &figureRenderer{dir: dir}
	md := newMarkdown()
	md.Renderer().AddOptions(renderer.WithNodeRenderers(util.Prioritized(figures, 100)))
	var body bytes.Buffer
	if err := md.Renderer().Render(&body, src, doc); err != nil {
		return nil, err
	}
	if figures.err != nil {
		return nil, figures.err
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

// figurePath matches the figures the report's Markdown names; nothing else
// is ever read from disk into the page.
var figurePath = regexp.MustCompile(`^figures/[a-z0-9-]+\.png$`)

// figureRenderer writes each figure of the report as its SVG drawing,
// inline, in place of the Markdown's image of the PNG twin.
type figureRenderer struct {
	dir string
	err error // the first figure that could not be read
}

func (r *figureRenderer) RegisterFuncs(reg renderer.NodeRendererFuncRegisterer) {
	reg.Register(ast.KindImage, r.image)
}

func (r *figureRenderer) image(w util.BufWriter, src []byte, n ast.Node, entering bool) (ast.WalkStatus, error) {
	if !entering {
		return ast.WalkContinue, nil
	}
	img := n.(*ast.Image)
	alt := plainText(img, src)
	dest := string(img.Destination)
	if !figurePath.MatchString(dest) {
		// Only the template makes images (user text cannot: "[" is
		// escaped), so this is not reached; show the words, fetch nothing.
		fmt.Fprintf(w, "<em>%s</em>", html.EscapeString(alt))
		return ast.WalkSkipChildren, nil
	}
	svg, err := os.ReadFile(filepath.Join(r.dir, filepath.FromSlash(strings.TrimSuffix(dest, ".png")+".svg")))
	if err == nil {
		svg, err = inlineSVG(svg, alt)
	}
	if err != nil {
		if r.err == nil {
			r.err = fmt.Errorf("figure for the HTML: %w", err)
		}
		return ast.WalkSkipChildren, nil
	}
	w.Write(svg)
	return ast.WalkSkipChildren, nil
}

// inlineSVG prepares an SVG file for a place inside an HTML page: from its
// <svg> element on (no XML declaration or comment), named for assistive
// technology by its alternative text, and sized by the page's CSS.
func inlineSVG(svg []byte, alt string) ([]byte, error) {
	start := bytes.Index(svg, []byte("<svg"))
	end := bytes.LastIndex(svg, []byte("</svg>"))
	if start < 0 || end < start {
		return nil, fmt.Errorf("not an SVG drawing")
	}
	var b bytes.Buffer
	b.WriteString(`<svg class="figure" role="img" aria-label="`)
	b.WriteString(html.EscapeString(oneLine(alt)))
	b.WriteString(`"`)
	b.Write(svg[start+len("<svg") : end+len("</svg>")])
	b.WriteString("\n")
	return b.Bytes(), nil
}

func shortHash(h string) string {
	if len(h) > 12 {
		return h[:12]
	}
	return h
}
