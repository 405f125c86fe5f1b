package report

import (
	"fmt"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"pcqc/analysis"
)

// RobustBlock is the report's section on the robust cross-check: which
// robust fit was computed, how, and its distance diagram.
type RobustBlock struct {
	Enabled bool
	Text    string
	Figure  Figure
}

// robustBlock describes the robust fit of res (analysis.FitRobust).
func robustBlock(res *analysis.Result) RobustBlock {
	rf := res.Robust
	if rf.Method == "" {
		return RobustBlock{Text: fmt.Sprintf("No robust fit was computed: %s.", rf.Reason)}
	}
	how := fmt.Sprintf("ROBPCA (Hubert, Rousseeuw & Vanden Branden 2005) on an h-subset of %d of %d samples (75 %%, rounded up) and %d seeded directions through pairs of samples", rf.H, len(rf.SD), rf.Directions)
	if rf.Method == analysis.RobustSpherical {
		how = fmt.Sprintf("spherical PCA (Locantore et al. 1999): centred at the spatial median, loadings from the samples projected onto the unit sphere, variances from the squared MAD of the scores; ROBPCA was not used because %s", rf.Reason)
	}
	down := rf.DownWeighted()
	b := RobustBlock{Enabled: true}
	b.Text = fmt.Sprintf("A robust fit of the same %s, on the same preprocessed data: %s. It sets aside %s of %d beyond its score-distance cut-off %s or its orthogonal-distance cut-off %s; the check robust-agreement compares its subspace with the classical one.",
		countOf(res.Retained, "component", "components"), how, countOf(len(down), "sample", "samples"), len(rf.SD), g4(rf.SDCutoff), g4(rf.ODCutoff))
	b.Figure = Figure{Stem: "robust-distances", Alt: "Robust score distance against orthogonal distance",
		Caption: "Each sample's score distance (Mahalanobis distance within the robust fit's subspace) against its orthogonal distance (to that subspace), with the cut-offs of Hubert, Rousseeuw & Vanden Branden (2005): √χ²(k, 0.975) for the score distance, and for the orthogonal distance, the 97.5 % normal quantile of OD to the power 2/3 (median + 1.96 MAD), raised to the power 3/2."}
	return b
}

// countOf writes "1 sample", "3 samples".
func countOf(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return fmt.Sprintf("%d %s", n, many)
}

// robustFigure draws the robust fit's distance diagram: score distance
// across, orthogonal distance up, both cut-offs named, and the samples
// beyond either marked and the most outlying named.
func robustFigure(res *analysis.Result) drawing {
	rf := res.Robust
	pl := newPlot("Robust fit: score distance against orthogonal distance", "score distance", "orthogonal distance")
	pl.Add(guides{})
	ann := &labeller{}
	ann.addRef(pl, refLine{vertical: true, at: rf.SDCutoff, style: lineStyle(accent99, 1), label: "SD cut-off"})
	ann.addRef(pl, refLine{at: rf.ODCutoff, style: lineStyle(accent99, 1), label: "OD cut-off"})
	down := rf.DownWeighted()
	th := thinSamples(rf.SD, rf.OD, down, groupIndex(res.Table))
	var ix, iy, fx, fy []float64
	for _, i := range th.indices(len(rf.SD)) {
		if rf.Beyond(i) {
			fx, fy = append(fx, rf.SD[i]), append(fy, rf.OD[i])
		} else {
			ix, iy = append(ix, rf.SD[i]), append(iy, rf.OD[i])
		}
	}
	_, left := addScatter(pl, ix, iy, draw.GlyphStyle{Color: mutedColor, Shape: draw.RingGlyph{}, Radius: th.glyph(vg.Points(2.2))}, "within both cut-offs")
	_, l2 := addScatter(pl, fx, fy, draw.GlyphStyle{Color: accent99, Shape: draw.PyramidGlyph{}, Radius: vg.Points(3)}, "beyond a cut-off")
	ann.addPoints(ix, iy, vg.Points(2.2))
	ann.addPoints(fx, fy, vg.Points(3))
	nameSamples(ann, res.Table.IDs, down, rf.SD, rf.OD, "beyond a cut-off")
	named := ann.note
	ann.note = func(k int) string {
		return "Hollow grey rings: samples within both cut-offs; filled red triangles: samples the robust fit sets aside. " + named(k)
	}
	pl.X.Min, pl.Y.Min = 0, 0
	dr := drawing{plot: pl, w: figWidth, h: figHeight, ann: ann, sampled: th.caption("the robust fit sets aside")}
	dr.leaveOut(left+l2+th.unseen(len(rf.SD)), "sample")
	return dr
}
