package report

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
)

// Formats says which renderings of the report to write.
type Formats struct{ Markdown, PDF, HTML bool }

// Any reports whether any rendering is asked for.
func (f Formats) Any() bool { return f.Markdown || f.PDF || f.HTML }

// String lists the formats in the form ParseFormats reads.
func (f Formats) String() string {
	var parts []string
	if f.Markdown {
		parts = append(parts, "md")
	}
	if f.PDF {
		parts = append(parts, "pdf")
	}
	if f.HTML {
		parts = append(parts, "html")
	}
	if len(parts) == 0 {
		return "none"
	}
	return strings.Join(parts, ",")
}

// ParseFormats reads "md,pdf,html" (any subset, any order) or "none".
func ParseFormats(s string) (Formats, error) {
	var f Formats
	if strings.TrimSpace(s) == "none" {
		return f, nil
	}
	for _, p := range strings.Split(s, ",") {
		switch strings.TrimSpace(p) {
		case "md", "markdown":
			f.Markdown = true
		case "pdf":
			f.PDF = true
		case "html":
			f.HTML = true
		default:
			return f, fmt.Errorf("invalid --format %q: use md, pdf, html (comma-separated) or none", s)
		}
	}
	return f, nil
}

// WriteReport writes the report in the requested formats into dir: the
// figures (figures/*.png and *.svg), report.md, report.pdf, report.html and
// references.bib.
func WriteReport(dir string, audit Audit, meta Meta, opt ReportOptions, formats Formats) error {
	if !formats.Any() {
		return nil
	}
	d := BuildDocument(audit, meta, opt)
	md, err := renderCiting(func() ([]byte, error) { return RenderMarkdown(d) }, &d.References)
	if err != nil {
		return err
	}
	if err := writeRenderings(dir, md, d.figures, d.page(), formats); err != nil {
		return err
	}
	return os.WriteFile(filepath.Join(dir, "references.bib"), BibTeX(d.References), 0o644)
}

// writeRenderings draws the figures and writes the Markdown source, the PDF
// and the HTML that formats ask for.
func writeRenderings(dir string, md []byte, figures []figureJob, page Page, formats Formats) error {
	// PNG for the PDF and the Markdown, SVG for the HTML: only what is asked.
	if err := saveFigures(figures, dir, formats.Markdown || formats.PDF, formats.HTML); err != nil {
		return err
	}
	if formats.Markdown {
		if err := os.WriteFile(filepath.Join(dir, "report.md"), md, 0o644); err != nil {
			return err
		}
	}
	doc := parseMarkdown(md)
	// The PDF first: the HTML rendering marks the banner's node with its class.
	if formats.PDF {
		pdf, err := RenderPDF(md, doc, page, dir)
		if err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(dir, "report.pdf"), pdf, 0o644); err != nil {
			return err
		}
	}
	if formats.HTML {
		html, err := RenderHTML(md, doc, page, dir)
		if err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(dir, "report.html"), html, 0o644); err != nil {
			return err
		}
	}
	return nil
}
