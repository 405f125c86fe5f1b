package report

import (
	"bytes"
	"cmp"
	"errors"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"

	"pcqc/analysis"
	"pcqc/analysis/intake"
)

// Figure is one figure of the report: PNG (300 dpi, for the PDF and
// Markdown) and SVG (for HTML) files in figures/, with a caption.
type Figure struct {
	Stem    string // file name without extension
	Alt     string // short description for screen readers and the image tag
	Caption string
	// Omitted, when set, says why the figure could not be drawn; the
	// report shows that sentence in its place.
	Omitted string
	// TableHeader and TableRows, when set, list below the caption what the
	// figure does not name (the biplot's unlabelled arrows).
	TableHeader []string
	TableRows   [][]string
}

// PNG and SVG are the figure's paths relative to the report.
func (f Figure) PNG() string { return "figures/" + f.Stem + ".png" }
func (f Figure) SVG() string { return "figures/" + f.Stem + ".svg" }

// figureDPI is the resolution of the PNG figures.
const figureDPI = 300

// drawing is a figure to render: a plot, its size, and room kept free on
// the right for a second axis.
type drawing struct {
	plot        *plot.Plot
	w, h        vg.Length
	rightMargin vg.Length
	// ann places the figure's text labels and records the layout; nil
	// for a figure without labels.
	ann *labeller
	// table, when set, lists what the figure could not name, given how
	// many names it drew; the report prints it below the caption.
	table func(named int) (header []string, rows [][]string)
	// equalAspect gives both axes the same scale, so that distances and
	// angles in the plane read true (score plots, biplots).
	equalAspect bool
	// left counts the items (what names them) left out because a value
	// they need is not a finite number; the caption says so.
	left int
	what string
	// sampled, when set, is the caption's sentence on the subsample of
	// samples the figure draws (thinning.caption).
	sampled string
}

// leaveOut records n more items left out of the drawing.
func (d *drawing) leaveOut(n int, what string) {
	if n <= 0 {
		return
	}
	if d.left > 0 && d.what != what {
		what = "value" // samples and variables both: count them alike
	}
	d.left += n
	d.what = what
}

// drawable checks that the plot can be drawn in c: finite axis ranges of
// finite width and a data area left after the axes and labels take their
// room. gonum/plot would otherwise loop looking for ticks of a NaN range.
func drawable(p *plot.Plot, c draw.Canvas) error {
	for _, v := range []float64{p.X.Min, p.X.Max, p.Y.Min, p.Y.Max, p.X.Max - p.X.Min, p.Y.Max - p.Y.Min} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return errNoData
		}
	}
	dc := p.DataCanvas(c)
	if dc.Max.X-dc.Min.X < vg.Points(20) || dc.Max.Y-dc.Min.Y < vg.Points(20) {
		return fmt.Errorf("the labels leave no room for the data")
	}
	return nil
}

// errNoData is why a figure whose values are all left out, or span no
// finite range, is not drawn.
var errNoData = errors.New("its values are not finite numbers, or span no finite range")

// equalise widens the narrower axis range so that one data unit has the
// same length on both axes of the data area drawn in c.
func equalise(p *plot.Plot, c draw.Canvas) {
	dc := p.DataCanvas(c)
	w, h := float64(dc.Max.X-dc.Min.X), float64(dc.Max.Y-dc.Min.Y)
	if w <= 0 || h <= 0 {
		return
	}
	ux, uy := (p.X.Max-p.X.Min)/w, (p.Y.Max-p.Y.Min)/h
	if ux > uy {
		mid, half := (p.Y.Min+p.Y.Max)/2, ux*h/2
		p.Y.Min, p.Y.Max = mid-half, mid+half
	} else {
		mid, half := (p.X.Min+p.X.Max)/2, uy*w/2
		p.X.Min, p.X.Max = mid-half, mid+half
	}
}

// draw draws the figure on c. A panic inside gonum/plot becomes an error:
// a figure must never take the report down with it. The legend, if any,
// goes in a column right of the plot (and of its second axis), so that it
// never covers data; the labeller then names what it can.
func (d drawing) draw(c vg.CanvasSizer) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("the plotting library failed: %v", r)
		}
	}()
	dc := draw.New(c)
	legend := d.plot.Legend
	size := legend.Rectangle(dc).Size()
	hasLegend := size.X > 0 && size.Y > 0
	width := d.rightMargin
	if hasLegend {
		d.plot.Legend = plot.NewLegend()
		defer func() { d.plot.Legend = legend }()
		width += size.X + vg.Points(10)
	}
	field := draw.Crop(dc, 0, -width, 0, 0)
	if d.equalAspect {
		equalise(d.plot, field)
	}
	if err := drawable(d.plot, field); err != nil {
		return err
	}
	d.plot.Draw(field)
	var box vg.Rectangle
	if hasLegend {
		legend.Left, legend.Top, legend.YOffs = true, true, 0
		strip := draw.Crop(dc, dc.Max.X-dc.Min.X-width+d.rightMargin+vg.Points(8), 0, 0, -vg.Points(28))
		legend.Draw(strip)
		box = vg.Rectangle{Min: vg.Point{X: strip.Min.X, Y: strip.Max.Y - size.Y}, Max: vg.Point{X: strip.Min.X + size.X, Y: strip.Max.Y}}
	}
	if d.ann != nil {
		data := d.plot.DataCanvas(field)
		trX, trY := d.plot.Transforms(&data)
		d.ann.place(dc, data, trX, trY, box)
	}
	return nil
}

// saveAs writes the drawing as PNG, SVG or both into dir/figures.
func (d drawing) saveAs(dir, stem string, pngToo, svgToo bool) error {
	if err := os.MkdirAll(filepath.Join(dir, "figures"), 0o755); err != nil {
		return err
	}
	if pngToo {
		img := vgimg.NewWith(vgimg.UseWH(d.w, d.h), vgimg.UseDPI(figureDPI))
		if err := d.draw(img); err != nil {
			return err
		}
		if err := writeTo(filepath.Join(dir, "figures", stem+".png"), vgimg.PngCanvas{Canvas: img}); err != nil {
			return err
		}
	}
	if !svgToo {
		return nil
	}
	svg := vgsvg.New(d.w, d.h)
	if err := d.draw(svg); err != nil {
		return err
	}
	var b bytes.Buffer
	if _, err := svg.WriteTo(&b); err != nil {
		return err
	}
	return os.WriteFile(filepath.Join(dir, "figures", stem+".svg"), ltrSVG(b.Bytes()), 0o644)
}

// ltrSVG tells SVG renderers to draw every text in the order of its
// characters. The figures' text is already in visual order (drawText), as
// the PNG renderer needs; a browser applying the bidirectional algorithm
// to it again would turn right-to-left runs back round.
func ltrSVG(b []byte) []byte {
	i := bytes.Index(b, []byte("<svg"))
	if i < 0 {
		return b
	}
	j := bytes.IndexByte(b[i:], '>')
	if j < 0 {
		return b
	}
	at := i + j + 1
	style := "\n<style>text { unicode-bidi: bidi-override; direction: ltr; }</style>"
	return append(append(append([]byte(nil), b[:at]...), style...), b[at:]...)
}

func writeTo(path string, w io.WriterTo) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	if _, err := w.WriteTo(f); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// nullCanvas draws nothing. Every figure is drawn into it once before the
// report is written, so that a figure that cannot be drawn is known, and
// left out with a sentence, before the Markdown names it.
type nullCanvas struct{ w, h vg.Length }

func (c nullCanvas) Size() (vg.Length, vg.Length)         { return c.w, c.h }
func (nullCanvas) SetLineWidth(vg.Length)                 {}
func (nullCanvas) SetLineDash([]vg.Length, vg.Length)     {}
func (nullCanvas) SetColor(color.Color)                   {}
func (nullCanvas) Rotate(float64)                         {}
func (nullCanvas) Translate(vg.Point)                     {}
func (nullCanvas) Scale(float64, float64)                 {}
func (nullCanvas) Push()                                  {}
func (nullCanvas) Pop()                                   {}
func (nullCanvas) Stroke(vg.Path)                         {}
func (nullCanvas) Fill(vg.Path)                           {}
func (nullCanvas) FillString(font.Face, vg.Point, string) {}
func (nullCanvas) DrawImage(vg.Rectangle, image.Image)    {}

// build makes the job's drawing, the i-th figure of its report, with a
// panic inside it made an error.
//
// Each figure is one pixel wider than the one before. fpdf writes image
// objects sorted by pixel width and leaves ties in map order, which would
// make the PDF's bytes differ from run to run; distinct widths make the
// order, and so the file, reproducible. One pixel at 300 dpi is 0.08 mm.
// prepareFigures draws at the same width as saveFigures, so that the
// labels it counts for the caption are the labels in the file.
func (job figureJob) build(i int) (d drawing, err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("the plotting library failed: %v", r)
		}
	}()
	d = job.drawing()
	d.w += vg.Length(i) * vg.Inch / figureDPI
	return d, nil
}

// prepareFigures draws every figure into a nullCanvas, before the Markdown
// is written: a figure that cannot be drawn is marked Omitted with the
// reason, the caption of one that left items out says how many, and the
// caption says which samples or variables the figure names. The drawings
// are made again when the files are written (saveFigures) rather than
// kept, so that the figures of a large table are never all in memory at
// once; they are deterministic, so the second drawing is the first.
func prepareFigures(jobs []figureJob) {
	for i, job := range jobs {
		d, err := job.build(i)
		if err == nil {
			err = d.draw(nullCanvas{d.w, d.h})
		}
		if err != nil {
			job.fig.Omitted = fmt.Sprintf("The figure “%s” is left out: %s.", job.fig.Alt, strings.TrimSuffix(err.Error(), "."))
			continue
		}
		if d.ann != nil && d.ann.note != nil {
			if note := d.ann.note(d.ann.placed); note != "" {
				job.fig.Caption += " " + note
			}
		}
		if d.table != nil {
			named := 0
			if d.ann != nil {
				named = d.ann.placed
			}
			job.fig.TableHeader, job.fig.TableRows = d.table(named)
		}
		if d.sampled != "" {
			job.fig.Caption += " " + d.sampled
		}
		if d.left > 0 {
			what := d.what
			if d.left > 1 {
				what += "s"
			}
			job.fig.Caption += fmt.Sprintf(" %d %s left out: %s not a finite number.", d.left, what, map[bool]string{true: "its value is", false: "their values are"}[d.left == 1])
		}
	}
}

// saveFigures renders every figure of the document into dir/figures, as
// PNG (for the PDF and the Markdown) and SVG (for the HTML).
func (d *Document) saveFigures(dir string) error { return saveFigures(d.figures, dir, true, true) }

// saveFigures renders the PNG files, the SVG files or both, leaving out the
// figures prepareFigures found could not be drawn.
func saveFigures(figures []figureJob, dir string, pngToo, svgToo bool) error {
	for i, job := range figures {
		if job.fig.Omitted != "" {
			continue
		}
		dr, err := job.build(i)
		if err == nil {
			err = dr.saveAs(dir, job.fig.Stem, pngToo, svgToo)
		}
		if err != nil {
			return fmt.Errorf("figure %s: %w", job.fig.Stem, err)
		}
	}
	return nil
}

// componentLabel is an axis label with the component's share of variance,
// e.g. "PC1 · 48.2 %".
func componentLabel(res *analysis.Result, a int) string {
	return fmt.Sprintf("PC%d · %s", a+1, pctText(Percentages(res.Decomp.Eigenvalues)[a]))
}

type xy struct{ x, y []float64 }

func (p xy) Len() int                    { return len(p.x) }
func (p xy) XY(i int) (float64, float64) { return p.x[i], p.y[i] }

// finiteXY keeps the points whose coordinates are both finite numbers
// (gonum/plot refuses the others) and counts those it leaves out.
func finiteXY(x, y []float64) (xy, int) {
	var out xy
	for i := range x {
		if isFinite(x[i]) && isFinite(y[i]) {
			out.x, out.y = append(out.x, x[i]), append(out.y, y[i])
		}
	}
	return out, len(x) - len(out.x)
}

// addLine adds a line through the finite points of x and y, with a legend
// entry, and returns it (nil when no point is left to draw).
func addLine(p *plot.Plot, x, y []float64, style draw.LineStyle, label string) *plotter.Line {
	pts, _ := finiteXY(x, y)
	if pts.Len() == 0 {
		return nil
	}
	l, err := plotter.NewLine(pts)
	if err != nil {
		return nil // cannot happen for finite points; leave the line out
	}
	l.LineStyle = style
	p.Add(l)
	if label != "" {
		p.Legend.Add(label, l)
	}
	return l
}

// addScatter adds the finite points of x and y in one glyph style, with a
// legend entry unless label is empty; it returns how many points it left
// out and the scatter (nil when none was drawn).
func addScatter(p *plot.Plot, x, y []float64, style draw.GlyphStyle, label string) (*plotter.Scatter, int) {
	pts, left := finiteXY(x, y)
	if pts.Len() == 0 {
		return nil, left
	}
	s, err := plotter.NewScatter(pts)
	if err != nil {
		return nil, len(x)
	}
	s.GlyphStyle = style
	p.Add(s)
	if label != "" {
		p.Legend.Add(label, s)
	}
	return s, left
}

// screeComponents is how many components the scree figure shows at most.
const screeComponents = 20

func screeFigure(res *analysis.Result) drawing {
	d := res.Decomp
	m := min(d.Components(), screeComponents)
	total := d.TotalVariance()
	idx := make([]float64, m)
	obs := make([]float64, m)
	stick := make([]float64, m)
	cum := make([]float64, m)
	running := 0.0
	ymax := 0.0
	left := 0
	for a := 0; a < m; a++ {
		idx[a] = float64(a + 1)
		obs[a] = d.Eigenvalues[a]
		stick[a] = res.Counts.BrokenStickShares[a] * total
		running += d.Eigenvalues[a]
		cum[a] = running / total
		for _, v := range []float64{obs[a], stick[a]} {
			if isFinite(v) {
				ymax = math.Max(ymax, v)
			}
		}
		if !isFinite(obs[a]) {
			left++
		}
	}
	p := newPlot("Scree", "component", "eigenvalue")
	p.Add(guides{})
	p.X.Min, p.X.Max = 0.5, float64(m)+0.5
	p.Y.Min = 0
	p.Y.Max = ymax * 1.08
	p.X.Tick.Marker = integerTicks{}

	addLine(p, idx, scaleSlice(cum, p.Y.Max), lineStyle(mutedColor, 0.8, 1.5, 1.5), "cumulative share (right axis)")
	addLine(p, idx, stick, lineStyle(accent95, 1, 4, 2), "broken stick")
	if res.Counts.Parallel.Permutations > 0 {
		addLine(p, idx, res.Counts.Parallel.P95[:m], lineStyle(accent99, 1, 1, 2), "permuted data, 95th percentile")
	}
	addLine(p, idx, obs, lineStyle(mainColor, 1.2), "")
	kept := min(res.Retained, m)
	addScatter(p, idx[:kept], obs[:kept], draw.GlyphStyle{Color: mainColor, Shape: draw.CircleGlyph{}, Radius: vg.Points(3)}, "observed, retained")
	addScatter(p, idx[kept:], obs[kept:], draw.GlyphStyle{Color: mainColor, Shape: draw.RingGlyph{}, Radius: vg.Points(3)}, "observed, not retained")
	p.Add(secondAxis{scale: p.Y.Max / 100, ticks: []float64{0, 25, 50, 75, 100}, unit: " %", label: "cumulative share of variance"})
	dr := drawing{plot: p, w: figWidth, h: figHeight, rightMargin: vg.Points(52)}
	dr.leaveOut(left, "component")
	return dr
}

// pressFigure draws the cross-validation curve: PRESS as a share of the
// total sum of squares against the number of components.
func pressFigure(res *analysis.Result) drawing {
	cv := res.Counts.CV
	idx := make([]float64, len(cv.PRESS))
	share := make([]float64, len(cv.PRESS))
	ymax := 0.0
	for a, v := range cv.PRESS {
		idx[a], share[a] = float64(a), v/cv.SS
		if isFinite(share[a]) {
			ymax = math.Max(ymax, share[a])
		}
	}
	p := newPlot("Cross-validation", "components", "PRESS / total sum of squares")
	p.Add(guides{})
	p.X.Min, p.X.Max = -0.5, float64(len(idx))-0.5
	p.Y.Min, p.Y.Max = 0, ymax*1.08
	p.X.Tick.Marker = integerTicks{}
	addLine(p, idx, share, lineStyle(mainColor, 1.2), "")
	addScatter(p, idx[cv.Min:cv.Min+1], share[cv.Min:cv.Min+1], draw.GlyphStyle{Color: accent99, Shape: draw.RingGlyph{}, Radius: vg.Points(6)}, "smallest PRESS")
	addScatter(p, idx[cv.Count:cv.Count+1], share[cv.Count:cv.Count+1], draw.GlyphStyle{Color: mainColor, Shape: draw.CircleGlyph{}, Radius: vg.Points(3)}, "chosen (one-SE rule)")
	return drawing{plot: p, w: figWidth, h: figHeight}
}

func scaleSlice(x []float64, f float64) []float64 {
	out := make([]float64, len(x))
	for i, v := range x {
		out[i] = v * f
	}
	return out
}

// integerTicks labels whole numbers only, at a readable spacing.
type integerTicks struct{}

func (integerTicks) Ticks(min, max float64) []plot.Tick {
	if !isFinite(min) || !isFinite(max) || max-min > 1e12 {
		return nil // only component and sample numbers are drawn on such an axis
	}
	lo, hi := int(math.Ceil(min)), int(math.Floor(max))
	// Steps of 1, 2 and 5 times a power of ten; fewer ticks once labels
	// are five digits long (sample numbers of a large table), so that
	// they do not run into one another.
	most := 12
	if hi >= 10000 || lo <= -10000 {
		most = 6
	}
	step := 1
	for k := 0; (hi-lo)/step > most; k++ {
		step = []int{2, 5, 10}[k%3] * int(math.Pow(10, float64(k/3)))
	}
	var ticks []plot.Tick
	first := lo + ((step-lo%step)%step+step)%step // the first multiple of step ≥ lo
	for v := first; v <= hi; v += step {
		ticks = append(ticks, plot.Tick{Value: float64(v), Label: strconv.Itoa(v)})
	}
	return ticks
}

// loadingsShown is how many variables a loadings bar figure shows at most.
const loadingsShown = 30

func loadingsFigure(res *analysis.Result, a int) drawing {
	p := res.Decomp.Vars
	v := res.Decomp.Loadings
	var order []int
	for j := 0; j < p; j++ {
		if isFinite(v.At(j, a)) {
			order = append(order, j)
		}
	}
	left := p - len(order)
	slices.SortStableFunc(order, func(i, j int) int {
		ai, aj := math.Abs(v.At(i, a)), math.Abs(v.At(j, a))
		switch {
		case ai > aj:
			return -1
		case ai < aj:
			return 1
		}
		return 0
	})
	shown := min(len(order), loadingsShown)
	bars := hbars{fill: barColor, values: make([]float64, shown)}
	names := make([]string, shown)
	st := res.Stability
	withCI := st.Used > 0
	if withCI {
		bars.low, bars.hi, bars.unstable = make([]float64, shown), make([]float64, shown), make([]bool, shown)
	}
	for r := 0; r < shown; r++ {
		j := order[r]
		row := shown - 1 - r // largest at the top
		bars.values[row] = v.At(j, a)
		names[row] = figureText(varLabel(res.Table, j), maxLabelRunes)
		if withCI {
			li := st.Loadings[j][a]
			bars.low[row], bars.hi[row] = li.Low, li.High
			bars.unstable[row] = !li.ExcludesZero()
			if !isFinite(li.Low) || !isFinite(li.High) {
				// No interval to draw: a whisker of no length.
				bars.low[row], bars.hi[row] = v.At(j, a), v.At(j, a)
			}
		}
	}
	title := fmt.Sprintf("Loadings on %s", componentLabel(res, a))
	if shown < p {
		title += fmt.Sprintf(" (the %d largest of %d)", shown, p)
	}
	pl := newPlot(title, "loading", "")
	return namedBars(pl, bars, names, left, 2.2, 0.42)
}

// namedBars finishes a figure of horizontal bars against named rows (the
// variables of a loading, residual or contribution figure): the names on
// the y axis without its line and ticks, a height of base + perRow
// centimetres per row (at least 6 cm), and a note of the left rows.
func namedBars(pl *plot.Plot, bars plot.Plotter, names []string, left int, base, perRow float64) drawing {
	if len(names) > 0 {
		pl.Add(bars)
		pl.NominalY(names...)
	}
	pl.Y.Tick.Label.Font = textFont(7.5, false)
	pl.Y.LineStyle.Width = 0
	pl.Y.Tick.LineStyle.Width = 0
	h := vg.Length(base+perRow*float64(len(names))) * vg.Centimeter
	dr := drawing{plot: pl, w: figWidth, h: max(h, 6*vg.Centimeter)}
	dr.leaveOut(left, "variable")
	return dr
}

// groupsOf returns the distinct groups in order of first appearance, and
// each sample's group index.
func groupsOf(t *intake.Table) ([]string, []int) {
	if t.Groups == nil {
		return nil, nil
	}
	var names []string
	index := map[string]int{}
	of := make([]int, len(t.Groups))
	for i, g := range t.Groups {
		k, ok := index[g]
		if !ok {
			k = len(names)
			index[g] = k
			names = append(names, g)
		}
		of[i] = k
	}
	return names, of
}

// flaggedSamples returns the samples beyond a 99 % limit of T² or Q, most
// severe first.
func flaggedSamples(res *analysis.Result) []int {
	s := res.Samples
	return analysis.RankBeyond99(s.T2, s.Q, s.Limits.T2_99, s.Limits.Q99)
}

// labelledSamples is how many flagged samples a figure names at most.
const labelledSamples = 15

// beyond99 says which samples flaggedSamples returns, for captions.
const beyond99 = "beyond a 99 % limit of T² or Q"

// nameSamples gives the labeller the names of the flagged points (most
// extreme first, at most labelledSamples of them) that have a place in the
// figure, and the caption sentence that says how many it drew of how many
// samples are beyond, in the words of beyond.
func nameSamples(ann *labeller, ids []string, flagged []int, x, y []float64, beyond string) {
	for _, i := range flagged {
		if len(ann.names) == labelledSamples {
			break
		}
		if !isFinite(x[i]) || !isFinite(y[i]) {
			continue
		}
		ann.names = append(ann.names, pointLabel{x: x[i], y: y[i], text: figureText(ids[i], maxLabelRunes), color: accent99, gap: vg.Points(3)})
	}
	total := len(flagged)
	ann.note = func(named int) string { return namedNote(named, total, beyond) }
}

// namedNote is the caption's sentence on the names a figure drew: named
// of the total samples beyond, most extreme first.
func namedNote(named, total int, beyond string) string {
	switch {
	case total == 0:
		return fmt.Sprintf("No sample is %s, so none is named.", beyond)
	case named == 0:
		if total == 1 {
			return fmt.Sprintf("1 sample is %s: the figure has no room to name it.", beyond)
		}
		return fmt.Sprintf("%d samples are %s: the figure has no room to name them.", total, beyond)
	case named == total && total == 1:
		return fmt.Sprintf("The one sample %s is named.", beyond)
	case named == total:
		return fmt.Sprintf("The %d samples %s are named.", total, beyond)
	case named == 1:
		return fmt.Sprintf("The most extreme of the %d samples %s is named.", total, beyond)
	}
	return fmt.Sprintf("The %d most extreme of the %d samples %s are named.", named, total, beyond)
}

// groupNote states in the caption that every group is drawn with filled
// marks, the convention hollow marks are set against in the other figures.
func groupNote(ann *labeller, t *intake.Table) {
	if groups, _ := groupsOf(t); len(groups) < 2 || len(groups) > maxColouredGroups {
		return
	}
	named := ann.note
	ann.note = func(k int) string {
		return "Every group is drawn with filled marks, told apart by colour and shape. " + named(k)
	}
}

// maxLabelRunes is the longest sample id or variable name a figure prints;
// longer ones are cut with an ellipsis (tables and CSV files keep them).
const maxLabelRunes = 28

// sampleRadius is the largest glyph radius of a sample in a score plot;
// the labeller keeps names and the legend clear of it.
const sampleRadius = 2.6

// addGroupedPoints draws the samples th chose, one series per group
// (colour and shape, every mark filled), or all alike beyond
// maxColouredGroups. It returns how many samples it left out because a
// coordinate is not a finite number.
func addGroupedPoints(p *plot.Plot, t *intake.Table, x, y []float64, th thinning) int {
	groups, of := groupsOf(t)
	if groups == nil || len(groups) > maxColouredGroups {
		label := ""
		if groups != nil {
			label = fmt.Sprintf("%d groups of %s: too many to tell apart, drawn alike", len(groups), figureText(t.GroupColumn, maxLabelRunes))
		}
		_, left := addScatter(p, th.subset(x), th.subset(y), draw.GlyphStyle{Color: mainColor, Shape: draw.CircleGlyph{}, Radius: th.glyph(vg.Points(2.2))}, label)
		return left + th.unseen(len(x))
	}
	left := 0
	for g, name := range groups {
		var gx, gy []float64
		for _, i := range th.indices(len(x)) {
			if of[i] == g {
				gx, gy = append(gx, x[i]), append(gy, y[i])
			}
		}
		label := figureText(name, maxLabelRunes)
		if label == "" {
			label = "(no group)"
		}
		style := groupStyle(g)
		style.Radius = th.glyph(style.Radius)
		_, l := addScatter(p, gx, gy, style, label)
		left += l
	}
	return left + th.unseen(len(x))
}

// groupIndex is each sample's group index for stratifying a subsample
// (nil without groups).
func groupIndex(t *intake.Table) []int {
	_, of := groupsOf(t)
	return of
}

// ellipse returns points of x²/a² + y²/b² = 1.
func ellipse(a, b float64) plotter.XYs {
	const steps = 180
	pts := make(plotter.XYs, steps+1)
	for s := 0; s <= steps; s++ {
		t := 2 * math.Pi * float64(s) / steps
		pts[s].X, pts[s].Y = a*math.Cos(t), b*math.Sin(t)
	}
	return pts
}

// addEllipse draws the T² ellipse with half-axes a and b, unless they are
// not finite numbers.
func addEllipse(p *plot.Plot, a, b float64, label string) {
	if !isFinite(a) || !isFinite(b) {
		return
	}
	e, err := plotter.NewLine(ellipse(a, b))
	if err != nil {
		return
	}
	e.LineStyle = lineStyle(accent95, 1, 4, 2)
	p.Add(e)
	p.Legend.Add(label, e)
}

func scoresFigure(res *analysis.Result, a, b int) drawing {
	n := res.Decomp.Rows
	x, y := make([]float64, n), make([]float64, n)
	for i := 0; i < n; i++ {
		x[i], y[i] = res.Scores.At(i, a), res.Scores.At(i, b)
	}
	p := newPlot(fmt.Sprintf("Scores, PC%d against PC%d", b+1, a+1), componentLabel(res, a), componentLabel(res, b))
	p.Add(guides{})
	if lim := analysis.T2LimitModel(n, 2, analysis.Conf95); !math.IsNaN(lim) {
		ev := res.Decomp.Eigenvalues
		addEllipse(p, math.Sqrt(lim*ev[a]), math.Sqrt(lim*ev[b]), "95 % Hotelling T² ellipse")
	}
	flagged := flaggedSamples(res)
	th := thinSamples(x, y, flagged, groupIndex(res.Table))
	left := addGroupedPoints(p, res.Table, x, y, th)
	ann := &labeller{}
	ann.addPoints(th.subset(x), th.subset(y), vg.Points(sampleRadius))
	addExcludedScores(p, ann, res, a, b)
	nameSamples(ann, res.Table.IDs, flagged, x, y, beyond99)
	groupNote(ann, res.Table)
	dr := drawing{plot: p, w: figWidth, h: figTall, equalAspect: true, ann: ann, sampled: th.caption(beyond99)}
	dr.leaveOut(left, "sample")
	return dr
}

// indexScoresFigure shows PC1 scores against sample order when only one
// component is retained.
func indexScoresFigure(res *analysis.Result) drawing {
	n := res.Decomp.Rows
	x, y := make([]float64, n), make([]float64, n)
	for i := 0; i < n; i++ {
		x[i], y[i] = float64(i+1), res.Scores.At(i, 0)
	}
	p := newPlot("Scores on PC1 in sample order", "sample (input order)", componentLabel(res, 0))
	p.Add(guides{})
	ann := &labeller{}
	if lim := analysis.T2LimitModel(n, 1, analysis.Conf95); !math.IsNaN(lim) {
		addLimitPair(p, ann, math.Sqrt(lim*res.Decomp.Eigenvalues[0]))
	}
	flagged := flaggedSamples(res)
	th := thinSamples(x, y, flagged, groupIndex(res.Table))
	left := addGroupedPoints(p, res.Table, x, y, th)
	ann.addPoints(th.subset(x), th.subset(y), vg.Points(sampleRadius))
	addExcludedScores(p, ann, res, 0, -1)
	nameSamples(ann, res.Table.IDs, flagged, x, y, beyond99)
	groupNote(ann, res.Table)
	dr := drawing{plot: p, w: figWidth, h: figHeight, ann: ann, sampled: th.caption(beyond99)}
	dr.leaveOut(left, "sample")
	return dr
}

// addLimitPair draws the 95 % limits ±r of one component's scores, each
// named, unless r is not a finite number.
func addLimitPair(p *plot.Plot, ann *labeller, r float64) {
	if isFinite(r) {
		ann.addRef(p, refLine{at: r, style: lineStyle(accent95, 1, 4, 2), label: "+95 % limit"})
		ann.addRef(p, refLine{at: -r, style: lineStyle(accent95, 1, 4, 2), label: "−95 % limit"})
	}
}

// biplotVariables is the most variables a biplot draws.
const biplotVariables = 30

// biplotLabels is the most arrows a biplot names: the longest ones. More
// names than this crowd one another into a cluster of leader lines; the
// table below the figure lists the rest.
const biplotLabels = 15

// biplotFigure is Gabriel's (1971, Biometrika 58:453–467) biplot of PC1 and
// PC2 in its column-metric form: samples at their standardised scores
// t_ia/√λ_a, variables as arrows to v_ja·√λ_a (for unit-scaled data, the
// correlation of the variable with the component), arrows stretched by one
// common factor to the extent of the samples. The longest arrows are named
// at their tips; the table lists the others.
func biplotFigure(res *analysis.Result) drawing {
	n, p := res.Decomp.Rows, res.Decomp.Vars
	ev := res.Decomp.Eigenvalues
	x, y := make([]float64, n), make([]float64, n)
	reach := 0.0
	for i := 0; i < n; i++ {
		x[i] = res.Scores.At(i, 0) / math.Sqrt(ev[0])
		y[i] = res.Scores.At(i, 1) / math.Sqrt(ev[1])
		if r := math.Hypot(x[i], y[i]); isFinite(r) {
			reach = math.Max(reach, r)
		}
	}
	type arrow struct {
		j      int
		u, w   float64 // loading × √eigenvalue on PC1 and PC2
		length float64
	}
	var all []arrow
	longest := 0.0
	for j := 0; j < p; j++ {
		u := res.Decomp.Loadings.At(j, 0) * math.Sqrt(ev[0])
		w := res.Decomp.Loadings.At(j, 1) * math.Sqrt(ev[1])
		if !isFinite(u) || !isFinite(w) {
			continue
		}
		all = append(all, arrow{j, u, w, math.Hypot(u, w)})
		longest = math.Max(longest, math.Hypot(u, w))
	}
	// Longest first; ties keep the variables' order.
	slices.SortStableFunc(all, func(a, b arrow) int { return cmp.Compare(b.length, a.length) })
	stretch := 1.0
	if longest > 0 {
		stretch = 0.8 * reach / longest
	}
	pl := newPlot("Biplot, PC1 and PC2", componentLabel(res, 0)+" (standardised scores)", componentLabel(res, 1)+" (standardised scores)")
	pl.Add(guides{})
	th := thinSamples(x, y, flaggedSamples(res), groupIndex(res.Table))
	left := addGroupedPoints(pl, res.Table, x, y, th)
	ann := &labeller{}
	ann.addPoints(th.subset(x), th.subset(y), vg.Points(sampleRadius))
	var ar arrows
	for k, a := range all {
		ax, ay := a.u*stretch, a.w*stretch
		ar.x, ar.y = append(ar.x, ax), append(ar.y, ay)
		ann.arrows = append(ann.arrows, dataArrow{ax, ay})
		if k < biplotLabels {
			ann.names = append(ann.names, pointLabel{x: ax, y: ay, text: figureText(varLabel(res.Table, a.j), maxLabelRunes), color: accent99, gap: vg.Points(1), outward: true})
		}
	}
	pl.Add(ar)
	total := len(all)
	ann.note = func(named int) string {
		if named == total {
			return "Every arrow is named."
		}
		return fmt.Sprintf("The %d longest arrows are named; the table below lists the other %d variables, longest arrow first.", named, total-named)
	}
	dr := drawing{plot: pl, w: figWidth, h: figTall, equalAspect: true, ann: ann, sampled: th.caption(beyond99)}
	dr.table = func(named int) ([]string, [][]string) {
		if named >= total {
			return nil, nil
		}
		var rows [][]string
		for _, a := range all[named:] {
			rows = append(rows, []string{varLabel(res.Table, a.j), g4(a.u), g4(a.w), g4(a.length)})
		}
		return []string{"Variable not named in the biplot", "PC1 arrow (loading × √λ)", "PC2 arrow (loading × √λ)", "Arrow length"}, rows
	}
	dr.leaveOut(left, "sample")
	dr.leaveOut(p-len(all), "variable")
	return dr
}

func t2qFigure(res *analysis.Result) drawing {
	s := res.Samples
	return t2qDrawing("Hotelling T² against Q residual", s.T2, s.Q, s.Limits, flaggedSamples(res), res.Table.IDs)
}

// t2qDrawing plots T² against Q with the 95 % and 99 % limits, each named,
// flagged samples marked and the most extreme of them named.
func t2qDrawing(title string, t2, q []float64, l analysis.Limits, flaggedIdx []int, ids []string) drawing {
	pl := newPlot(title, "Hotelling T²", "Q residual")
	pl.Add(guides{})
	ann := &labeller{}
	ann.addRef(pl, refLine{vertical: true, at: l.T2_95, style: lineStyle(accent95, 1, 4, 2), label: "T² 95 %"})
	ann.addRef(pl, refLine{vertical: true, at: l.T2_99, style: lineStyle(accent99, 1), label: "T² 99 %"})
	if l.QMethod != analysis.QNone {
		ann.addRef(pl, refLine{at: l.Q95, style: lineStyle(accent95, 1, 4, 2), label: "Q 95 %"})
		ann.addRef(pl, refLine{at: l.Q99, style: lineStyle(accent99, 1), label: "Q 99 %"})
	}
	flagged := map[int]bool{}
	for _, i := range flaggedIdx {
		flagged[i] = true
	}
	th := thinSamples(t2, q, flaggedIdx, nil)
	var ix, iy, fx, fy []float64
	for _, i := range th.indices(len(t2)) {
		if flagged[i] {
			fx, fy = append(fx, t2[i]), append(fy, q[i])
		} else {
			ix, iy = append(ix, t2[i]), append(iy, q[i])
		}
	}
	_, left := addScatter(pl, ix, iy, draw.GlyphStyle{Color: mutedColor, Shape: draw.RingGlyph{}, Radius: th.glyph(vg.Points(2.2))}, "within the 99 % limits")
	_, l2 := addScatter(pl, fx, fy, draw.GlyphStyle{Color: accent99, Shape: draw.PyramidGlyph{}, Radius: vg.Points(3)}, "beyond a 99 % limit")
	ann.addPoints(ix, iy, vg.Points(2.2))
	ann.addPoints(fx, fy, vg.Points(3))
	nameSamples(ann, ids, flaggedIdx, t2, q, "beyond a 99 % limit")
	named := ann.note
	ann.note = func(k int) string {
		return "Hollow grey rings: samples within both 99 % limits; filled red triangles: samples beyond one. " + named(k)
	}
	pl.X.Min, pl.Y.Min = 0, 0
	dr := drawing{plot: pl, w: figWidth, h: figHeight, ann: ann, sampled: th.caption("beyond a 99 % limit")}
	dr.leaveOut(left+l2+th.unseen(len(t2)), "sample")
	return dr
}

// influenceFigure draws each sample's leave-one-out subspace angle in
// input order, with the 95th percentile of the bootstrap subspace angles;
// samples beyond their own yardstick (analysis.InfluenceLimits) are marked
// and named, most influential first.
func influenceFigure(res *analysis.Result) drawing {
	inf := res.Samples.Influence
	n := len(inf.Angle)
	pl := newPlot("Influence of each sample on the retained subspace", "sample (input order)", "angle without the sample (°)")
	pl.Add(guides{})
	pl.X.Tick.Marker = integerTicks{}
	ann := &labeller{}
	if lim := analysis.InfluenceLimit(res.Stability); isFinite(lim) {
		ann.addRef(pl, refLine{at: lim, style: lineStyle(accent95, 1, 4, 2), label: "bootstrap 95th percentile"})
	}
	var flagged []int
	x := make([]float64, n)
	for i, a := range inf.Angle {
		x[i] = float64(i + 1)
		if i < len(inf.Limit) && a > inf.Limit[i] {
			flagged = append(flagged, i)
		}
	}
	slices.SortStableFunc(flagged, func(a, b int) int { return cmp.Compare(inf.Angle[b], inf.Angle[a]) })
	th := thinSamples(x, inf.Angle, flagged, groupIndex(res.Table))
	var ix, iy, fx, fy []float64
	for _, i := range th.indices(n) {
		a := inf.Angle[i]
		if i < len(inf.Limit) && a > inf.Limit[i] {
			fx, fy = append(fx, x[i]), append(fy, a)
		} else {
			ix, iy = append(ix, x[i]), append(iy, a)
		}
	}
	_, left := addScatter(pl, ix, iy, draw.GlyphStyle{Color: mutedColor, Shape: draw.RingGlyph{}, Radius: th.glyph(vg.Points(2.2))}, "within the bootstrap's range")
	_, l2 := addScatter(pl, fx, fy, draw.GlyphStyle{Color: accent99, Shape: draw.PyramidGlyph{}, Radius: vg.Points(3)}, "turns the model more")
	ann.addPoints(ix, iy, vg.Points(2.2))
	ann.addPoints(fx, fy, vg.Points(3))
	nameSamples(ann, res.Table.IDs, flagged, x, inf.Angle, "beyond their own yardstick")
	named := ann.note
	ann.note = func(k int) string {
		return "Hollow grey rings: samples within the yardstick; filled red triangles: samples beyond it. " + named(k)
	}
	pl.Y.Min = 0
	dr := drawing{plot: pl, w: figWidth, h: figHeight, ann: ann, sampled: th.caption("beyond their own yardstick")}
	dr.leaveOut(left+l2+th.unseen(n), "sample")
	return dr
}

func congruenceFigure(res *analysis.Result) drawing {
	st := res.Stability
	pl := newPlot("Tucker congruence with the reference loadings over the bootstrap", "component", "congruence φ")
	pl.Add(guides{})
	names := make([]string, len(st.Congruence))
	lo := 1.0
	left := 0
	for a, vals := range st.Congruence {
		names[a] = fmt.Sprintf("PC%d", a+1)
		var finite plotter.Values
		for _, v := range vals {
			if isFinite(v) {
				finite = append(finite, v)
				lo = math.Min(lo, v)
			}
		}
		left += len(vals) - len(finite)
		if len(finite) == 0 {
			continue
		}
		b, err := plotter.NewBoxPlot(vg.Points(22), float64(a), finite)
		if err != nil {
			left += len(finite)
			continue
		}
		b.BoxStyle = lineStyle(mainColor, 0.9)
		b.MedianStyle = lineStyle(mainColor, 1.8)
		b.WhiskerStyle = lineStyle(mainColor, 0.8)
		b.GlyphStyle = draw.GlyphStyle{Color: mutedColor, Shape: draw.RingGlyph{}, Radius: vg.Points(1.6)}
		pl.Add(b)
	}
	pl.NominalX(names...)
	ann := &labeller{}
	ann.addRef(pl, refLine{at: 0.95, style: lineStyle(accent95, 1, 4, 2), label: "0.95 equal"})
	ann.addRef(pl, refLine{at: 0.85, style: lineStyle(accent99, 1), label: "0.85 fair"})
	pl.Y.Min = math.Min(lo, 0.8) - 0.02
	pl.Y.Max = 1.005
	dr := drawing{plot: pl, w: figWidth, h: figHeight, ann: ann}
	dr.leaveOut(left, "resample value")
	return dr
}

// intervals draws points with vertical whiskers; retained points filled.
type intervals struct {
	x, y, lo, hi []float64
	retained     []bool
}

func (iv intervals) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, trY := plt.Transforms(&c)
	ws := lineStyle(inkColor, 0.8)
	for i := range iv.x {
		x := trX(iv.x[i])
		c.StrokeLine2(ws, x, trY(iv.lo[i]), x, trY(iv.hi[i]))
		for _, v := range []float64{iv.lo[i], iv.hi[i]} {
			c.StrokeLine2(ws, x-vg.Points(3), trY(v), x+vg.Points(3), trY(v))
		}
		g := draw.GlyphStyle{Color: mainColor, Shape: draw.CircleGlyph{}, Radius: vg.Points(3)}
		if !iv.retained[i] {
			g.Shape = draw.RingGlyph{}
		}
		c.DrawGlyph(g, vg.Point{X: x, Y: trY(iv.y[i])})
	}
}

func (iv intervals) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = iv.x[0]-0.5, iv.x[len(iv.x)-1]+0.5
	ymin, ymax = math.Inf(1), math.Inf(-1)
	for i := range iv.x {
		ymin, ymax = math.Min(ymin, iv.lo[i]), math.Max(ymax, iv.hi[i])
	}
	return
}

// intervalComponents is how many eigenvalue intervals the figure shows.
const intervalComponents = 10

func eigenIntervalFigure(res *analysis.Result) drawing {
	st := res.Stability
	m := min(len(st.Eigenvalues), intervalComponents)
	var iv intervals
	left := 0
	for a := 0; a < m; a++ {
		y, lo, hi := res.Decomp.Eigenvalues[a], st.Eigenvalues[a].Low, st.Eigenvalues[a].High
		if !isFinite(y) || !isFinite(lo) || !isFinite(hi) {
			left++
			continue
		}
		iv.x = append(iv.x, float64(a+1))
		iv.y, iv.lo, iv.hi = append(iv.y, y), append(iv.lo, lo), append(iv.hi, hi)
		iv.retained = append(iv.retained, a < res.Retained)
	}
	pl := newPlot("Eigenvalues with 95 % bootstrap intervals", "component", "eigenvalue")
	pl.Add(guides{})
	if len(iv.x) > 0 {
		pl.Add(iv)
	}
	pl.X.Tick.Marker = integerTicks{}
	pl.Y.Min = 0
	dr := drawing{plot: pl, w: figWidth, h: figHeight}
	dr.leaveOut(left, "component")
	return dr
}
