// Package safetext makes text from users' files safe to show: on a
// terminal, where control characters would drive it (ESC and OSC
// sequences) and bidirectional controls would silently reorder a line,
// and in reports, where a line break would end a table row or a heading.
//
// It escapes, Go style, exactly these characters and keeps everything
// else, accented letters and every script included:
//
//   - C0 controls, DEL and C1 controls (Unicode category Cc);
//   - the line and paragraph separators U+2028 and U+2029;
//   - the explicit bidirectional embeddings, overrides and isolates
//     (U+202A–U+202E, U+2066–U+2069); the implicit marks LRM and RLM are
//     kept, since they only resolve neutral characters;
//   - bytes that are not UTF-8, as \xNN.
package safetext

import (
	"fmt"
	"strings"
	"unicode"
	"unicode/utf8"
)

// NeedsEscape reports whether r is escaped (see the package doc).
// utf8.RuneError, which stands for a byte that is not UTF-8, is not: such
// bytes are found while decoding.
func NeedsEscape(r rune) bool {
	return unicode.IsControl(r) || r == '\u2028' || r == '\u2029' || IsBidiControl(r)
}

// IsBidiControl reports the explicit embeddings, overrides and isolates
// (LRE, RLE, PDF, LRO, RLO; LRI, RLI, FSI, PDI).
func IsBidiControl(r rune) bool {
	return r >= '\u202a' && r <= '\u202e' || r >= '\u2066' && r <= '\u2069'
}

// Clean reports whether s is valid UTF-8 and holds nothing to escape.
func Clean(s string) bool { return utf8.ValidString(s) && !strings.ContainsFunc(s, NeedsEscape) }

// Escape returns s with every character of the package doc escaped: line
// breaks as \n and \r, tabs as \t, other ASCII controls and bad bytes as
// \xNN, the rest as \uNNNN. The result is one line.
func Escape(s string) string { return escape(s, false) }

// OneLine returns s as one line of literal text: line breaks, tabs, vertical
// tabs, form feeds and the Unicode line and paragraph separators become
// spaces; everything else is escaped as by Escape.
func OneLine(s string) string { return escape(s, true) }

func escape(s string, breaksAsSpace bool) string {
	if Clean(s) {
		return s
	}
	var b strings.Builder
	for i := 0; i < len(s); {
		r, size := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && size == 1:
			fmt.Fprintf(&b, `\x%02x`, s[i])
		case breaksAsSpace && (r == '\n' || r == '\r' || r == '\t' || r == '\v' || r == '\f' || r == '\u2028' || r == '\u2029'):
			b.WriteByte(' ')
		case r == '\t':
			b.WriteString(`\t`)
		case r == '\n':
			b.WriteString(`\n`)
		case r == '\r':
			b.WriteString(`\r`)
		case r < 0x80 && NeedsEscape(r):
			fmt.Fprintf(&b, `\x%02x`, r)
		case NeedsEscape(r):
			fmt.Fprintf(&b, `\u%04x`, r)
		default:
			b.WriteString(s[i : i+size])
		}
		i += size
	}
	return b.String()
}
