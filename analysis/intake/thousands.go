package intake

import (
	"bytes"
	"fmt"
	"strings"
)

// checkMarks refuses option values that would make cells ambiguous: a
// thousands separator that is the decimal mark, and a comment character
// that can begin a number or a quoted field (a line "-3,4" must stay a
// row). The field separator is checked once it is known (see open).
func (r *tableReader) checkMarks() error {
	o := r.opt
	if o.Skip < 0 {
		return r.fail(0, 0, "", "", fmt.Sprintf("--skip %d: give the number of lines before the header, 0 or more", o.Skip))
	}
	switch o.Thousands {
	case 0, ',', '.', ' ', '\'':
	default:
		return r.fail(0, 0, "", "", fmt.Sprintf("--thousands %q: use , . ' or space", o.Thousands))
	}
	if o.Thousands != 0 && o.Thousands == o.Decimal {
		return r.fail(0, 0, "", "", fmt.Sprintf("--thousands %c is also the decimal mark; give --decimal comma with --thousands . (or the reverse)", o.Thousands))
	}
	if c := o.Comment; c != 0 {
		if reason := badCommentChar(c, o.Decimal, o.Thousands); reason != "" {
			return r.fail(0, 0, "", "", fmt.Sprintf("--comment %q: %s", c, reason))
		}
	}
	return nil
}

// badCommentChar says why c cannot mark comment lines, or returns "".
func badCommentChar(c, decimal, thousands byte) string {
	switch {
	case c >= '0' && c <= '9', c == '-', c == '+', c == '.', c == decimal:
		return "a number can begin with it; use a character such as # or !"
	case c >= 'a' && c <= 'z', c >= 'A' && c <= 'Z':
		return "a name or label can begin with a letter; use a character such as # or !"
	case c == '"':
		return "quoted fields begin with it; use a character such as # or !"
	case c == thousands:
		return "it is the thousands separator; use a character such as # or !"
	case c <= ' ' || c >= 0x7f:
		return "use a visible ASCII character such as # or !"
	}
	return ""
}

// spaces a --thousands space stands for: the space, the no-break space and
// the narrow no-break space (which French and SI typography use).
var groupSpaces = []string{" ", "\u00a0", "\u202f"}

// stripGroups removes the thousands separator sep from a number written
// in well-formed groups: a first group of one to three digits, then groups
// of exactly three, all before the decimal mark and any exponent
// ("1,234,567.5"). It appends the result to buf. grouped says a separator
// was removed; ok is false for a cell holding the separator elsewhere
// ("1,23,4", "1234,567", "0.123,4"), which is then not a number: stripping
// a separator from a misplaced position would change the value silently.
func stripGroups(raw []byte, sep, decimal byte, buf []byte) (out []byte, grouped, ok bool) {
	t := string(bytes.TrimSpace(raw))
	if sep == ' ' {
		for _, sp := range groupSpaces[1:] {
			t = strings.ReplaceAll(t, sp, " ")
		}
	}
	if strings.IndexByte(t, sep) < 0 {
		return raw, false, true
	}
	sign := ""
	if t != "" && (t[0] == '-' || t[0] == '+') {
		sign, t = t[:1], t[1:]
	}
	intEnd := strings.IndexAny(t, string(decimal)+"eE")
	if intEnd < 0 {
		intEnd = len(t)
	}
	if strings.IndexByte(t[intEnd:], sep) >= 0 {
		return raw, false, false
	}
	groups := strings.Split(t[:intEnd], string(sep))
	for i, g := range groups {
		if (i == 0 && (len(g) < 1 || len(g) > 3)) || (i > 0 && len(g) != 3) || !allDigits(g) {
			return raw, false, false
		}
	}
	buf = append(buf, sign...)
	buf = append(buf, strings.Join(groups, "")...)
	buf = append(buf, t[intEnd:]...)
	return buf, true, true
}

func allDigits(s string) bool {
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return false
		}
	}
	return true
}

// ThousandsName writes a --thousands value as the flag takes it.
func ThousandsName(c byte) string {
	if c == ' ' {
		return "space"
	}
	return string(c)
}

// groupingAdvice is the advice for a cell that looks like a number with
// digit groups (see looksGrouped): the --thousands option that reads it,
// with --decimal comma when the last mark is a comma after points
// ("1.234,5").
func (rp *rowParser) groupingAdvice(t string) string {
	if rp.thousands != 0 {
		return fmt.Sprintf("cannot read as a number (digits grouped irregularly for --thousands %s: a first group of 1 to 3 digits, then groups of exactly 3, before the decimal mark):", ThousandsName(rp.thousands))
	}
	i := strings.IndexAny(t, ",. '\u00a0\u202f")
	sep := t[i]
	if sep >= 0x80 {
		sep = ' '
	}
	advice := "--thousands " + ThousandsName(sep)
	if sep == '\'' {
		advice = `--thousands "'"`
	}
	if last := strings.LastIndexAny(t, ",."); last >= 0 && t[last] != sep && t[last] == ',' && rp.decimal != ',' {
		advice += " --decimal comma"
	}
	return fmt.Sprintf("cannot read as a number (thousands separators? give %s to read them):", advice)
}
