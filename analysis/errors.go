package analysis

import (
	"fmt"
	"strings"
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

func (e *InputError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
		if e.Column > 0 {
			fmt.Fprintf(&b, ":%d", e.Column)
		}
	}
	if e.Name != "" {
		fmt.Fprintf(&b, " (%s)", e.Name)
	}
	b.WriteString(": ")
	b.WriteString(e.Reason)
	if e.Text != "" {
		fmt.Fprintf(&b, " %s", quoteText(e.Text))
	}
	return b.String()
}

// quoteText quotes offending text for a one-line message, shortening very
// long cells so that the message stays on one readable line.
func quoteText(s string) string {
	const max = 60
	r := []rune(s)
	if len(r) > max {
		return fmt.Sprintf("%q… (%d characters)", string(r[:max]), len(r))
	}
	return fmt.Sprintf("%q", s)
}
