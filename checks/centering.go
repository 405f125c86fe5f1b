package checks

import "fmt"

var centering = Check{
	ID:     "centering",
	Title:  "Data are mean-centred",
	Source: sourceFactOfTrade,
	judge: func(in Input) Result {
		e := in.Run.Properties.CenteringError
		r := Result{Value: e, Limit: CenteringLimit}
		if e <= CenteringLimit {
			r.Status = Pass
			r.Message = fmt.Sprintf("Every preprocessed column has mean zero to rounding (largest |mean| is %s of the largest column scale), so the components describe variation around the mean.", sci(e))
		} else {
			r.Status = Fail
			r.Message = fmt.Sprintf("The preprocessed data are not centred (largest |mean| is %s of the largest column scale). Without centring the first component points at the mean instead of the main direction of variation; the results must not be used.", sci(e))
		}
		return r
	},
}
