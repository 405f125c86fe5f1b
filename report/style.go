package report

import (
	"image/color"
	"math"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The figure style is our own: a white field, thin dark axes, faint
// horizontal guides only, and a palette chosen for pcqc. Its eight colours
// differ in lightness as well as hue, so that they stay apart in greyscale
// and for readers with a colour-vision deficiency, and every group also
// gets its own marker shape, so no figure relies on colour alone.

func rgb(hex uint32) color.RGBA {
	return color.RGBA{R: uint8(hex >> 16), G: uint8(hex >> 8), B: uint8(hex), A: 255}
}

var (
	inkColor      = rgb(0x2B2F36) // axes, text
	guideColor    = rgb(0xE4E6EA) // horizontal guides
	mutedColor    = rgb(0x8A9099) // secondary lines, unflagged points
	trainingColor = rgb(0xC3C8CF) // training samples behind new ones
	accent95      = rgb(0xC9843A) // 95 % limits
	accent99      = rgb(0x9C2F22) // 99 % limits, flagged samples
	mainColor     = rgb(0x1F4E8C) // the observed series
	barColor      = rgb(0x8FB0DB) // bars: light enough for dark whiskers

	// groupPalette, ordered so that neighbours differ most in lightness.
	groupPalette = []color.RGBA{
		rgb(0x1F4E8C), // ink blue, dark
		rgb(0xE0A33A), // ochre, light
		rgb(0x2E8B6E), // pine green, mid
		rgb(0xC25B84), // rose, mid
		rgb(0x4A3F6B), // aubergine, very dark
		rgb(0x8FC1D9), // pale sky, very light
		rgb(0x9B5A1E), // umber, mid-dark
		rgb(0x7A8B8F), // slate, mid-light
	}
	// groupShapes are all filled: hollow marks mean something else in the
	// figures (samples within the limits, training samples behind new
	// ones), so every group keeps to the one convention.
	groupShapes = []draw.GlyphDrawer{
		draw.CircleGlyph{}, draw.PyramidGlyph{}, draw.BoxGlyph{},
		filledGlyph{n: 4, rot: math.Pi / 2, scale: 1.3},              // diamond
		filledGlyph{n: 3, rot: -math.Pi / 2, scale: 1.3},             // triangle pointing down
		filledGlyph{n: 5, rot: math.Pi / 2, scale: 1.5, inner: 0.45}, // star
		crossGlyph{},
		filledGlyph{n: 6, rot: 0, scale: 1.15}, // hexagon
	}
)

// maxColouredGroups is the most groups a figure colours individually;
// beyond it every sample is drawn alike and the legend says why.
const maxColouredGroups = 16

// groupStyle returns the glyph of group g: colour and shape cycle with
// different periods, so the first 8 × 8 combinations are distinct and the
// first 8 groups differ in shape as well as colour (TestGroupStylesDiffer).
func groupStyle(g int) draw.GlyphStyle {
	return draw.GlyphStyle{
		Color:  groupPalette[g%len(groupPalette)],
		Shape:  groupShapes[(g+g/len(groupPalette))%len(groupShapes)],
		Radius: vg.Points(2.6),
	}
}

// Figure sizes: the width of the PDF text column, at two heights.
var (
	figWidth  = vg.Length(16) * vg.Centimeter
	figHeight = vg.Length(10) * vg.Centimeter
	figTall   = vg.Length(10.5) * vg.Centimeter
)

// figureFont is Liberation Sans, the font of the PDF body as well.
var figureFont = font.Font{Typeface: "Liberation", Variant: "Sans"}

func textFont(size float64, bold bool) font.Font {
	f := font.From(figureFont, vg.Points(size))
	if bold {
		f.Weight = xfont.WeightBold
	}
	return f
}

// newPlot returns a plot in the pcqc style.
func newPlot(title, xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	p.BackgroundColor = color.White
	p.Title.Text = title
	p.Title.TextStyle.Font = textFont(10, true)
	p.Title.TextStyle.Color = inkColor
	p.Title.Padding = vg.Points(6)
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.LineStyle.Color = inkColor
		ax.LineStyle.Width = vg.Points(0.6)
		ax.Label.TextStyle.Font = textFont(9, false)
		ax.Label.TextStyle.Color = inkColor
		ax.Tick.Label.Font = textFont(8, false)
		ax.Tick.Label.Color = inkColor
		ax.Tick.LineStyle.Color = inkColor
		ax.Tick.LineStyle.Width = vg.Points(0.5)
		ax.Padding = vg.Points(4)
	}
	p.X.Label.Text, p.Y.Label.Text = xLabel, yLabel
	p.Legend.TextStyle = text.Style{Font: textFont(8, false), Handler: plot.DefaultTextHandler}
	p.Legend.TextStyle.Color = inkColor
	p.Legend.Top = true
	p.Legend.ThumbnailWidth = vg.Points(14)
	p.Legend.Padding = vg.Points(1.5)
	return p
}

func lineStyle(c color.Color, width float64, dashes ...float64) draw.LineStyle {
	ls := draw.LineStyle{Color: c, Width: vg.Points(width)}
	for _, d := range dashes {
		ls.Dashes = append(ls.Dashes, vg.Points(d))
	}
	return ls
}
