package analysis

import (
	"fmt"
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
		fmt.Fprintf(&b, " %s", quoteText(e.Text))
	}
	return b.String()
}

// quoteText quotes offending text for a one-line message, shortening very
// long cells so that the message stays on one readable line. strconv.Quote
// escapes every character that is not printable (controls, bidirectional
// formatting characters) and every byte that is not UTF-8, as \xNN, so the
// user sees the bytes the file really holds.
func quoteText(s string) string {
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

// escapeControls escapes, Go style, the characters of s that a terminal
// would act on instead of showing: C0 controls (tab and line ends included,
// so that a message stays one line), DEL, C1 controls, the bidirectional
// embedding, override and isolate controls, and bytes that are not UTF-8.
// Everything else, accented letters included, is kept as it is.
func escapeControls(s string) string {
	clean := true
	for _, r := range s {
		if mustEscape(r) {
			clean = false
			break
		}
	}
	if clean {
		return s
	}
	var b strings.Builder
	for i := 0; i < len(s); {
		r, size := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && size == 1:
			fmt.Fprintf(&b, `\x%02x`, s[i])
		case r == '\t':
			b.WriteString(`\t`)
		case r == '\n':
			b.WriteString(`\n`)
		case r == '\r':
			b.WriteString(`\r`)
		case r < 0x80 && mustEscape(r):
			fmt.Fprintf(&b, `\x%02x`, r)
		case mustEscape(r):
			fmt.Fprintf(&b, `\u%04x`, r)
		default:
			b.WriteString(s[i : i+size])
		}
		i += size
	}
	return b.String()
}

// mustEscape reports whether r is a character escapeControls escapes. A
// byte that is not UTF-8 decodes as utf8.RuneError, which is escaped too.
func mustEscape(r rune) bool {
	switch {
	case r < 0x20, r == 0x7f, r >= 0x80 && r <= 0x9f:
		return true
	case r >= 0x202a && r <= 0x202e, r >= 0x2066 && r <= 0x2069:
		return true
	}
	return r == utf8.RuneError
}
