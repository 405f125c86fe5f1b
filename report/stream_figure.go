package report

import (
	"fmt"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"pcqc/analysis"
)

// streamFigurePoints is the most sampled points the streamed score plot
// draws (issue 16: score plots draw at most about 5,000 points).
const streamFigurePoints = 5000

// streamScoreFigure draws PC1 against PC2 for the first
// streamFigurePoints rows of the reservoir sample (itself a uniform random
// sample, so its first rows are one too) and every kept flagged sample. It
// returns false when fewer than two components are retained.
func streamScoreFigure(res *analysis.StreamResult, dir string) (caption string, ok bool, err error) {
	if res.Retained < 2 {
		return "", false, nil
	}
	rows, _ := res.Sample.Dims()
	rows = min(rows, streamFigurePoints)
	x, y := make([]float64, rows), make([]float64, rows)
	v := res.Decomp.Loadings
	for i := 0; i < rows; i++ {
		z := res.Sample.RawRowView(i)
		for j, zj := range z {
			x[i] += zj * v.At(j, 0)
			y[i] += zj * v.At(j, 1)
		}
	}
	fx, fy := make([]float64, len(res.Flagged)), make([]float64, len(res.Flagged))
	for i, s := range res.Flagged {
		fx[i], fy[i] = s.Scores[0], s.Scores[1]
	}
	p := newPlot("Scores (streamed)", "PC1", "PC2")
	p.Add(guides{})
	addScatter(p, x, y, draw.GlyphStyle{Color: mutedColor, Shape: draw.RingGlyph{}, Radius: vg.Points(1.6)}, "random sample of rows")
	addScatter(p, fx, fy, draw.GlyphStyle{Color: accent99, Shape: draw.CircleGlyph{}, Radius: vg.Points(2.6)}, "beyond a family-wise limit")
	d := drawing{plot: p, w: figWidth, h: figHeight, equalAspect: true}
	if err := d.saveAs(dir, "stream-scores", true, true); err != nil {
		return "", false, err
	}
	caption = fmt.Sprintf("Scores on PC1 and PC2 of a uniform random sample of %d of the %d rows (reservoir sampling) and of all %d samples beyond a family-wise T² or Q limit", rows, res.Rows, len(res.Flagged))
	if len(res.Flagged) < res.FlaggedCount {
		caption += fmt.Sprintf(" (the first %d of %d)", len(res.Flagged), res.FlaggedCount)
	}
	return caption + ".", true, nil
}
