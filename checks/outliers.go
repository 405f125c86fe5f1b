package checks

import (
	"fmt"
	"math"

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
	p := analysis.BinomialUpperTail(n95, n, 1-analysis.Conf95)
	limits := map[string]float64{
		"limit_95": l.lim95, "limit_99": l.lim99,
		"limit_family": l.family, "family_confidence": l.conf,
		"binomial_alpha": BinomialAlpha, "limit_count_95": l.count95,
	}
	if l.tailDF > 0 {
		limits["tail_df"] = l.tailDF
	}
	r := Result{Value: nFam, Limit: limits}
	familyText := fmt.Sprintf("the family-wise limit of %s, %s at per-sample confidence %s (Šidák: %d clean samples together pass it with probability %s)",
		what, g3(l.family), confText(l.conf), n, pct(analysis.FamilyAlpha))
	if l.tail != "" {
		familyText += "; " + l.tail
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
func tailText(f analysis.TailFit, normal float64) string {
	if !f.Fitted() {
		return ""
	}
	return fmt.Sprintf("the samples' own tail is heavier than normal theory (a scaled F(%s, %s) fitted to the median and the upper %d samples), which raises the normal-theory limit %s",
		g3(f.D1), g3(f.DF), analysis.TailFitCount, g3(normal))
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
	Source: "Hotelling T² with the beta-distribution limits of Tracy, Young & Mason (1992), judged family-wise: Šidák (1967) correction for n samples at α = 0.01, and a binomial tail test of the count beyond 95 % at α = 0.001; where the T² values' own tail is heavier, the limits of a scaled F fitted to their median and upper quantile (robust quantile matching after Hubert, Rousseeuw & Vanden Branden 2005)",
	judge: func(in Input) Result {
		s := in.Run.Samples
		if math.IsNaN(s.Limits.T2_99) || math.IsNaN(s.Limits.T2Family) {
			return Result{Status: Skip, Message: fmt.Sprintf("The T² limit needs n > k + 1 (n = %d, k = %d).", in.Run.Decomp.Rows, in.Run.Retained)}
		}
		l := s.Limits
		return limitCheck(s.T2, familyLimits{l.T2_95, l.T2_99, l.T2Family, l.FamilyConf, l.T2Count95, tailText(l.T2Tail, l.T2FamilyNormal), fittedDF(l.T2Tail)}, in.Run.Table.IDs,
			"Hotelling T²",
			"These samples lie unusually far from the centre within the component plane: extreme but consistent with the correlation structure. Check them for real extremes or errors before they shape the components.")
	},
}

var outliersQ = Check{
	ID:     "outliers-q",
	Title:  "Outliers off the model (Q residual)",
	Source: "Q residual (squared prediction error) with Jackson & Mudholkar (1979) limits, Box (1954) χ² approximation where JM is undefined, judged family-wise: Šidák (1967) correction for n samples at α = 0.01, and a binomial tail test of the count beyond 95 % at α = 0.001; where the Q values' own tail is heavier, the limits of a scaled F, the heavy-tailed extension of Box's g·χ²_h, fitted to their median and upper quantile (robust quantile matching after Hubert, Rousseeuw & Vanden Branden 2005)",
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
		return limitCheck(s.Q, familyLimits{l.Q95, l.Q99, l.QFamily, l.FamilyConf, l.QCount95, tailText(l.QTail, l.QFamilyNormal), fittedDF(l.QTail)}, in.Run.Table.IDs,
			fmt.Sprintf("Q (%s)", method),
			"These samples do not fit the correlation structure of the rest (a broken sensor, a unit error, a contamination, or a genuinely different kind of sample). Look at their residuals variable by variable.")
	},
}
