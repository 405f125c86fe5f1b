package checks

import (
	"fmt"
	"strings"

	"pcqc/analysis"
)

var scaling = Check{
	ID:     "scaling",
	Title:  "Scaling suits the variables",
	Source: "common practice (variance ratio > 100 without scaling; near-constant variables under scaling)",
	judge: func(in Input) Result {
		res := in.Run
		ad := res.Adequacy
		names := res.Table.Variables
		if res.Prep.Scaling == analysis.ScaleNone {
			hi, lo := 0, 0
			for j, v := range ad.Variance {
				if v > ad.Variance[hi] {
					hi = j
				}
				if v < ad.Variance[lo] {
					lo = j
				}
			}
			ratio := ad.Variance[hi] / ad.Variance[lo]
			r := Result{Value: ratio, Limit: VarianceRatioLimit}
			if ratio > VarianceRatioLimit {
				r.Status = Warn
				r.Message = fmt.Sprintf("Without scaling, variances differ by %s× (largest %s, smallest %s): %s will dominate PC1 by its units alone. Use --scale unit unless the variables share one unit and their variances are meant to count.",
					g3(ratio), names[hi], names[lo], names[hi])
			} else {
				r.Status = Pass
				r.Message = fmt.Sprintf("Without scaling, the largest variance is %s× the smallest, so no variable dominates by its units alone.", g3(ratio))
			}
			return r
		}
		r := Result{Value: len(ad.NearConstant), Limit: 0}
		if len(ad.NearConstant) == 0 {
			r.Status = Pass
			r.Message = fmt.Sprintf("With %s scaling every variable gets equal weight, and none is so nearly constant that its noise would be inflated.", res.Prep.Scaling)
			return r
		}
		r.Status = Warn
		r.Message = fmt.Sprintf("With %s scaling, %s that barely %s get the same weight as the others. Their noise is inflated: %s (≥ %s of values identical, or variation below %s of the level). Consider --drop for them.",
			res.Prep.Scaling, countNoun(len(ad.NearConstant), "variable"), plural("varies", "vary", len(ad.NearConstant)), strings.Join(namesOf(names, ad.NearConstant), ", "), pct(analysis.NearConstantModeShare), pct(analysis.NearConstantCV))
		return r
	},
}
