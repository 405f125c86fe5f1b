package report

import (
	"strings"
	"testing"
)

// Right-to-left runs are put in visual order as UAX #9 does for a
// left-to-right line (expected orders worked by hand from its rules).
func TestVisualOrder(t *testing.T) {
	cases := []struct{ in, want string }{
		{"plain text", "plain text"},
		{"אבג", "גבא"},
		{"abc אבג def", "abc גבא def"},
		{"אבג דהו", "והד גבא"},
		{"ST01 אבג", "ST01 גבא"},
		{"אבג 123", "123 גבא"},       // W7: digits after R stay in order, placed left
		{"אבג 1.5 דה", "הד 1.5 גבא"}, // W4: 1.5 is one number
		{"אבג 50% דה", "הד 50% גבא"}, // W5: the percent sign stays with it
		{"x (אבג) y", "x (גבא) y"},   // brackets between L and R stay L
		{"אב (גד) הו", "וה (דג) בא"}, // brackets inside R turn round
		{"123 אבג", "123 גבא"},       // digits before R, in L context
		{"אבג…", "גבא…"},             // a trailing neutral stays on the right
		{"מרכז-ST05", "זכרמ-ST05"},   // a neutral between R and L is L
		{"ab□□ □□cd", "ab□□ □□cd"},   // boxes are neutral
	}
	for _, c := range cases {
		if got := string(visualOrder([]rune(c.in))); got != c.want {
			t.Errorf("%q: got %q, want %q", c.in, got, c.want)
		}
	}
}

// Characters the Liberation fonts lack become a box; control characters
// become visible escapes; figure labels are one line.
func TestDrawAndFigureText(t *testing.T) {
	cases := []struct{ in, want string }{
		{"ST01", "ST01"},
		{"a\nb\tc", "a b c"},
		{"\x1b[31m", `\x1b[31m`},
		{"\u202eevil", `\u202eevil`},
		{"محطة", "□□□□"},
		{"Ωmega λ", "Ωmega λ"},
		{"   spaced    out   ", "spaced out"},
		{strings.Repeat("x", 40), strings.Repeat("x", 27) + "…"},
		{"bad \xff byte", `bad \xff byte`},
	}
	for _, c := range cases {
		if got := figureText(c.in, maxLabelRunes); got != c.want {
			t.Errorf("%q: got %q, want %q", c.in, got, c.want)
		}
	}
}

// The PDF's document information holds one line, without the characters
// beyond the Basic Multilingual Plane that fpdf would garble.
func TestMetadataText(t *testing.T) {
	cases := []struct{ in, want string }{
		{"Audit of ST05", "Audit of ST05"},
		{"a\nb", "a b"},
		{"emoji 😀 and 𝔘", "emoji \ufffd and \ufffd"},
		{"תחנה", "תחנה"},
	}
	for _, c := range cases {
		if got := metadataText(c.in); got != c.want {
			t.Errorf("%q: got %q, want %q", c.in, got, c.want)
		}
	}
}
