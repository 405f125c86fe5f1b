package report

import (
	"bytes"
	"fmt"
	"strings"
	"text/template"
	"unicode"

	"pcqc/templates"
)

// escapeMarkdown makes s safe as inline Markdown text, escaping only what
// would otherwise start Markdown syntax, so that report.md stays readable as
// plain text. Backslash escapes of ASCII punctuation are CommonMark, so the
// rendered text is exactly s.
func escapeMarkdown(s string) string {
	var b strings.Builder
	r := []rune(s)
	word := func(i int) bool {
		return i >= 0 && i < len(r) && (unicode.IsLetter(r[i]) || unicode.IsDigit(r[i]))
	}
	for i, c := range r {
		switch c {
		case '\\', '`', '*', '[', ']':
			b.WriteRune('\\')
		case '_':
			// Inside a word an underscore is literal (snake_case names).
			if !word(i-1) || !word(i+1) {
				b.WriteRune('\\')
			}
		case '<':
			// Only "<" before a letter, "/", "!" or "?" can open HTML or an autolink.
			if i+1 < len(r) && (unicode.IsLetter(r[i+1]) || strings.ContainsRune("/!?", r[i+1])) {
				b.WriteRune('\\')
			}
		case '&':
			// Only "&name;" or "&#…;" is an entity reference.
			if entityAt(r[i+1:]) {
				b.WriteRune('\\')
			}
		case '#', '>', '-', '+', '=':
			// Only at the start of a line do these open a heading, quote,
			// list or underline.
			if i == 0 {
				b.WriteRune('\\')
			}
		case '.', ')':
			// "12." or "12)" at the start opens an ordered list.
			if i > 0 && (i+1 == len(r) || r[i+1] == ' ') && strings.IndexFunc(string(r[:i]), func(c rune) bool { return c < '0' || c > '9' }) < 0 {
				b.WriteRune('\\')
			}
		}
		b.WriteRune(c)
	}
	return b.String()
}

func entityAt(r []rune) bool {
	for i, c := range r {
		if c == ';' {
			return i > 0
		}
		if !(unicode.IsLetter(c) || unicode.IsDigit(c) || c == '#') || i > 32 {
			return false
		}
	}
	return false
}

// escapeCell makes s safe inside a table cell: one line, pipes escaped.
func escapeCell(s string) string {
	s = strings.NewReplacer("\r\n", " ", "\n", " ", "\r", " ").Replace(s)
	if strings.TrimSpace(s) == "" {
		return " "
	}
	return strings.ReplaceAll(escapeMarkdown(s), "|", "\\|")
}

// markdownTable writes a GFM table.
func markdownTable(header []string, rows [][]string) string {
	var b strings.Builder
	b.WriteString("|")
	for _, h := range header {
		b.WriteString(" " + escapeCell(h) + " |")
	}
	b.WriteString("\n|")
	for range header {
		b.WriteString("---|")
	}
	for _, r := range rows {
		b.WriteString("\n|")
		for c := range header {
			cell := ""
			if c < len(r) {
				cell = r[c]
			}
			b.WriteString(" " + escapeCell(cell) + " |")
		}
	}
	return b.String()
}

// RenderMarkdown fills the report template with the document.
func RenderMarkdown(d *Document) ([]byte, error) { return renderTemplate("report.md.tmpl", d) }

// renderTemplate fills one of the Markdown templates.
func renderTemplate(name string, data any) ([]byte, error) {
	figureNo := 0
	funcs := template.FuncMap{
		"md":    escapeMarkdown,
		"table": markdownTable,
		"list":  func(s ...string) []string { return s },
		"checkRows": func(cs []CheckRow) [][]string {
			rows := make([][]string, len(cs))
			for i, c := range cs {
				rows[i] = []string{c.Symbol + " " + c.Word, c.Title, c.Measured, c.Limit, c.Meaning}
			}
			return rows
		},
		"pairs": func(ps [][2]string) [][]string {
			rows := make([][]string, len(ps))
			for i, p := range ps {
				rows[i] = []string{p[0], p[1]}
			}
			return rows
		},
		"figure": func(f Figure) string {
			if f.Omitted != "" {
				return "*" + escapeMarkdown(f.Omitted) + "*\n"
			}
			figureNo++
			return fmt.Sprintf("![%s](%s)\n\n*Figure %d. %s*\n", escapeMarkdown(f.Alt), f.PNG(), figureNo, escapeMarkdown(f.Caption))
		},
	}
	t, err := template.New(name).Funcs(funcs).ParseFS(templates.FS, name)
	if err != nil {
		return nil, err
	}
	var b bytes.Buffer
	if err := t.Execute(&b, data); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}
