package checks

import "fmt"

var orthonormalLoadings = Check{
	ID:     "orthonormal-loadings",
	Title:  "Loadings are orthonormal",
	Source: sourceFactOfTrade,
	judge: func(in Input) Result {
		e := in.Run.Properties.OrthonormalityError
		r := Result{Value: e, Limit: OrthonormalityLimit}
		if e <= OrthonormalityLimit {
			r.Status = Pass
			r.Message = fmt.Sprintf("The retained loading vectors have unit length and are mutually orthogonal (max |VᵀV − I| = %s), so each component is a distinct direction.", sci(e))
		} else {
			r.Status = Fail
			r.Message = fmt.Sprintf("The retained loadings are not orthonormal (max |VᵀV − I| = %s): the components overlap and their variances do not add up. This points to a numerical failure; do not interpret the loadings.", sci(e))
		}
		return r
	},
}
