package report

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Small plotters of our own, for the few marks gonum/plot does not draw the
// way the report needs.

// guides draws faint horizontal lines at the major Y ticks, behind the data.
type guides struct{}

func (guides) Plot(c draw.Canvas, plt *plot.Plot) {
	_, trY := plt.Transforms(&c)
	ls := lineStyle(guideColor, 0.5)
	for _, t := range plt.Y.Tick.Marker.Ticks(plt.Y.Min, plt.Y.Max) {
		if t.IsMinor() {
			continue
		}
		y := trY(t.Value)
		c.StrokeLine2(ls, c.Min.X, y, c.Max.X, y)
	}
}

// refLine is a vertical or horizontal reference line across the data area.
// Its name is placed by the figure's labeller (labeller.addRef), which
// keeps it clear of the other names and inside the data area.
type refLine struct {
	vertical bool
	at       float64
	style    draw.LineStyle
	label    string
}

func (r refLine) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, trY := plt.Transforms(&c)
	if r.vertical {
		x := trX(r.at)
		c.StrokeLine2(r.style, x, c.Min.Y, x, c.Max.Y)
		return
	}
	y := trY(r.at)
	c.StrokeLine2(r.style, c.Min.X, y, c.Max.X, y)
}

func (r refLine) DataRange() (xmin, xmax, ymin, ymax float64) {
	if r.vertical {
		return r.at, r.at, math.Inf(1), math.Inf(-1)
	}
	return math.Inf(1), math.Inf(-1), r.at, r.at
}

func (r refLine) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	c.StrokeLine2(r.style, c.Min.X, y, c.Max.X, y)
}

// secondAxis draws a right-hand axis for a series that was scaled onto the
// left axis: value v on it sits at v·scale in left-axis units.
type secondAxis struct {
	scale float64
	ticks []float64
	unit  string
	label string
}

func (a secondAxis) Plot(c draw.Canvas, plt *plot.Plot) {
	_, trY := plt.Transforms(&c)
	x := c.Max.X
	ls := lineStyle(inkColor, 0.6)
	c.StrokeLine2(ls, x, c.Min.Y, x, c.Max.Y)
	ts := draw.TextStyle{Color: inkColor, Font: textFont(8, false), Handler: plot.DefaultTextHandler, XAlign: text.XLeft, YAlign: text.YCenter}
	for _, t := range a.ticks {
		y := trY(t * a.scale)
		c.StrokeLine2(lineStyle(inkColor, 0.5), x, y, x+vg.Points(3), y)
		c.FillText(ts, vg.Point{X: x + vg.Points(4), Y: y}, fmt.Sprintf("%g%s", t, a.unit))
	}
	ls2 := draw.TextStyle{Color: inkColor, Font: textFont(9, false), Handler: plot.DefaultTextHandler, XAlign: text.XCenter, YAlign: text.YTop, Rotation: -math.Pi / 2}
	c.FillText(ls2, vg.Point{X: x + vg.Points(38), Y: (c.Min.Y + c.Max.Y) / 2}, a.label)
}

// hbars draws horizontal bars from 0 to each value at rows 0…n−1, with
// optional interval whiskers; bars whose interval includes 0 are drawn
// hollow, so that instability shows without colour.
type hbars struct {
	values   []float64
	low, hi  []float64 // nil without intervals
	unstable []bool
	fill     color.Color
}

func (h hbars) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, trY := plt.Transforms(&c)
	half := (trY(1) - trY(0)) * 0.32
	for i, v := range h.values {
		y := trY(float64(i))
		x0, x1 := trX(0), trX(v)
		pts := []vg.Point{{X: x0, Y: y - half}, {X: x1, Y: y - half}, {X: x1, Y: y + half}, {X: x0, Y: y + half}}
		outline := lineStyle(mainColor, 0.8)
		if h.unstable == nil || !h.unstable[i] {
			c.FillPolygon(h.fill, pts)
		} else {
			c.FillPolygon(color.White, pts)
		}
		c.StrokeLines(outline, append(pts, pts[0]))
		if h.low != nil {
			ws := lineStyle(inkColor, 0.7)
			lo, hi := trX(h.low[i]), trX(h.hi[i])
			c.StrokeLine2(ws, lo, y, hi, y)
			c.StrokeLine2(ws, lo, y-half/2, lo, y+half/2)
			c.StrokeLine2(ws, hi, y-half/2, hi, y+half/2)
		}
	}
	zero := trX(0)
	c.StrokeLine2(lineStyle(inkColor, 0.6), zero, c.Min.Y, zero, c.Max.Y)
}

func (h hbars) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = 0, 0
	for i, v := range h.values {
		xmin, xmax = math.Min(xmin, v), math.Max(xmax, v)
		if h.low != nil {
			xmin, xmax = math.Min(xmin, h.low[i]), math.Max(xmax, h.hi[i])
		}
	}
	return xmin, xmax, -0.6, float64(len(h.values)) - 0.4
}

// arrows draws lines from the origin to each point, with a head at the
// tip; the figure's labeller names them.
type arrows struct {
	x, y []float64
}

func (a arrows) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, trY := plt.Transforms(&c)
	ls := lineStyle(accent99, 0.8)
	o := vg.Point{X: trX(0), Y: trY(0)}
	for i := range a.x {
		t := vg.Point{X: trX(a.x[i]), Y: trY(a.y[i])}
		c.StrokeLine2(ls, o.X, o.Y, t.X, t.Y)
		for _, h := range arrowHead(o, t) {
			c.StrokeLine2(ls, t.X, t.Y, h.X, h.Y)
		}
	}
}

// DataRange leaves room beyond the tips for the labels.
func (a arrows) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax, ymin, ymax = 0, 0, 0, 0
	for i := range a.x {
		xmin, xmax = math.Min(xmin, a.x[i]), math.Max(xmax, a.x[i])
		ymin, ymax = math.Min(ymin, a.y[i]), math.Max(ymax, a.y[i])
	}
	padX, padY := 0.35*(xmax-xmin), 0.15*(ymax-ymin)
	return xmin - padX, xmax + padX, ymin - padY, ymax + padY
}

// filledGlyph is a filled polygon marker: a regular polygon of n corners
// (the first at angle rot, in radians from the right), or, with inner > 0,
// a star whose inner corners sit at inner times the radius. gonum/plot has
// three filled markers only; the groups of a score plot need eight shapes
// that all keep the one convention, filled.
type filledGlyph struct {
	n     int
	rot   float64
	scale float64 // radius relative to the style's, to match the circle's weight
	inner float64
}

func (g filledGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := float64(sty.Radius) * g.scale
	corners := g.n
	if g.inner > 0 {
		corners *= 2
	}
	var p vg.Path
	for k := 0; k < corners; k++ {
		rk := r
		if g.inner > 0 && k%2 == 1 {
			rk = r * g.inner
		}
		th := g.rot + 2*math.Pi*float64(k)/float64(corners)
		q := vg.Point{X: pt.X + vg.Length(rk*math.Cos(th)), Y: pt.Y + vg.Length(rk*math.Sin(th))}
		if k == 0 {
			p.Move(q)
		} else {
			p.Line(q)
		}
	}
	p.Close()
	c.Fill(p)
}

// crossGlyph is a filled Greek cross: two bars a third of its width thick.
type crossGlyph struct{}

func (crossGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r, t := sty.Radius*1.1, sty.Radius*0.4
	var p vg.Path
	for k, q := range [][2]vg.Length{{-t, r}, {t, r}, {t, t}, {r, t}, {r, -t}, {t, -t}, {t, -r}, {-t, -r}, {-t, -t}, {-r, -t}, {-r, t}, {-t, t}} {
		if k == 0 {
			p.Move(vg.Point{X: pt.X + q[0], Y: pt.Y + q[1]})
		} else {
			p.Line(vg.Point{X: pt.X + q[0], Y: pt.Y + q[1]})
		}
	}
	p.Close()
	c.Fill(p)
}
