package intake

import (
	"fmt"
	"pcqc/internal/safetext"
	"strconv"
	"strings"
	"unicode"
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
	// Sheet, set for a spreadsheet, makes Line the sheet's row and Column
	// its column, written as the spreadsheet writes them: Sheet1!C17.
	Sheet string
}

// Error formats the error as one line. Every field may hold text from the
// input, so control characters are escaped: a header or cell holding an
// escape sequence must not recolour, retitle or rewrite the user's terminal,
// and a bidirectional override must not reorder what the message says.
func (e *InputError) Error() string {
	var b strings.Builder
	b.WriteString(escapeControls(e.File))
	if e.Sheet != "" {
		b.WriteString(": ")
		b.WriteString(escapeControls(CellName(e.Sheet, e.Line, e.Column)))
	} else if e.Line > 0 {
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

// CellName writes a position in a sheet as a spreadsheet does: Sheet1!C17
// for a cell, 'Lab data'!C17 when the sheet's name needs quotes, and
// "Sheet1 row 17" or "Sheet1 column C" when only one of them is known.
func CellName(sheet string, row, col int) string {
	s := sheet
	if strings.ContainsFunc(sheet, func(r rune) bool {
		return !(r == '_' || r == '.' || unicode.IsLetter(r) || unicode.IsDigit(r))
	}) {
		s = "'" + strings.ReplaceAll(sheet, "'", "''") + "'"
	}
	switch {
	case row > 0 && col > 0:
		return s + "!" + ColumnLetters(col) + strconv.Itoa(row)
	case row > 0:
		return s + " row " + strconv.Itoa(row)
	case col > 0:
		return s + " column " + ColumnLetters(col)
	}
	return s
}

// ColumnLetters names a 1-based column as spreadsheets do: A … Z, AA … ZZ,
// AAA and so on.
func ColumnLetters(col int) string {
	var b []byte
	for ; col > 0; col = (col - 1) / 26 {
		b = append([]byte{byte('A' + (col-1)%26)}, b...)
	}
	return string(b)
}
