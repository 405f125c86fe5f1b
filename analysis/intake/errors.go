package intake

import (
	"fmt"
	"pcqc/internal/safetext"
	"strconv"
	"strings"
	"unicode/utf8"
)

// InputError reports a problem with the input table. Like csv.ParseError it
// carries the position of the problem so that the user can find it: the file,
// the 1-based line, the 1-based column (field) number and the column name,
// plus the offending text. Line and Column are 0 when they do not apply.
type InputError struct {
	File   string
	Line   int
	Column int
	Name   string // column name, when known
	Text   string // the offending cell or argument, when there is one
	Reason string
}

// Error formats the error as one line. Every field may hold text from the
// input, so control characters are escaped: a header or cell holding an
// escape sequence must not recolour, retitle or rewrite the user's terminal,
// and a bidirectional override must not reorder what the message says.
func (e *InputError) Error() string {
	var b strings.Builder
	b.WriteString(escapeControls(e.File))
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
		if e.Column > 0 {
			fmt.Fprintf(&b, ":%d", e.Column)
		}
	}
	if e.Name != "" {
		fmt.Fprintf(&b, " (%s)", escapeControls(e.Name))
	}
	b.WriteString(": ")
	b.WriteString(escapeControls(e.Reason))
	if e.Text != "" {
		fmt.Fprintf(&b, " %s", QuoteText(e.Text))
	}
	return b.String()
}

// QuoteText quotes offending text for a one-line message, shortening very
// long cells so that the message stays on one readable line. strconv.Quote
// escapes every character that is not printable (controls, bidirectional
// formatting characters) and every byte that is not UTF-8, as \xNN, so the
// user sees the bytes the file really holds.
func QuoteText(s string) string {
	const max = 60
	n := utf8.RuneCountInString(s)
	if n <= max {
		return strconv.Quote(s)
	}
	cut := 0
	for range max {
		_, size := utf8.DecodeRuneInString(s[cut:])
		cut += size
	}
	return fmt.Sprintf("%s… (%d characters)", strconv.Quote(s[:cut]), n)
}

// escapeControls escapes the characters of s that a terminal would act on
// instead of showing (see internal/safetext), line ends and tabs included,
// so that a message stays one line.
func escapeControls(s string) string { return safetext.Escape(s) }
