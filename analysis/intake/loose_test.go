package intake

import (
	"testing"
)

// Printed decimals count the digits after the point of the mantissa,
// shifted by the exponent: the unit of the last printed digit of 1.234e-05
// is 1e-8.
func TestPrintedDecimals(t *testing.T) {
	cases := []struct {
		cell string
		want int
	}{
		{"0.536", 3},
		{"-0.5", 1},
		{"12", 0},
		{"0", 0},
		{"1.234e-05", 8},
		{"1.234E-05", 8},
		{"-5.359e-01", 4},
		{"5e-324", 324},
		{"1.5e+03", 0},
		{"1.2345e2", 2},
		{"1e-99999999999999999999", MaxDecimals},
		{"1e99999999999999999999", 0},
		{"0,25", 2},
		{"2,5e-3", 4},
		{"0x1.8p1", 0},
		{" +0.125 ", 3},
	}
	for _, c := range cases {
		if got := PrintedDecimals(c.cell); got != c.want {
			t.Errorf("PrintedDecimals(%q) = %d, want %d", c.cell, got, c.want)
		}
	}
	if got := Decimals([]string{"0.5", "1.234e-05", "2"}); got != 8 {
		t.Errorf("decimals: %d, want the most, 8", got)
	}
}

// Ignored items give one note, naming at most three.
func TestIgnoredNote(t *testing.T) {
	cases := []struct {
		items []string
		want  string
	}{
		{[]string{`"a" (line 2)`}, `row "a" (line 2) names no data variable and was ignored`},
		{[]string{`"a"`, `"b"`}, `2 rows name no data variable and were ignored: "a", "b"`},
		{[]string{`"a"`, `"b"`, `"c"`, `"d"`, `"e"`}, `5 rows name no data variable and were ignored, e.g. "a", "b", "c"`},
	}
	for _, c := range cases {
		if got := IgnoredNote(c.items, "row", "rows", "names no data variable", "name no data variable"); got != c.want {
			t.Errorf("%v: %q, want %q", c.items, got, c.want)
		}
	}
}
