package checks

import (
	"fmt"
	"math"
	"strings"

	"pcqc/analysis"
)

var reviewOrthonormality = Check{
	ID:     "review-orthonormality",
	Title:  "Their loadings are orthonormal",
	Source: "fact of the trade; allowance for printed precision 2√p · half a unit of the last printed digit (common practice)",
	Mode:   ModeReview,
	judge: func(in Input) Result {
		rv := in.Review
		p, _ := rv.Loadings.V.Dims()
		unit := 0.5 * math.Pow(10, -float64(rv.Loadings.Decimals))
		tol := math.Max(1e-6, 2*math.Sqrt(float64(p))*unit)
		e := rv.Orthonormality
		r := Result{Value: e, Limit: tol}
		norms := make([]string, len(rv.ColumnNorms))
		for a, n := range rv.ColumnNorms {
			norms[a] = fmt.Sprintf("%.3g", n)
		}
		var zero []string
		for a, n := range rv.ColumnNorms {
			if !(n > analysis.NegligibleNorm) {
				zero = append(zero, rv.Loadings.Components[a])
			}
		}
		switch {
		case len(zero) > 0:
			// Checked first: a zero column is no direction whatever the
			// printed precision, and with loadings printed as whole numbers
			// the allowance alone would let it pass.
			r.Status = Fail
			r.Message = fmt.Sprintf("The reported loadings of %s are zero or vanishingly small (column lengths %s), so they are not orthonormal and cannot be PCA loadings: they were lost, truncated or printed with too few digits.", strings.Join(zero, ", "), strings.Join(norms, ", "))
		case e <= tol:
			r.Status = Pass
			r.Message = fmt.Sprintf("The reported loadings are orthonormal to their printed precision (max |VᵀV − I| = %s, allowance %s for %d decimals).", sci(e), sci(tol), rv.Loadings.Decimals)
		case rv.ScaledBySD:
			r.Status = Warn
			r.Message = fmt.Sprintf("The reported loadings are orthogonal eigenvectors multiplied by the components' standard deviations (column lengths %s, the square roots of the eigenvalues). This correlation-style convention is legitimate, but it must be stated, and such loadings are not the directions the scores were projected on.", strings.Join(norms, ", "))
		case e > math.Max(tol, ReviewOrthonormalityFail):
			r.Status = Fail
			r.Message = fmt.Sprintf("The reported loadings are not orthonormal (max |VᵀV − I| = %s; column lengths %s), which PCA loadings always are: they were rotated, rescaled or mistyped, or they are not PCA loadings.", sci(e), strings.Join(norms, ", "))
		default:
			r.Status = Warn
			r.Message = fmt.Sprintf("The reported loadings are nearly but not quite orthonormal (max |VᵀV − I| = %s, beyond the %s their %d printed decimals explain).", sci(e), sci(tol), rv.Loadings.Decimals)
		}
		return r
	},
}
