package checks

import (
	"fmt"
	"math"
	"strings"

	"pcqc/analysis"
)

// familyLimits are the limits one outlier check judges against.
type familyLimits struct {
	lim95, lim99 float64
	family, conf float64 // the Šidák family-wise limit and its per-sample confidence
	// count95 is the 95 % limit of the binomial count test: lim95, or the
	// fitted tail's 95 % quantile where that is larger; tail describes the
	// fit ("" when normal theory holds).
	count95 float64
	tail    string
	tailDF  float64 // the fitted ν, 0 without a fit
	// flagged, when not nil, are the samples beyond the family-wise limit
	// as the analysis judged them (T²'s Phase I re-estimation); phase
	// describes that judgement, extra adds numbers to the summary.
	flagged []int
	phase   string
	extra   map[string]float64
}

// limitCheck judges per-sample statistics family-wise, so that a clean
// table of any size passes with probability about 1 − α. It warns when
//
//   - a sample passes the limit at the Šidák per-sample confidence
//     (1 − α)^(1/n), α = analysis.FamilyAlpha: that sample is unlikely even
//     allowing for n chances, and it is named; or
//   - the count beyond the 95 % limit is far more than chance allows: the
//     binomial tail P(X ≥ count | n, 0.05) is below BinomialAlpha. This
//     catches many moderate outliers, none of which is extreme alone.
//
// Passing the 99 % limit alone is expected of about 1 % of clean samples,
// so it no longer warns; samples.csv and the figures keep those limits.
func limitCheck(values []float64, l familyLimits, ids []string, what, remedy string) Result {
	n := len(values)
	if l.count95 == 0 {
		l.count95 = l.lim95
	}
	n95, _ := analysis.CountAbove(values, l.count95)
	n99, idx99 := analysis.CountAbove(values, l.lim99)
	nFam, idxFam := analysis.CountAbove(values, l.family)
	if l.flagged != nil {
		nFam, idxFam = len(l.flagged), l.flagged
	}
	p := analysis.BinomialUpperTail(n95, n, 1-analysis.Conf95)
	limits := map[string]float64{
		"limit_95": l.lim95, "limit_99": l.lim99,
		"limit_family": l.family, "family_confidence": l.conf,
		"binomial_alpha": BinomialAlpha, "limit_count_95": l.count95,
	}
	if l.tailDF > 0 {
		limits["tail_df"] = l.tailDF
	}
	for k, v := range l.extra {
		limits[k] = v
	}
	r := Result{Value: nFam, Limit: limits}
	familyText := fmt.Sprintf("the family-wise limit of %s, %s at per-sample confidence %s (Šidák: %d clean samples together pass it with probability %s)",
		what, g3(l.family), confText(l.conf), n, pct(analysis.FamilyAlpha))
	if l.tail != "" {
		familyText += "; " + l.tail
	}
	if l.phase != "" {
		familyText += "; " + l.phase
	}
	chance := fmt.Sprintf("%s beyond the 95 %% limit (%s) where chance gives %s (binomial %s, alarm below %s); %s beyond the 99 %% limit (%s expected).",
		countNoun(n95, "sample"), g3(l.count95), g3(0.05*float64(n)), pvalue(p), sci(BinomialAlpha), countNoun(n99, "sample"), g3(0.01*float64(n)))
	excess := p < BinomialAlpha
	switch {
	case nFam == 0 && !excess:
		r.Status = Pass
		r.Message = fmt.Sprintf("No sample passes %s. %s", familyText, chance)
	case nFam > 0:
		r.Status = Warn
		r.Message = fmt.Sprintf("%s %s %s. They are: %s. %s %s", countNoun(nFam, "sample"), plural("passes", "pass", nFam), familyText, listIDs(idsOf(ids, idxFam)), chance, remedy)
	default:
		r.Status = Warn
		named := ""
		if n99 > 0 {
			named = fmt.Sprintf(" Those beyond the 99 %% limit are: %s.", listIDs(idsOf(ids, idx99)))
		}
		r.Message = fmt.Sprintf("Too many samples lie beyond the 95 %% limit for chance, though none passes %s: %s%s %s", familyText, chance, named, remedy)
	}
	return r
}

// tailText says, when the statistic's tail is heavier than normal theory,
// which fitted law sets the limits and what the normal-theory family-wise
// limit was.
func tailText(f analysis.TailFit, c analysis.ComponentTail, componentLimit, normal float64) string {
	var parts []string
	if f.Fitted() {
		parts = append(parts, fmt.Sprintf("the statistic's own tail is heavier than normal theory (a scaled F(%s, %s) fitted to its median and its upper %d samples)",
			g3(f.D1), g3(f.DF), analysis.TailFitCount))
	}
	if c.Fitted() && componentLimit > normal {
		parts = append(parts, fmt.Sprintf("the components' fitted tail weight (%s) gives, for a sum of such terms, %s",
			componentTailText(c), g3(componentLimit)))
	}
	if len(parts) == 0 {
		return ""
	}
	return strings.Join(parts, "; ") + fmt.Sprintf("; either raises the normal-theory limit %s", g3(normal))
}

// componentTailText says which evidence set the components' tail weight.
func componentTailText(c analysis.ComponentTail) string {
	var ev []string
	if c.Scores.Fitted() {
		ev = append(ev, fmt.Sprintf("retained scores: Student t with ν = %s, likelihood-ratio %s on %d values", g3(c.Scores.DF), g3(c.Scores.LR), c.Scores.Values))
	}
	if !math.IsInf(c.QDF, 1) && !math.IsNaN(c.QDF) {
		ev = append(ev, fmt.Sprintf("Q's variance: excess kurtosis %s, z = %s, ν = %s", g3(c.QKurtosis), g3(c.QZ), g3(c.QDF)))
	}
	return strings.Join(ev, "; ") + fmt.Sprintf("; limits use ν = %s", g3(c.DF))
}

// componentNumbers are the component-tail figures for summary.json.
func componentNumbers(c analysis.ComponentTail, limit float64) map[string]float64 {
	m := map[string]float64{}
	if c.Fitted() {
		m["component_tail_df"] = c.DF
		if !math.IsNaN(limit) {
			m["limit_family_component_tail"] = limit
		}
	}
	return m
}

// fittedDF is the fitted degrees of freedom, or 0 without a fit (summary
// numbers must be finite).
func fittedDF(f analysis.TailFit) float64 {
	if f.Fitted() {
		return f.DF
	}
	return 0
}

// confText writes a confidence near 1 with enough digits to differ from 1.
func confText(c float64) string {
	if math.IsNaN(c) {
		return "NaN"
	}
	return fmt.Sprintf("1 − %.3g", 1-c)
}

var outliersT2 = Check{
	ID:     "outliers-t2",
	Title:  "Outliers within the model (Hotelling T²)",
	Source: "Hotelling T² with the beta-distribution limits of Tracy, Young & Mason (1992), judged family-wise: Šidák (1967) correction for n samples at α = 0.01, with samples beyond it set aside and the rest's variances estimated again until the set settles (Phase I practice, Sullivan & Woodall 1996), and a binomial tail test of the count beyond 95 % at α = 0.001; where the T² values' own tail is heavier, the limits of a scaled F fitted to their median and upper quantile (robust quantile matching after Hubert, Rousseeuw & Vanden Branden 2005); where the components' scores are heavier-tailed than the Gaussian (Student t by maximum likelihood after Lange, Little & Taylor 1989, or Q's excess variance), the single-big-jump tail of a sum of t terms (Embrechts, Klüppelberg & Mikosch 1997)",
	judge: func(in Input) Result {
		s := in.Run.Samples
		if math.IsNaN(s.Limits.T2_99) || math.IsNaN(s.Limits.T2Family) {
			return Result{Status: Skip, Message: fmt.Sprintf("The T² limit needs n > k + 1 (n = %d, k = %d).", in.Run.Decomp.Rows, in.Run.Retained)}
		}
		l := s.Limits
		fl := familyLimits{lim95: l.T2_95, lim99: l.T2_99, family: l.T2Family, conf: l.FamilyConf, count95: l.T2Count95,
			tail: tailText(l.T2Tail, l.Components, l.T2FamilyComponent, l.T2FamilyNormal), tailDF: fittedDF(l.T2Tail),
			flagged: l.T2Flagged, extra: componentNumbers(l.Components, l.T2FamilyComponent)}
		if fl.flagged == nil {
			fl.flagged = []int{}
		}
		if ph := l.T2Phase; ph.T2 != nil {
			fl.extra["phase1_kept"] = float64(ph.Kept)
			fl.extra["phase1_rounds"] = float64(ph.Rounds)
			if len(ph.SetAside) > 0 {
				fl.phase = fmt.Sprintf("the samples beyond it were set aside and T² estimated again from the other %d, each set-aside sample judged as a new one against that limit (Phase I practice; %d %s)",
					ph.Kept, ph.Rounds, plural("round", "rounds", ph.Rounds))
			}
		}
		return limitCheck(s.T2, fl, in.Run.Table.IDs,
			"Hotelling T²",
			"These samples lie unusually far from the centre within the component plane: extreme but consistent with the correlation structure. Check them for real extremes or errors before they shape the components.")
	},
}

var outliersQ = Check{
	ID:     "outliers-q",
	Title:  "Outliers off the model (Q residual)",
	Source: "Q residual (squared prediction error) with Jackson & Mudholkar (1979) limits, Box (1954) χ² approximation where JM is undefined, judged family-wise: Šidák (1967) correction for n samples at α = 0.01, and a binomial tail test of the count beyond 95 % at α = 0.001; where the Q values' own tail is heavier, the limits of a scaled F, the heavy-tailed extension of Box's g·χ²_h, fitted to their median and upper quantile (robust quantile matching after Hubert, Rousseeuw & Vanden Branden 2005); where Q's variance shows heavier-tailed components than the Gaussian (method of moments, one-sided z test at 5 %), the single-big-jump tail of a sum of t terms (Embrechts, Klüppelberg & Mikosch 1997)",
	judge: func(in Input) Result {
		s := in.Run.Samples
		if s.Limits.QMethod == analysis.QNone {
			return Result{Status: Skip, Message: "Every component is retained, so nothing is left for a residual."}
		}
		method := "Jackson–Mudholkar"
		if s.Limits.QMethod == analysis.QBox {
			method = "Box's χ² approximation, as the Jackson–Mudholkar formula is undefined for these eigenvalues"
		}
		l := s.Limits
		fl := familyLimits{lim95: l.Q95, lim99: l.Q99, family: l.QFamily, conf: l.FamilyConf, count95: l.QCount95,
			tail: tailText(l.QTail, l.Components.ForQ(), l.QFamilyComponent, l.QFamilyNormal), tailDF: fittedDF(l.QTail),
			extra: componentNumbers(l.Components.ForQ(), l.QFamilyComponent)}
		return limitCheck(s.Q, fl, in.Run.Table.IDs,
			fmt.Sprintf("Q (%s)", method),
			"These samples do not fit the correlation structure of the rest (a broken sensor, a unit error, a contamination, or a genuinely different kind of sample). Look at their residuals variable by variable: contributions.csv lists them, and the Outliers section plots the most extreme.")
	},
}
