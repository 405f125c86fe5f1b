package report

import (
	"bytes"
	"fmt"
	"strings"
	"text/template"
	"unicode"

	"pcqc/templates"
)

// escapeMarkdown makes s safe as inline Markdown text: whatever s holds,
// it renders as one line of literal text in report.md, report.html and
// report.pdf, and can neither open a block (a heading, a list, a quote, a
// code block or fence, a table, HTML) nor close one it is placed in. It is
// the one function every piece of user text in the Markdown goes through
// (the template's md, table cells and figure captions).
//
// Control characters and line breaks go first (oneLine), so that the text
// stays on the line the template put it on; surrounding spaces go too,
// since four of them would open a code block and two at the end a line
// break. Then only what would otherwise start Markdown syntax is escaped,
// so that report.md stays readable as plain text; backslash escapes of
// ASCII punctuation are CommonMark, so the rendered text is exactly s.
func escapeMarkdown(s string) string { return escapeInline(s, false) }

// escapeInline is escapeMarkdown, with every pipe escaped in a table cell.
func escapeInline(s string, cell bool) string {
	var b strings.Builder
	r := []rune(strings.TrimSpace(oneLine(s)))
	word := func(i int) bool {
		return i >= 0 && i < len(r) && (unicode.IsLetter(r[i]) || unicode.IsDigit(r[i]))
	}
	for i, c := range r {
		switch c {
		case '\\', '`', '*', '[', ']', '#':
			// "#" anywhere: a run of them at the end of a heading would
			// be taken for its closing sequence and dropped.
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
		case '>', '-', '+', '=', '~', '|':
			// Only at the start of a line do these open a quote, list,
			// underline, fence or table row; in a table, a pipe anywhere
			// ends the cell.
			if i == 0 || cell && c == '|' {
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

// codeSpan renders s as an inline code span that no backtick in s can
// close: its fence is one backtick longer than the longest run in s
// (CommonMark closes a span only with a run of equal length), padded with
// a space where s starts or ends with a backtick. Code spans show
// backslashes and HTML literally, so nothing else needs escaping; never use
// one in a table cell, where "|" would still split the cell.
func codeSpan(s string) string {
	s = strings.TrimSpace(oneLine(s))
	if s == "" {
		return ""
	}
	fence := strings.Repeat("`", longestRun(s, '`')+1)
	if strings.HasPrefix(s, "`") || strings.HasSuffix(s, "`") {
		s = " " + s + " "
	}
	return fence + s + fence
}

// codeFence returns a fence for a code block holding s: at least three
// backticks, and longer than any run of backticks in s, so that no line of
// s can close the block early.
func codeFence(s string) string {
	return strings.Repeat("`", max(3, longestRun(s, '`')+1))
}

// longestRun returns the length of the longest run of c in s.
func longestRun(s string, c rune) int {
	longest, run := 0, 0
	for _, r := range s {
		if r == c {
			run++
			longest = max(longest, run)
		} else {
			run = 0
		}
	}
	return longest
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

// escapeCell makes s safe inside a table cell: escapeMarkdown, and every
// pipe escaped, since one would end the cell wherever it stood.
func escapeCell(s string) string {
	if e := escapeInline(s, true); e != "" {
		return e
	}
	return " "
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

// statusCell is the status column of a check table: the mark and the
// word joined by a no-break space, so that a narrow column never parts them.
func statusCell(c CheckRow) string { return c.Symbol + "\u00a0" + c.Word }

// RenderMarkdown fills the report template with the document.
func RenderMarkdown(d *Document) ([]byte, error) { return renderTemplate("report.md.tmpl", d) }

// renderTemplate fills one of the Markdown templates.
func renderTemplate(name string, data any) ([]byte, error) {
	figureNo := 0
	funcs := template.FuncMap{
		"md":    escapeMarkdown,
		"code":  codeSpan,
		"fence": codeFence,
		"table": markdownTable,
		"list":  func(s ...string) []string { return s },
		"checkRows": func(cs []CheckRow) [][]string {
			rows := make([][]string, len(cs))
			for i, c := range cs {
				rows[i] = []string{statusCell(c), c.Title, c.Measured, c.Limit, c.Meaning}
			}
			return rows
		},
		"overview": overview,
		"briefRows": func(cs []CheckRow) [][]string {
			rows := make([][]string, len(cs))
			for i, c := range cs {
				rows[i] = []string{statusCell(c), c.Title, c.Measured, c.Brief, c.Meaning}
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
			out := fmt.Sprintf("![%s](%s)\n\n*Figure %d. %s*\n", escapeMarkdown(f.Alt), f.PNG(), figureNo, escapeMarkdown(f.Caption))
			if len(f.TableRows) > 0 {
				out += "\n" + markdownTable(f.TableHeader, f.TableRows)
			}
			return out
		},
	}
	// checks.md.tmpl defines the parts every report shares.
	t, err := template.New(name).Funcs(funcs).ParseFS(templates.FS, name, "checks.md.tmpl")
	if err != nil {
		return nil, err
	}
	var b bytes.Buffer
	if err := t.Execute(&b, data); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}
