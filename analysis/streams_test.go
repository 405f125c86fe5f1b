package analysis

import "testing"

// Every random stream has its own base, so that two computations never
// draw the same numbers from the same seed (cross-validation and the robust
// fit's directions once shared one).
func TestRandomStreamsAreDistinct(t *testing.T) {
	streams := map[string]uint64{
		"permutation": streamPermutation, "bootstrap": streamBootstrap,
		"cross-validation": streamCrossValidation, "robust direction": streamRobustDirection,
		"robust MCD": streamRobustMCD, "impute CV": streamImputeCV,
		"BLB subset": streamBLBSubset, "BLB resample": streamBLBResample,
		"stream reservoir": streamReservoir, "stream Poisson": streamPoisson,
	}
	seen := map[uint64]string{}
	for name, s := range streams {
		if other, dup := seen[s]; dup {
			t.Errorf("%s and %s share the stream base %#x", name, other, s)
		}
		seen[s] = name
	}
}
