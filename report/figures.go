package report

import (
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"

	"pcqc/analysis"
)

// Figure is one figure of the report: PNG (300 dpi, for the PDF and
// Markdown) and SVG (for HTML) files in figures/, with a caption.
type Figure struct {
	Stem    string // file name without extension
	Alt     string // short description for screen readers and the image tag
	Caption string
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
	// legendOutside draws the legend in a column right of the plot, for
	// plots whose data fill the whole field.
	legendOutside bool
	// equalAspect gives both axes the same scale, so that distances and
	// angles in the plane read true (score plots, biplots).
	equalAspect bool
}

// drawable checks that the plot can be drawn in c: finite axis ranges and a
// data area left after the axes and labels take their room. gonum/plot
// would otherwise loop looking for ticks of a NaN range.
func drawable(p *plot.Plot, c draw.Canvas) error {
	for _, v := range []float64{p.X.Min, p.X.Max, p.Y.Min, p.Y.Max} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("axis range is not finite")
		}
	}
	dc := p.DataCanvas(c)
	if dc.Max.X-dc.Min.X < vg.Points(20) || dc.Max.Y-dc.Min.Y < vg.Points(20) {
		return fmt.Errorf("no room left for the data")
	}
	return nil
}

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

// saveAs writes the drawing as PNG, SVG or both into dir/figures.
func (d drawing) saveAs(dir, stem string, pngToo, svgToo bool) error {
	if err := os.MkdirAll(filepath.Join(dir, "figures"), 0o755); err != nil {
		return err
	}
	var failed error
	render := func(c vg.CanvasSizer) {
		dc := draw.New(c)
		if !d.legendOutside {
			field := draw.Crop(dc, 0, -d.rightMargin, 0, 0)
			if d.equalAspect {
				equalise(d.plot, field)
			}
			if failed = drawable(d.plot, field); failed == nil {
				d.plot.Draw(field)
			}
			return
		}
		legend := d.plot.Legend
		d.plot.Legend = plot.NewLegend()
		defer func() { d.plot.Legend = legend }()
		width := legend.Rectangle(dc).Size().X + vg.Points(10)
		field := draw.Crop(dc, 0, -width, 0, 0)
		if d.equalAspect {
			equalise(d.plot, field)
		}
		if failed = drawable(d.plot, field); failed != nil {
			return
		}
		d.plot.Draw(field)
		legend.Left, legend.Top = true, true
		strip := draw.Crop(dc, dc.Max.X-dc.Min.X-width+vg.Points(8), 0, 0, -vg.Points(28))
		legend.Draw(strip)
	}
	if pngToo {
		img := vgimg.NewWith(vgimg.UseWH(d.w, d.h), vgimg.UseDPI(figureDPI))
		render(img)
		if failed != nil {
			return failed
		}
		if err := writeTo(filepath.Join(dir, "figures", stem+".png"), vgimg.PngCanvas{Canvas: img}); err != nil {
			return err
		}
	}
	if !svgToo {
		return nil
	}
	svg := vgsvg.New(d.w, d.h)
	render(svg)
	if failed != nil {
		return failed
	}
	return writeTo(filepath.Join(dir, "figures", stem+".svg"), svg)
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

// saveFigures renders every figure of the document into dir/figures, as
// PNG (for the PDF and the Markdown) and SVG (for the HTML).
//
// Each figure is one pixel wider than the one before. fpdf writes image
// objects sorted by pixel width and leaves ties in map order, which would
// make the PDF's bytes differ from run to run; distinct widths make the
// order, and so the file, reproducible. One pixel at 300 dpi is 0.08 mm.
func (d *Document) saveFigures(dir string) error { return saveFigures(d.figures, dir, true, true) }

// saveFigures renders the PNG files, the SVG files or both.
func saveFigures(figures []figureJob, dir string, pngToo, svgToo bool) error {
	for i, job := range figures {
		dr := job.drawing()
		dr.w += vg.Length(i) * vg.Inch / figureDPI
		if err := dr.saveAs(dir, job.fig.Stem, pngToo, svgToo); err != nil {
			return fmt.Errorf("figure %s: %w", job.fig.Stem, err)
		}
	}
	return nil
}

// componentLabel is an axis label with the component's share of variance,
// e.g. "PC1 · 48.2 %".
func componentLabel(res *analysis.Result, a int) string {
	return fmt.Sprintf("PC%d · %.1f %%", a+1, Percentages(res.Decomp.Eigenvalues)[a])
}

type xy struct{ x, y []float64 }

func (p xy) Len() int                    { return len(p.x) }
func (p xy) XY(i int) (float64, float64) { return p.x[i], p.y[i] }

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
	for a := 0; a < m; a++ {
		idx[a] = float64(a + 1)
		obs[a] = d.Eigenvalues[a]
		stick[a] = res.Counts.BrokenStickShares[a] * total
		running += d.Eigenvalues[a]
		cum[a] = running / total
		ymax = math.Max(ymax, math.Max(obs[a], stick[a]))
	}
	p := newPlot("Scree", "component", "eigenvalue")
	p.Add(guides{})
	p.X.Min, p.X.Max = 0.5, float64(m)+0.5
	p.Y.Min = 0
	p.Y.Max = ymax * 1.08
	p.X.Tick.Marker = integerTicks{}

	cumLine, _ := plotter.NewLine(xy{idx, scaleSlice(cum, p.Y.Max)})
	cumLine.LineStyle = lineStyle(mutedColor, 0.8, 1.5, 1.5)
	p.Add(cumLine)
	p.Legend.Add("cumulative share (right axis)", cumLine)

	stickLine, _ := plotter.NewLine(xy{idx, stick})
	stickLine.LineStyle = lineStyle(accent95, 1, 4, 2)
	p.Add(stickLine)
	p.Legend.Add("broken stick", stickLine)

	if res.Counts.Parallel.Permutations > 0 {
		pa, _ := plotter.NewLine(xy{idx, res.Counts.Parallel.P95[:m]})
		pa.LineStyle = lineStyle(accent99, 1, 1, 2)
		p.Add(pa)
		p.Legend.Add("permuted data, 95th percentile", pa)
	}

	line, _ := plotter.NewLine(xy{idx, obs})
	line.LineStyle = lineStyle(mainColor, 1.2)
	p.Add(line)
	kept := res.Retained
	in, out := xy{idx[:min(kept, m)], obs[:min(kept, m)]}, xy{idx[min(kept, m):], obs[min(kept, m):]}
	keptPts, _ := plotter.NewScatter(in)
	keptPts.GlyphStyle = draw.GlyphStyle{Color: mainColor, Shape: draw.CircleGlyph{}, Radius: vg.Points(3)}
	restPts, _ := plotter.NewScatter(out)
	restPts.GlyphStyle = draw.GlyphStyle{Color: mainColor, Shape: draw.RingGlyph{}, Radius: vg.Points(3)}
	p.Add(keptPts, restPts)
	p.Legend.Add("observed, retained", keptPts)
	if out.Len() > 0 {
		p.Legend.Add("observed, not retained", restPts)
	}
	p.Add(secondAxis{scale: p.Y.Max / 100, ticks: []float64{0, 25, 50, 75, 100}, unit: " %", label: "cumulative share of variance"})
	// Below the cumulative curve, which fills the top right.
	p.Legend.YOffs = -figHeight * 0.22
	return drawing{plot: p, w: figWidth, h: figHeight, rightMargin: vg.Points(52)}
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
	lo, hi := int(math.Ceil(min)), int(math.Floor(max))
	step := 1
	for (hi-lo)/step > 12 {
		step *= 2
	}
	var ticks []plot.Tick
	for v := lo; v <= hi; v++ {
		if v%step == 0 || step == 1 {
			ticks = append(ticks, plot.Tick{Value: float64(v), Label: strconv.Itoa(v)})
		}
	}
	return ticks
}

// loadingsShown is how many variables a loadings bar figure shows at most.
const loadingsShown = 30

func loadingsFigure(res *analysis.Result, a int) drawing {
	p := res.Decomp.Vars
	order := make([]int, p)
	for j := range order {
		order[j] = j
	}
	v := res.Decomp.Loadings
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
	shown := min(p, loadingsShown)
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
		names[row] = shorten(res.Table.Variables[j], maxLabelRunes)
		if withCI {
			li := st.Loadings[j][a]
			bars.low[row], bars.hi[row] = li.Low, li.High
			bars.unstable[row] = !li.ExcludesZero()
		}
	}
	title := fmt.Sprintf("Loadings on %s", componentLabel(res, a))
	if shown < p {
		title += fmt.Sprintf(" (the %d largest of %d)", shown, p)
	}
	pl := newPlot(title, "loading", "")
	pl.Add(bars)
	pl.NominalY(names...)
	pl.Y.Tick.Label.Font = textFont(7.5, false)
	pl.Y.LineStyle.Width = 0
	pl.Y.Tick.LineStyle.Width = 0
	h := vg.Length(2.2+0.42*float64(shown)) * vg.Centimeter
	return drawing{plot: pl, w: figWidth, h: max(h, 6*vg.Centimeter)}
}

// groupsOf returns the distinct groups in order of first appearance, and
// each sample's group index.
func groupsOf(t *analysis.Table) ([]string, []int) {
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

func sampleLabels(res *analysis.Result, x, y []float64) *plotter.Labels {
	return labelPoints(res.Table.IDs, flaggedSamples(res), x, y)
}

// labelPoints names the flagged points (most extreme first, at most
// labelledSamples of them).
func labelPoints(ids []string, flagged []int, x, y []float64) *plotter.Labels {
	if len(flagged) > labelledSamples {
		flagged = flagged[:labelledSamples]
	}
	var lx, ly []float64
	var names []string
	for _, i := range flagged {
		lx, ly = append(lx, x[i]), append(ly, y[i])
		names = append(names, shorten(ids[i], maxLabelRunes))
	}
	if len(names) == 0 {
		return nil
	}
	l, _ := plotter.NewLabels(plotter.XYLabels{XYs: xyPairs(lx, ly), Labels: names})
	for i := range l.TextStyle {
		l.TextStyle[i] = text.Style{Color: accent99, Font: textFont(6.5, false), Handler: plot.DefaultTextHandler, XAlign: text.XLeft, YAlign: text.YBottom}
	}
	l.Offset = vg.Point{X: vg.Points(3), Y: vg.Points(2)}
	return l
}

// maxLabelRunes is the longest sample id or variable name a figure prints;
// longer ones are cut with an ellipsis (tables and CSV files keep them).
const maxLabelRunes = 28

func shorten(s string, max int) string {
	s = strings.Join(strings.Fields(s), " ")
	r := []rune(s)
	if len(r) <= max {
		return s
	}
	return string(r[:max-1]) + "…"
}

func xyPairs(x, y []float64) plotter.XYs {
	out := make(plotter.XYs, len(x))
	for i := range x {
		out[i].X, out[i].Y = x[i], y[i]
	}
	return out
}

// addGroupedPoints draws the samples, one series per group (colour and
// shape), or all alike beyond maxColouredGroups.
func addGroupedPoints(p *plot.Plot, t *analysis.Table, x, y []float64) {
	groups, of := groupsOf(t)
	if groups == nil || len(groups) > maxColouredGroups {
		s, _ := plotter.NewScatter(xy{x, y})
		s.GlyphStyle = draw.GlyphStyle{Color: mainColor, Shape: draw.CircleGlyph{}, Radius: vg.Points(2.2)}
		p.Add(s)
		if groups != nil {
			p.Legend.Add(fmt.Sprintf("%d groups of %s: too many to tell apart, drawn alike", len(groups), t.GroupColumn), s)
		}
		return
	}
	for g, name := range groups {
		var gx, gy []float64
		for i := range x {
			if of[i] == g {
				gx, gy = append(gx, x[i]), append(gy, y[i])
			}
		}
		s, _ := plotter.NewScatter(xy{gx, gy})
		s.GlyphStyle = groupStyle(g)
		p.Add(s)
		label := shorten(name, maxLabelRunes)
		if label == "" {
			label = "(no group)"
		}
		p.Legend.Add(label, s)
	}
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
		e, _ := plotter.NewLine(ellipse(math.Sqrt(lim*ev[a]), math.Sqrt(lim*ev[b])))
		e.LineStyle = lineStyle(accent95, 1, 4, 2)
		p.Add(e)
		p.Legend.Add("95 % Hotelling T² ellipse", e)
	}
	addGroupedPoints(p, res.Table, x, y)
	if l := sampleLabels(res, x, y); l != nil {
		p.Add(l)
	}
	return drawing{plot: p, w: figWidth, h: figTall, legendOutside: true, equalAspect: true}
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
	if lim := analysis.T2LimitModel(n, 1, analysis.Conf95); !math.IsNaN(lim) {
		r := math.Sqrt(lim * res.Decomp.Eigenvalues[0])
		p.Add(refLine{at: r, style: lineStyle(accent95, 1, 4, 2), label: "95 % limit"}, refLine{at: -r, style: lineStyle(accent95, 1, 4, 2)})
	}
	addGroupedPoints(p, res.Table, x, y)
	if l := sampleLabels(res, x, y); l != nil {
		p.Add(l)
	}
	return drawing{plot: p, w: figWidth, h: figHeight, legendOutside: true}
}

// biplotVariables is the most variables a biplot draws.
const biplotVariables = 30

// biplotFigure is Gabriel's (1971, Biometrika 58:453–467) biplot of PC1 and
// PC2 in its column-metric form: samples at their standardised scores
// t_ia/√λ_a, variables as arrows to v_ja·√λ_a (for unit-scaled data, the
// correlation of the variable with the component), arrows stretched by one
// common factor to the extent of the samples.
func biplotFigure(res *analysis.Result) drawing {
	n, p := res.Decomp.Rows, res.Decomp.Vars
	ev := res.Decomp.Eigenvalues
	x, y := make([]float64, n), make([]float64, n)
	reach := 0.0
	for i := 0; i < n; i++ {
		x[i] = res.Scores.At(i, 0) / math.Sqrt(ev[0])
		y[i] = res.Scores.At(i, 1) / math.Sqrt(ev[1])
		reach = math.Max(reach, math.Hypot(x[i], y[i]))
	}
	ax, ay := make([]float64, p), make([]float64, p)
	longest := 0.0
	for j := 0; j < p; j++ {
		ax[j] = res.Decomp.Loadings.At(j, 0) * math.Sqrt(ev[0])
		ay[j] = res.Decomp.Loadings.At(j, 1) * math.Sqrt(ev[1])
		longest = math.Max(longest, math.Hypot(ax[j], ay[j]))
	}
	stretch := 1.0
	if longest > 0 {
		stretch = 0.8 * reach / longest
	}
	for j := range ax {
		ax[j] *= stretch
		ay[j] *= stretch
	}
	pl := newPlot("Biplot, PC1 and PC2", componentLabel(res, 0)+" (standardised scores)", componentLabel(res, 1)+" (standardised scores)")
	pl.Add(guides{})
	addGroupedPoints(pl, res.Table, x, y)
	labels := make([]string, p)
	for j, v := range res.Table.Variables {
		labels[j] = shorten(v, maxLabelRunes)
	}
	pl.Add(arrows{x: ax, y: ay, labels: labels})
	return drawing{plot: pl, w: figWidth, h: figTall, legendOutside: true, equalAspect: true}
}

func t2qFigure(res *analysis.Result) drawing {
	s := res.Samples
	return t2qDrawing("Hotelling T² against Q residual", s.T2, s.Q, s.Limits, flaggedSamples(res), res.Table.IDs)
}

// t2qDrawing plots T² against Q with the 95 % and 99 % limits, flagged
// samples marked and named.
func t2qDrawing(title string, t2, q []float64, l analysis.Limits, flaggedIdx []int, ids []string) drawing {
	pl := newPlot(title, "Hotelling T²", "Q residual")
	pl.Add(guides{})
	if !math.IsNaN(l.T2_95) {
		pl.Add(refLine{vertical: true, at: l.T2_95, style: lineStyle(accent95, 1, 4, 2), label: "T² 95 %"})
		pl.Add(refLine{vertical: true, at: l.T2_99, style: lineStyle(accent99, 1), label: "T² 99 %"})
	}
	if l.QMethod != analysis.QNone {
		pl.Add(refLine{at: l.Q95, style: lineStyle(accent95, 1, 4, 2), label: "Q 95 %"})
		pl.Add(refLine{at: l.Q99, style: lineStyle(accent99, 1), label: "Q 99 %"})
	}
	flagged := map[int]bool{}
	for _, i := range flaggedIdx {
		flagged[i] = true
	}
	var ix, iy, fx, fy []float64
	for i := range t2 {
		if flagged[i] {
			fx, fy = append(fx, t2[i]), append(fy, q[i])
		} else {
			ix, iy = append(ix, t2[i]), append(iy, q[i])
		}
	}
	inside, _ := plotter.NewScatter(xy{ix, iy})
	inside.GlyphStyle = draw.GlyphStyle{Color: mutedColor, Shape: draw.RingGlyph{}, Radius: vg.Points(2.2)}
	pl.Add(inside)
	pl.Legend.Add("within the 99 % limits", inside)
	if len(fx) > 0 {
		out, _ := plotter.NewScatter(xy{fx, fy})
		out.GlyphStyle = draw.GlyphStyle{Color: accent99, Shape: draw.PyramidGlyph{}, Radius: vg.Points(3)}
		pl.Add(out)
		pl.Legend.Add("beyond a 99 % limit", out)
	}
	if lab := labelPoints(ids, flaggedIdx, t2, q); lab != nil {
		pl.Add(lab)
	}
	pl.X.Min, pl.Y.Min = 0, 0
	return drawing{plot: pl, w: figWidth, h: figHeight}
}

func congruenceFigure(res *analysis.Result) drawing {
	st := res.Stability
	pl := newPlot("Tucker congruence with the reference loadings over the bootstrap", "component", "congruence φ")
	pl.Add(guides{})
	names := make([]string, len(st.Congruence))
	lo := 1.0
	for a, vals := range st.Congruence {
		names[a] = fmt.Sprintf("PC%d", a+1)
		b, _ := plotter.NewBoxPlot(vg.Points(22), float64(a), plotter.Values(vals))
		b.BoxStyle = lineStyle(mainColor, 0.9)
		b.MedianStyle = lineStyle(mainColor, 1.8)
		b.WhiskerStyle = lineStyle(mainColor, 0.8)
		b.GlyphStyle = draw.GlyphStyle{Color: mutedColor, Shape: draw.RingGlyph{}, Radius: vg.Points(1.6)}
		pl.Add(b)
		for _, v := range vals {
			lo = math.Min(lo, v)
		}
	}
	pl.NominalX(names...)
	pl.Add(refLine{at: 0.95, style: lineStyle(accent95, 1, 4, 2), label: "0.95 equal"})
	pl.Add(refLine{at: 0.85, style: lineStyle(accent99, 1), label: "0.85 fair"})
	pl.Y.Min = math.Min(lo, 0.8) - 0.02
	pl.Y.Max = 1.005
	return drawing{plot: pl, w: figWidth, h: figHeight}
}

// intervals draws points with vertical whiskers.
type intervals struct {
	x, y, lo, hi []float64
	kept         int
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
		if i >= iv.kept {
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
	iv := intervals{kept: res.Retained}
	for a := 0; a < m; a++ {
		iv.x = append(iv.x, float64(a+1))
		iv.y = append(iv.y, res.Decomp.Eigenvalues[a])
		iv.lo = append(iv.lo, st.Eigenvalues[a].Low)
		iv.hi = append(iv.hi, st.Eigenvalues[a].High)
	}
	pl := newPlot("Eigenvalues with 95 % bootstrap intervals", "component", "eigenvalue")
	pl.Add(guides{})
	pl.Add(iv)
	pl.X.Tick.Marker = integerTicks{}
	pl.Y.Min = 0
	return drawing{plot: pl, w: figWidth, h: figHeight}
}
