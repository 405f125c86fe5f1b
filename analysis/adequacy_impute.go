package analysis

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// EffectiveSamples is the sample size Bartlett's test and the KMO noise
// terms use when cells were imputed: n·(observed cells / all cells),
// rounded down. Imputed cells are predictions from the other cells, not
// measurements, so they add no information; counting a table with 15 % of
// its cells imputed as n full samples would overstate the evidence (the
// χ² of Bartlett's test grows with n). Scaling n by the observed share is
// common practice for a single summary of a partly observed table (it is
// the average number of observations per variable); rounding down keeps
// the test on the cautious side.
func EffectiveSamples(n int, observedShare float64) int {
	return int(math.Floor(float64(n)*observedShare + 1e-9))
}

// imputed recomputes Bartlett's test and KMO with the effective sample
// size, and records it.
func (a *Adequacy) imputed(z *mat.Dense, imp *Imputation) {
	n, _ := z.Dims()
	a.ImputedShare = 1 - imp.ObservedShare
	a.EffectiveN = EffectiveSamples(n, imp.ObservedShare)
	a.Bartlett, a.KMO = correlationTestsN(z, a.EffectiveN)
}
