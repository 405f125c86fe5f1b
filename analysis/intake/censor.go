package intake

import (
	"bytes"
	"math"
	"slices"
	"sort"
)

// CensorPolicy says what to do with a cell reported as below or above a
// limit of the method ("<0.05", "> 2000").
type CensorPolicy string

const (
	// CensorFail stops at the first censored cell and names it.
	CensorFail CensorPolicy = "fail"
	// CensorHalf reads "<L" as L/2 (Hornung & Reed 1990).
	CensorHalf CensorPolicy = "half"
	// CensorSqrt2 reads "<L" as L/√2, which Hornung & Reed (1990) prefer
	// when the data are not highly skewed (geometric standard deviation
	// below about 3).
	CensorSqrt2 CensorPolicy = "sqrt2"
)

// CensorPolicies lists the accepted policies, for flag validation and help.
var CensorPolicies = []CensorPolicy{CensorFail, CensorHalf, CensorSqrt2}

// Sides of a censored cell.
const (
	CensoredBelow = "below"
	CensoredAbove = "above"
)

// CensoredCell is one cell read as a limit and replaced by a number: Row
// indexes X's rows (and IDs, Lines), Var indexes Variables. Value is the
// number used in the file's units, before any --transform; the transform
// is applied to it like to any other cell.
type CensoredCell struct {
	Row   int     `json:"row"`
	Var   int     `json:"var"`
	Text  string  `json:"text"`
	Value float64 `json:"value"`
	Side  string  `json:"side"` // CensoredBelow or CensoredAbove
}

// substitute returns the number that stands for a cell at limit on side:
// an upper limit "<L" becomes L/2 or L/√2, a lower limit ">L" stays L (the
// value is at least L; nothing better is known without a model of the tail).
func (c CensorPolicy) substitute(limit float64, side string) float64 {
	if side == CensoredAbove {
		return limit
	}
	if c == CensorSqrt2 {
		return limit / math.Sqrt2
	}
	return limit / 2
}

// limitSign reports whether raw, spaces aside, starts with < or > (a value
// written as a detection limit), and returns the side (cellBelow or
// cellAbove) and the rest of the cell, trimmed.
func limitSign(raw []byte) (side cellKind, rest []byte, ok bool) {
	b := bytes.TrimSpace(raw)
	if len(b) == 0 || (b[0] != '<' && b[0] != '>') {
		return 0, nil, false
	}
	side = cellBelow
	if b[0] == '>' {
		side = cellAbove
	}
	return side, bytes.TrimSpace(b[1:]), true
}

// limitValue judges the number after a limit's sign, read as kind: a
// positive finite limit is the cell's value on that side; a rest that is
// not a number is text (so that "<LOD" gets the advice for text); a limit
// that is infinite, underflows or is not positive is cellBadLimit.
func limitValue(v float64, kind, side cellKind) (float64, cellKind) {
	switch {
	case kind == cellMissing, kind == cellText:
		return 0, cellText
	case kind == cellInfinite, kind == cellUnderflow, v <= 0:
		return v, cellBadLimit
	}
	return v, side
}

// censoredAt is a censored cell as the row parser met it: by line, since
// rows are renumbered later (blank lines, dropped rows, parallel slots).
type censoredAt struct {
	line, k int
	text    string
	value   float64
	side    string
}

// placeCensored turns the cells met while parsing into Table.Censored, by
// row of X (found from its line; cells of dropped rows are left out) and
// by index into the kept candidate variables keep (of p), in row-major
// order.
func placeCensored(cells []censoredAt, lines []int, keep []int, p int) []CensoredCell {
	if len(cells) == 0 {
		return nil
	}
	to := make([]int, p)
	for k := range to {
		to[k] = -1
	}
	for c, k := range keep {
		to[k] = c
	}
	var out []CensoredCell
	for _, c := range cells {
		row, ok := slices.BinarySearch(lines, c.line)
		if !ok || to[c.k] < 0 {
			continue
		}
		out = append(out, CensoredCell{Row: row, Var: to[c.k], Text: c.text, Value: c.value, Side: c.side})
	}
	sort.Slice(out, func(a, b int) bool {
		if out[a].Row != out[b].Row {
			return out[a].Row < out[b].Row
		}
		return out[a].Var < out[b].Var
	})
	return out
}

// CensoredCounts returns, per variable, how many cells were below and above
// their limits.
func (t *Table) CensoredCounts() (below, above []int) {
	below, above = make([]int, len(t.Variables)), make([]int, len(t.Variables))
	for _, c := range t.Censored {
		if c.Var < 0 || c.Var >= len(below) {
			continue
		}
		if c.Side == CensoredAbove {
			above[c.Var]++
		} else {
			below[c.Var]++
		}
	}
	return below, above
}
