package analysis

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Several samples far along a component mask one another: together they
// inflate that component's variance, which shrinks each one's T² below the
// limit meant to catch it. Retrospective (Phase I) control charting meets
// this by setting aside the samples that pass the limit, estimating the
// centre and variances again from the rest, judging the set-aside samples
// as new ones against those estimates, and repeating until the set no
// longer changes (Tracy, Young & Mason 1992, J. Qual. Technol.
// 24:88–95, §"Phase I"; Sullivan & Woodall 1996, J. Qual. Technol.
// 28:398–408). ReestimateT2 does that on the component axes, which stay
// those of the full fit: a handful of samples barely turns them, but
// adds to the variance along them in proportion to their squared distance.

// maxPhaseIRounds bounds the iteration; it settles in two or three rounds
// on every table we have seen, and a set that still changes after this
// many is kept as it stands.
const maxPhaseIRounds = 20

// ReestimatedT2 is the outcome of the Phase I iteration.
type ReestimatedT2 struct {
	// SetAside are the samples whose T² passes the family-wise limit when
	// judged against the other samples; T2 holds every sample's T² against
	// the kept samples' means and variances.
	SetAside []int
	T2       []float64
	// Kept is the number of samples the final estimates rest on.
	Kept, Rounds int
	// LimitKept is the in-sample family-wise limit (beta form) for the
	// Kept samples, LimitNew the new-sample one (F form) the set-aside
	// samples are judged against, both normal theory at conf.
	LimitKept, LimitNew float64
}

// ReestimateT2 runs the Phase I iteration on the scores (n × k) of the
// axes marked live, starting from the samples in start (those beyond the
// normal-theory family-wise limit), at per-sample confidence conf. Neither
// limit is taken below floor (a limit raised for a heavier tail; 0 or NaN
// for none). The
// kept set never drops below half the samples: a larger set is no longer
// a few outliers but structure, and the iteration stops at the last set
// that left more than half. Without a live axis, or with too few samples
// for the limits, it returns the zero value (T2 nil).
func ReestimateT2(scores mat.Matrix, live []bool, conf, floor float64, start []int) ReestimatedT2 {
	n, k := scores.Dims()
	kl := 0
	for _, l := range live {
		if l {
			kl++
		}
	}
	if 2*(n-len(start)) <= n {
		start = nil
	}
	if kl == 0 || math.IsNaN(T2LimitNew(n-len(start), kl, conf)) {
		return ReestimatedT2{}
	}
	out := ReestimatedT2{T2: make([]float64, n)}
	aside := make([]bool, n)
	for _, i := range start {
		aside[i] = true
	}
	mean, variance := make([]float64, k), make([]float64, k)
	for round := 1; ; round++ {
		kept := 0
		for _, a := range aside {
			if !a {
				kept++
			}
		}
		limKept, limNew := T2LimitModel(kept, kl, conf), T2LimitNew(kept, kl, conf)
		if floor > limKept {
			limKept = floor
		}
		if floor > limNew {
			limNew = floor
		}
		axisMoments(scores, live, aside, mean, variance)
		changed := false
		for i := range n {
			t2 := 0.0
			for a := range k {
				if live[a] && variance[a] > 0 {
					d := scores.At(i, a) - mean[a]
					t2 += d * d / variance[a]
				}
			}
			out.T2[i] = t2
			beyond := t2 > limKept
			if aside[i] {
				beyond = t2 > limNew
			}
			if beyond != aside[i] {
				changed = true
			}
		}
		out.Kept, out.Rounds, out.LimitKept, out.LimitNew = kept, round, limKept, limNew
		if !changed || round == maxPhaseIRounds {
			break
		}
		next := make([]bool, n)
		nextKept := 0
		for i := range n {
			next[i] = (!aside[i] && out.T2[i] > limKept) || (aside[i] && out.T2[i] > limNew)
			if !next[i] {
				nextKept++
			}
		}
		if 2*nextKept <= n {
			break
		}
		aside = next
	}
	out.SetAside = out.SetAside[:0]
	for i, a := range aside {
		if a && out.T2[i] > out.LimitNew {
			out.SetAside = append(out.SetAside, i)
		}
	}
	return out
}

// axisMoments sets mean and variance (n − 1 denominator) of each live
// score column over the rows not set aside.
func axisMoments(scores mat.Matrix, live, aside []bool, mean, variance []float64) {
	n, k := scores.Dims()
	for a := range k {
		mean[a], variance[a] = 0, 0
		if !live[a] {
			continue
		}
		m := 0
		for i := range n {
			if !aside[i] {
				m++
				d := scores.At(i, a) - mean[a]
				mean[a] += d / float64(m)
				variance[a] += d * (scores.At(i, a) - mean[a])
			}
		}
		if m > 1 {
			variance[a] /= float64(m - 1)
		}
	}
}
