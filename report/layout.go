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

// The figures' text labels — sample names, variable names at arrow tips,
// the names of limit lines — are placed by the labeller below rather than
// at a fixed offset, so that they never cover one another, an arrow tip
// or the legend. Every measure is in the figure's own canvas units
// (points), with the text extents gonum/plot itself uses to draw, and what
// was put where is kept in a figLayout that tests read back.

// figLayout is what one drawing of a figure put where, in points from the
// lower left corner of the whole figure.
type figLayout struct {
	Canvas vg.Rectangle // the whole figure
	Data   vg.Rectangle // the data area inside the axes
	Labels []layoutLabel
	Tips   []vg.Rectangle // arrow-head markers
	Points []layoutPoint  // drawn data points
	Legend vg.Rectangle   // empty when the figure has no legend
}

// layoutLabel is one text label and the box its text fills.
type layoutLabel struct {
	Text string
	Box  vg.Rectangle
}

// layoutPoint is a data point's centre and its glyph's radius.
type layoutPoint struct {
	At vg.Point
	R  vg.Length
}

// overlap reports whether two rectangles share more than an edge.
func overlap(a, b vg.Rectangle) bool {
	return a.Min.X < b.Max.X && b.Min.X < a.Max.X && a.Min.Y < b.Max.Y && b.Min.Y < a.Max.Y
}

func empty(r vg.Rectangle) bool { return r.Max.X <= r.Min.X || r.Max.Y <= r.Min.Y }

// inside reports whether a lies within b.
func inside(a, b vg.Rectangle) bool {
	return a.Min.X >= b.Min.X && a.Max.X <= b.Max.X && a.Min.Y >= b.Min.Y && a.Max.Y <= b.Max.Y
}

// glyphBox is the square a point's glyph fills.
func (p layoutPoint) box() vg.Rectangle {
	return vg.Rectangle{Min: vg.Point{X: p.At.X - p.R, Y: p.At.Y - p.R}, Max: vg.Point{X: p.At.X + p.R, Y: p.At.Y + p.R}}
}

// problems lists what a reader would find wrong with the layout: labels
// covering one another or an arrow tip, a label leaving the figure, and a
// legend covering a data point. An empty list is a clean layout.
func (l figLayout) problems() []string {
	var out []string
	for i, a := range l.Labels {
		if !inside(a.Box, l.Canvas) {
			out = append(out, fmt.Sprintf("label %q leaves the figure", a.Text))
		}
		for _, b := range l.Labels[i+1:] {
			if overlap(a.Box, b.Box) {
				out = append(out, fmt.Sprintf("labels %q and %q overlap", a.Text, b.Text))
			}
		}
		for _, t := range l.Tips {
			if overlap(a.Box, t) {
				out = append(out, fmt.Sprintf("label %q covers an arrow tip", a.Text))
				break
			}
		}
	}
	if !empty(l.Legend) {
		for _, p := range l.Points {
			if overlap(l.Legend, p.box()) {
				out = append(out, fmt.Sprintf("the legend covers the data point at (%.1f, %.1f)", p.At.X, p.At.Y))
			}
		}
	}
	return out
}

// labeller places a figure's labels when it is drawn: first the names of
// the limit lines, then the names of points in order of priority, each in
// the first free place of a ring of candidates around its anchor.
type labeller struct {
	refs   []refLabel
	names  []pointLabel
	points []dataPoint
	arrows []dataArrow
	lay    figLayout
	// placed is how many names were drawn the last time. Naming stops at
	// the first name that finds no room, so that the names drawn are
	// always the first ones in priority order and the caption can say so.
	placed int
	// note, when set, says in the caption what the names mean; it is given
	// the number of names drawn.
	note func(named int) string
}

type refLabel struct {
	vertical bool
	at       float64
	text     string
	color    color.Color
}

type pointLabel struct {
	x, y    float64
	text    string
	color   color.Color
	gap     vg.Length // the anchor's glyph radius: the label keeps clear of it
	outward bool      // an arrow's name: first try beyond the tip
}

type dataPoint struct {
	x, y float64
	r    vg.Length
}

type dataArrow struct{ x, y float64 }

// addPoints records drawn points, which names avoid where they can and
// the legend must never cover.
func (lb *labeller) addPoints(x, y []float64, r vg.Length) {
	for i := range x {
		if isFinite(x[i]) && isFinite(y[i]) {
			lb.points = append(lb.points, dataPoint{x[i], y[i], r})
		}
	}
}

// addRef draws a limit line on p and gives it a name the labeller places.
func (lb *labeller) addRef(p *plot.Plot, r refLine) {
	if !isFinite(r.at) {
		return
	}
	if r.label != "" {
		lb.refs = append(lb.refs, refLabel{vertical: r.vertical, at: r.at, text: r.label, color: r.style.Color})
	}
	r.label = ""
	p.Add(r)
}

// nameStyle is the text style of every placed label.
func nameStyle(c color.Color, size float64) draw.TextStyle {
	return draw.TextStyle{Color: c, Font: textFont(size, false), Handler: plot.DefaultTextHandler, XAlign: text.XLeft, YAlign: text.YBottom}
}

// arrowHead returns the two ends of the strokes of an arrow head at the
// tip t of an arrow from o.
func arrowHead(o, t vg.Point) [2]vg.Point {
	ang := math.Atan2(float64(t.Y-o.Y), float64(t.X-o.X))
	var h [2]vg.Point
	for k, d := range []float64{0.45, -0.45} {
		h[k] = vg.Point{X: t.X - vg.Points(5)*vg.Length(math.Cos(ang+d)), Y: t.Y - vg.Points(5)*vg.Length(math.Sin(ang+d))}
	}
	return h
}

// tipBox is the box the arrow head at t fills.
func tipBox(o, t vg.Point) vg.Rectangle {
	h := arrowHead(o, t)
	r := vg.Rectangle{Min: t, Max: t}
	for _, p := range h {
		r.Min.X, r.Min.Y = min(r.Min.X, p.X), min(r.Min.Y, p.Y)
		r.Max.X, r.Max.Y = max(r.Max.X, p.X), max(r.Max.Y, p.Y)
	}
	return r
}

// place draws the labels of a plot whose data area is dc inside the figure
// c, keeping clear of legend, and records the layout.
func (lb *labeller) place(c, dc draw.Canvas, trX, trY func(float64) vg.Length, legend vg.Rectangle) {
	lb.lay = figLayout{Canvas: c.Rectangle, Data: dc.Rectangle, Legend: legend}
	lay := &lb.lay
	for _, p := range lb.points {
		at := vg.Point{X: trX(p.x), Y: trY(p.y)}
		if dc.Contains(at) {
			lay.Points = append(lay.Points, layoutPoint{At: at, R: p.r})
		}
	}
	origin := vg.Point{X: trX(0), Y: trY(0)}
	// Lines a name should not sit across where it can help it: the arrows'
	// shafts and the limit lines.
	var shafts [][2]vg.Point
	for _, r := range lb.refs {
		if r.vertical {
			x := trX(r.at)
			shafts = append(shafts, [2]vg.Point{{X: x, Y: dc.Min.Y}, {X: x, Y: dc.Max.Y}})
		} else {
			y := trY(r.at)
			shafts = append(shafts, [2]vg.Point{{X: dc.Min.X, Y: y}, {X: dc.Max.X, Y: y}})
		}
	}
	for _, a := range lb.arrows {
		t := vg.Point{X: trX(a.x), Y: trY(a.y)}
		lay.Tips = append(lay.Tips, tipBox(origin, t))
		shafts = append(shafts, [2]vg.Point{origin, t})
	}
	hard := func(b vg.Rectangle, area vg.Rectangle) bool {
		if !inside(b, area) || (!empty(legend) && overlap(b, legend)) {
			return false
		}
		for _, l := range lay.Labels {
			if overlap(b, l.Box) {
				return false
			}
		}
		for _, t := range lay.Tips {
			if overlap(b, t) {
				return false
			}
		}
		return true
	}
	soft := func(b vg.Rectangle) int {
		n := 0
		for _, p := range lay.Points {
			if overlap(b, p.box()) {
				n++
			}
		}
		for _, s := range shafts {
			if segmentCrosses(s[0], s[1], b) {
				n++
			}
		}
		return n
	}
	put := func(txt string, ts draw.TextStyle, b vg.Rectangle) {
		r := ts.Rectangle(txt)
		c.FillText(ts, vg.Point{X: b.Min.X - r.Min.X, Y: b.Min.Y - r.Min.Y}, txt)
		lay.Labels = append(lay.Labels, layoutLabel{Text: txt, Box: b})
	}

	// Limit lines first: each must be named, so its name moves along its
	// line, or to the line's other side, until it is free, and stays in
	// the data area even for a line at the area's edge.
	pad := vg.Points(2)
	for _, r := range lb.refs {
		ts := nameStyle(r.color, 7)
		size := ts.Rectangle(r.text).Size()
		var cands []vg.Rectangle
		if r.vertical {
			x := trX(r.at)
			for k := 0; k < 12; k++ {
				top := dc.Max.Y - pad - vg.Length(k)*(size.Y+pad)
				for _, left := range []vg.Length{x + pad, x - pad - size.X} {
					left = clampLen(left, dc.Min.X+pad, dc.Max.X-pad-size.X)
					cands = append(cands, vg.Rectangle{Min: vg.Point{X: left, Y: top - size.Y}, Max: vg.Point{X: left + size.X, Y: top}})
				}
			}
		} else {
			y := trY(r.at)
			for k := 0; k < 12; k++ {
				right := dc.Max.X - pad - vg.Length(k)*(size.X+3*pad)
				for _, bottom := range []vg.Length{y + pad/2, y - pad/2 - size.Y} {
					bottom = clampLen(bottom, dc.Min.Y+pad, dc.Max.Y-pad-size.Y)
					cands = append(cands, vg.Rectangle{Min: vg.Point{X: right - size.X, Y: bottom}, Max: vg.Point{X: right, Y: bottom + size.Y}})
				}
			}
		}
		best, bestCost := -1, math.MaxInt
		for k, b := range cands {
			if !hard(b, dc.Rectangle) {
				continue
			}
			// A covered point costs as much as moving one step along.
			if cost := k + 2*soft(b); cost < bestCost {
				best, bestCost = k, cost
			}
		}
		if best < 0 {
			// No free place in the data area: the figure's margin.
			for k, b := range cands {
				if hard(b, c.Rectangle) {
					best = k
					break
				}
			}
		}
		if best >= 0 {
			put(r.text, ts, cands[best])
		}
	}

	// Point names, in priority order, each at the cheapest free place of
	// rings of candidates around its anchor; far places get a leader line.
	lb.placed = 0
	rings := []vg.Length{1.5, 5, 10, 16, 24, 34}
	const dirs = 16
	for _, n := range lb.names {
		ts := nameStyle(n.color, 6.5)
		if n.outward {
			ts.Font = textFont(7, false)
		}
		size := ts.Rectangle(n.text).Size()
		a := vg.Point{X: trX(n.x), Y: trY(n.y)}
		first := math.Pi / 4 // above right, where a reader looks first
		if n.outward {
			first = math.Atan2(float64(a.Y-origin.Y), float64(a.X-origin.X))
		}
		var best vg.Rectangle
		bestRing, bestCost := -1, math.Inf(1)
		for ri, d := range rings {
			for k := 0; k < dirs; k++ {
				// Directions alternate either side of the first one.
				step := (k + 1) / 2
				if k%2 == 0 {
					step = -step
				}
				th := first + float64(step)*2*math.Pi/dirs
				b := ringBox(a, n.gap+vg.Points(float64(d)), th, size)
				if !hard(b, dc.Rectangle) {
					continue
				}
				cost := 3*float64(ri) + 0.15*float64(k) + 4*float64(soft(b))
				if cost < bestCost {
					best, bestRing, bestCost = b, ri, cost
				}
			}
		}
		if bestRing < 0 {
			break // see placed: the caption counts only the names drawn
		}
		if bestRing >= 2 {
			leader(c, a, n.gap, best, n.color)
		}
		put(n.text, ts, best)
		lb.placed++
	}
}

// ringBox is the box of a text of the given size set at distance d from
// anchor a in direction th, its near edge or corner facing the anchor.
func ringBox(a vg.Point, d vg.Length, th float64, size vg.Point) vg.Rectangle {
	ux, uy := math.Cos(th), math.Sin(th)
	sx, sy := clampF(ux/0.38, -1, 1), clampF(uy/0.38, -1, 1)
	cx := a.X + d*vg.Length(ux) + size.X/2*vg.Length(sx)
	cy := a.Y + d*vg.Length(uy) + size.Y/2*vg.Length(sy)
	return vg.Rectangle{Min: vg.Point{X: cx - size.X/2, Y: cy - size.Y/2}, Max: vg.Point{X: cx + size.X/2, Y: cy + size.Y/2}}
}

// leader draws a thin line from the edge of the anchor's glyph to the
// nearest point of the label's box.
func leader(c draw.Canvas, a vg.Point, gap vg.Length, b vg.Rectangle, col color.Color) {
	to := vg.Point{X: clampLen(a.X, b.Min.X, b.Max.X), Y: clampLen(a.Y, b.Min.Y, b.Max.Y)}
	dx, dy := float64(to.X-a.X), float64(to.Y-a.Y)
	d := math.Hypot(dx, dy)
	if d <= float64(gap) {
		return
	}
	from := vg.Point{X: a.X + gap*vg.Length(dx/d), Y: a.Y + gap*vg.Length(dy/d)}
	c.StrokeLine2(lineStyle(col, 0.4), from.X, from.Y, to.X, to.Y)
}

// segmentCrosses reports whether the segment from p to q passes through
// the rectangle b (Liang–Barsky clipping).
func segmentCrosses(p, q vg.Point, b vg.Rectangle) bool {
	t0, t1 := 0.0, 1.0
	dx, dy := float64(q.X-p.X), float64(q.Y-p.Y)
	for _, e := range [][2]float64{
		{-dx, float64(p.X - b.Min.X)}, {dx, float64(b.Max.X - p.X)},
		{-dy, float64(p.Y - b.Min.Y)}, {dy, float64(b.Max.Y - p.Y)},
	} {
		pk, qk := e[0], e[1]
		if pk == 0 {
			if qk < 0 {
				return false
			}
			continue
		}
		t := qk / pk
		if pk < 0 {
			t0 = math.Max(t0, t)
		} else {
			t1 = math.Min(t1, t)
		}
		if t0 > t1 {
			return false
		}
	}
	return true
}

func clampF(v, lo, hi float64) float64 { return math.Max(lo, math.Min(hi, v)) }

func clampLen(v, lo, hi vg.Length) vg.Length {
	if hi < lo {
		return lo
	}
	return max(lo, min(hi, v))
}
