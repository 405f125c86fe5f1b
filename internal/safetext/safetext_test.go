package safetext

import "testing"

func TestEscapeAndOneLine(t *testing.T) {
	cases := []struct{ in, escaped, oneLine string }{
		{"plain µ°ä עברית 中文", "plain µ°ä עברית 中文", "plain µ°ä עברית 中文"},
		{"a\nb\r\nc\td", `a\nb\r\nc\td`, "a b  c d"},
		{"bell\a \x1b[31mred", `bell\x07 \x1b[31mred`, `bell\x07 \x1b[31mred`},
		{"osc \x1b]0;title\x07", `osc \x1b]0;title\x07`, `osc \x1b]0;title\x07`},
		{"rtl \u202eevil \u2066x\u2069", `rtl \u202eevil \u2066x\u2069`, `rtl \u202eevil \u2066x\u2069`},
		{"c1 \u009b del \x7f", `c1 \u009b del \x7f`, `c1 \u009b del \x7f`},
		{"bad \xff byte", `bad \xff byte`, `bad \xff byte`},
		{"sep\u2028par\u2029", `sep\u2028par\u2029`, "sep par "},
		{"lrm \u200e kept", "lrm \u200e kept", "lrm \u200e kept"},
	}
	for _, c := range cases {
		if got := Escape(c.in); got != c.escaped {
			t.Errorf("Escape(%q) = %q, want %q", c.in, got, c.escaped)
		}
		if got := OneLine(c.in); got != c.oneLine {
			t.Errorf("OneLine(%q) = %q, want %q", c.in, got, c.oneLine)
		}
	}
}
