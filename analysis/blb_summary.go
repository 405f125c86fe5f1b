package analysis

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// bagQuality accumulates, over the subsets, the quality measures of the
// little bootstraps (see bagOfLittleBootstraps), to be averaged.
type bagQuality struct {
	bags              int
	eigLo, eigHi      []float64 // quantiles of λ* − λ̂_j
	pctLo, pctHi      []float64
	loadLo, loadHi    []float64 // p × k
	loadMean          []float64 // mean of V* − V̂_j
	phiMed, phiP5     []float64
	procrMed, procrP5 []float64
	vals              []float64
}

// devQuantiles returns the 2.5 %, 97.5 % quantiles and the mean of
// fill(x) − centre over the x used.
func (q *bagQuality) devQuantiles(count int, centre float64, fill func(x int) float64) (lo, hi, mean float64) {
	q.vals = q.vals[:0]
	sum := 0.0
	for x := 0; x < count; x++ {
		d := fill(x) - centre
		q.vals = append(q.vals, d)
		sum += d
	}
	slices.Sort(q.vals)
	return percentile(q.vals, 2.5), percentile(q.vals, 97.5), sum / float64(count)
}

// add accumulates one subset's measures from its used resamples.
func (q *bagQuality) add(bag littleBootstrap, ok []resampleResult, p, k, m int) {
	q.bags++
	u := len(ok)
	for a := 0; a < m; a++ {
		lo, hi, _ := q.devQuantiles(u, bag.eigen[a], func(x int) float64 { return ok[x].eigen[a] })
		q.eigLo[a] += lo
		q.eigHi[a] += hi
		lo, hi, _ = q.devQuantiles(u, bag.pct[a], func(x int) float64 { return 100 * ok[x].eigen[a] / ok[x].total })
		q.pctLo[a] += lo
		q.pctHi[a] += hi
	}
	for c := 0; c < p*k; c++ {
		lo, hi, mean := q.devQuantiles(u, bag.loadings[c], func(x int) float64 { return ok[x].loadings[c] })
		q.loadLo[c] += lo
		q.loadHi[c] += hi
		q.loadMean[c] += mean
	}
	for a := 0; a < k; a++ {
		_, _, _ = q.devQuantiles(u, 0, func(x int) float64 { return ok[x].phi[a] })
		q.phiMed[a] += percentile(q.vals, 50)
		q.phiP5[a] += percentile(q.vals, 5)
		_, _, _ = q.devQuantiles(u, 0, func(x int) float64 { return ok[x].procr[a] })
		q.procrMed[a] += percentile(q.vals, 50)
		q.procrP5[a] += percentile(q.vals, 5)
	}
}

// summariseBags fills the stability summary from the little bootstraps:
// the averaged quality measures, intervals placed about the full-data
// estimates, and every resample's congruences and subspace angle.
func (st *Stability) summariseBags(r *Result, bags []littleBootstrap) {
	_, p := r.Z.Dims()
	k, m := r.Retained, r.Decomp.Components()
	q := bagQuality{
		eigLo: make([]float64, m), eigHi: make([]float64, m), pctLo: make([]float64, m), pctHi: make([]float64, m),
		loadLo: make([]float64, p*k), loadHi: make([]float64, p*k), loadMean: make([]float64, p*k),
		phiMed: make([]float64, k), phiP5: make([]float64, k), procrMed: make([]float64, k), procrP5: make([]float64, k),
	}
	st.Congruence = make([][]float64, k)
	st.Procrustes = make([][]float64, k)
	for _, bag := range bags {
		var ok []resampleResult
		for _, res := range bag.results {
			st.SubspaceAngles = append(st.SubspaceAngles, math.NaN())
			if !res.ok {
				continue
			}
			st.SubspaceAngles[len(st.SubspaceAngles)-1] = res.angle
			ok = append(ok, res)
			if res.constant {
				st.ConstantResamples++
			}
			for a := 0; a < k; a++ {
				st.Congruence[a] = append(st.Congruence[a], res.phi[a])
				st.Procrustes[a] = append(st.Procrustes[a], res.procr[a])
			}
		}
		st.Used += len(ok)
		if len(ok) > 0 {
			q.add(bag, ok, p, k, m)
		}
	}
	st.Degenerate = st.Resamples - st.Used
	if q.bags == 0 {
		return
	}
	avg := func(v float64) float64 { return v / float64(q.bags) }
	total := 0.0
	for _, l := range r.Decomp.Eigenvalues {
		total += l
	}
	st.Eigenvalues, st.Percent = make([]Interval, m), make([]Interval, m)
	st.EigenvaluesBCa, st.PercentBCa = make([]Interval, m), make([]Interval, m)
	for a := 0; a < m; a++ {
		l := r.Decomp.Eigenvalues[a]
		st.Eigenvalues[a] = Interval{l + avg(q.eigLo[a]), l + avg(q.eigHi[a])}
		st.Percent[a] = Interval{100*l/total + avg(q.pctLo[a]), 100*l/total + avg(q.pctHi[a])}
		st.EigenvaluesBCa[a] = Interval{math.NaN(), math.NaN()}
		st.PercentBCa[a] = Interval{math.NaN(), math.NaN()}
	}
	v := mat.DenseCopyOf(r.RetainedLoadings())
	st.Loadings = make([][]LoadingInterval, p)
	for j := range st.Loadings {
		st.Loadings[j] = make([]LoadingInterval, k)
		for a := 0; a < k; a++ {
			c := j*k + a
			est := v.At(j, a)
			st.Loadings[j][a] = LoadingInterval{Mean: est + avg(q.loadMean[c]), Low: est + avg(q.loadLo[c]), High: est + avg(q.loadHi[c])}
		}
	}
	st.Components = make([]ComponentStability, k)
	for a := 0; a < k; a++ {
		st.Components[a] = ComponentStability{
			CongruenceMedian: avg(q.phiMed[a]), CongruenceP5: avg(q.phiP5[a]),
			ProcrustesMedian: avg(q.procrMed[a]), ProcrustesP5: avg(q.procrP5[a]),
		}
	}
}
