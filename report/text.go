package report

import (
	"pcqc/internal/safetext"
	"strings"
	"sync"
	"unicode"
	"unicode/utf8"

	"codeberg.org/go-fonts/liberation/liberationmonoregular"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"golang.org/x/image/font/sfnt"
)

// User text — column names, sample ids, group labels, file names, the
// title and author — reaches the report in three ways: through the
// Markdown (escapeMarkdown, codeSpan, codeFence), drawn by fpdf into the
// PDF, and drawn by gonum/plot into the figures. This file holds what all
// of them share: one line of text with every control character made
// visible, and, for the two that draw with the embedded Liberation fonts,
// characters those fonts lack replaced by a box and right-to-left runs put
// in the order in which they are read.

// oneLine returns s as one line of literal text (see internal/safetext).
func oneLine(s string) string { return safetext.OneLine(s) }

// needsEscape reports whether r cannot stand for itself in one line of
// literal text.
func needsEscape(r rune) bool { return safetext.NeedsEscape(r) }

// shorten keeps at most max runes of s, cutting it with an ellipsis.
func shorten(s string, max int) string {
	r := []rune(s)
	if len(r) <= max {
		return s
	}
	return string(r[:max-1]) + "…"
}

// figureText prepares user text for a figure: one line with runs of
// spaces collapsed, at most max runes, as drawText draws it.
func figureText(s string, max int) string {
	return drawText(shorten(strings.Join(strings.Fields(oneLine(s)), " "), max), sansCovers)
}

// drawText prepares one line of text for a drawing with fonts of the given
// coverage (the PDF and the figures): characters the font lacks become a
// box, which keeps the width of the text honest (fpdf and gonum/plot would
// draw them with no width, or not at all), and right-to-left runs are put
// in visual order, since neither fpdf nor gonum/plot reorders text.
func drawText(s string, covers func(rune) bool) string {
	if isASCII(s) {
		return s
	}
	return string(visualOrder([]rune(coverText(s, covers))))
}

// coverText replaces the characters a font lacks by missingGlyph.
func coverText(s string, covers func(rune) bool) string {
	if isASCII(s) {
		return s
	}
	r := []rune(s)
	for i, c := range r {
		if !covers(c) {
			r[i] = missingGlyph
		}
	}
	return string(r)
}

func isASCII(s string) bool {
	for i := 0; i < len(s); i++ {
		if s[i] >= utf8.RuneSelf {
			return false
		}
	}
	return true
}

// missingGlyph stands for a character the embedded fonts cannot show. The
// white square is in Liberation; U+FFFD is not.
const missingGlyph = '□'

// fontCoverage answers whether a font has a glyph for a rune.
type fontCoverage struct {
	ttf  []byte
	once sync.Once
	font *sfnt.Font
	mu   sync.Mutex
	buf  sfnt.Buffer
	seen map[rune]bool
}

func (c *fontCoverage) covers(r rune) bool {
	if r < 0x7f && r >= ' ' {
		return true
	}
	c.once.Do(func() {
		c.font, _ = sfnt.Parse(c.ttf)
		c.seen = map[rune]bool{}
	})
	if c.font == nil {
		return true // cannot tell; let the renderer decide
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	if ok, done := c.seen[r]; done {
		return ok
	}
	gi, err := c.font.GlyphIndex(&c.buf, r)
	ok := err == nil && gi != 0
	c.seen[r] = ok
	return ok
}

var (
	sansCoverage = &fontCoverage{ttf: liberationsansregular.TTF}
	monoCoverage = &fontCoverage{ttf: liberationmonoregular.TTF}
)

// sansCovers and monoCovers tell whether Liberation Sans (the PDF's body
// and the figures) and Liberation Mono (the PDF's code) can show a rune.
func sansCovers(r rune) bool { return sansCoverage.covers(r) }
func monoCovers(r rune) bool { return monoCoverage.covers(r) }

// Bidirectional classes, as far as a left-to-right line of labels needs
// them.
const (
	bidiL  = iota // strong left-to-right, and anything not listed below
	bidiR         // strong right-to-left: Hebrew, Arabic and their kin
	bidiEN        // European digits
	bidiN         // neutral: spaces and punctuation
)

func bidiClass(r rune) int {
	switch {
	case r >= '0' && r <= '9':
		return bidiEN
	case isRTL(r):
		return bidiR
	case unicode.IsSpace(r) || unicode.IsPunct(r) || unicode.IsSymbol(r) || r == missingGlyph:
		return bidiN
	}
	return bidiL
}

// isRTL reports the letters of the right-to-left scripts.
func isRTL(r rune) bool {
	return r >= 0x0590 && r <= 0x08ff || r >= 0xfb1d && r <= 0xfdff || r >= 0xfe70 && r <= 0xfeff ||
		r >= 0x10800 && r <= 0x10fff || r >= 0x1e800 && r <= 0x1efff
}

// visualOrder reorders one line of a left-to-right paragraph for display by
// the Unicode bidirectional algorithm (UAX #9), reduced to what labels
// need: right-to-left letters get level 1; digits that follow them, level
// 2 (rule W7 leaves digits after left-to-right text alone); neutrals
// between two right-to-left items join them (N1), other neutrals stay
// left-to-right (N2); then every run at level ≥ 2, and every run at level
// ≥ 1, is reversed (L2), and brackets inside reversed runs are mirrored
// (L4). Text without right-to-left letters is returned as it is.
func visualOrder(r []rune) []rune {
	class := make([]int, len(r))
	rtl := false
	for i, c := range r {
		class[i] = bidiClass(c)
		rtl = rtl || class[i] == bidiR
	}
	if !rtl {
		return r
	}
	level := make([]int, len(r))
	strong := bidiL // the last strong direction seen, for digits (W7)
	for i, c := range class {
		switch c {
		case bidiR:
			level[i], strong = 1, bidiR
		case bidiL:
			strong = bidiL
		case bidiEN:
			if strong == bidiR {
				level[i] = 2
			}
		}
	}
	// A number keeps its separators and signs with it: one of .,:/+−
	// between two digits (W4), and %, °, # or a currency sign next to a
	// digit (W5), take the digits' level.
	for i := range r {
		if class[i] != bidiN || level[i] != 0 {
			continue
		}
		between := i > 0 && i+1 < len(r) && class[i-1] == bidiEN && class[i+1] == bidiEN && level[i-1] == level[i+1] && strings.ContainsRune(".,:/+-", r[i])
		if between || isNumberSuffix(r[i]) && (i > 0 && class[i-1] == bidiEN || i+1 < len(r) && class[i+1] == bidiEN) {
			n := i - 1
			if n < 0 || class[n] != bidiEN {
				n = i + 1
			}
			class[i], level[i] = bidiEN, level[n]
		}
	}
	// Neutrals between two right-to-left items (digits in right-to-left
	// context count as such) take level 1.
	for i := 0; i < len(r); {
		if class[i] != bidiN {
			i++
			continue
		}
		j := i
		for j < len(r) && class[j] == bidiN {
			j++
		}
		if i > 0 && j < len(r) && level[i-1] > 0 && level[j] > 0 {
			for k := i; k < j; k++ {
				level[k] = 1
			}
		}
		i = j
	}
	out := append([]rune(nil), r...)
	for _, at := range []int{2, 1} {
		for i := 0; i < len(out); {
			if level[i] < at {
				i++
				continue
			}
			j := i
			for j < len(out) && level[j] >= at {
				j++
			}
			for a, b := i, j-1; a < b; a, b = a+1, b-1 {
				out[a], out[b] = out[b], out[a]
				level[a], level[b] = level[b], level[a]
			}
			i = j
		}
	}
	for i, c := range out {
		if level[i]%2 == 1 {
			if m, ok := mirrored[c]; ok {
				out[i] = m
			}
		}
	}
	return out
}

// isNumberSuffix reports the terminators that stay with a number (UAX #9
// class ET, in part).
func isNumberSuffix(r rune) bool {
	return r == '%' || r == '°' || r == '#' || r == '‰' || unicode.Is(unicode.Sc, r)
}

// mirrored pairs the brackets that turn round in right-to-left text.
var mirrored = map[rune]rune{'(': ')', ')': '(', '[': ']', ']': '[', '{': '}', '}': '{', '<': '>', '>': '<', '«': '»', '»': '«'}
