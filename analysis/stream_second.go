package analysis

import (
	"fmt"
	"math"
	"slices"

	"pcqc/analysis/intake"
)

// secondPass reads the file again and computes each used row's scores,
// T², Q (with its per-variable contributions) and leverage, judges them
// against the limits, keeps the flagged samples (the first MaxListedRows)
// and the most dominant sample per component, and hands every sample to
// each. The formulas are those of ComputeSampleStats.
func (r *StreamResult) secondPass(st *intake.Stream, keep []int, each func(StreamSample) error) error {
	p, k, n := len(keep), r.Retained, r.Rows
	ev := r.Decomp.Eigenvalues
	v := r.Decomp.Loadings
	live := make([]bool, k)
	for a := range live {
		live[a] = ev[a] > NullRatio*ev[0]
	}
	z := make([]float64, p)
	s := StreamSample{Scores: make([]float64, k), Contributed: make([]float64, p)}
	r.Dominance, r.DominanceID = make([]float64, k), make([]string, k)
	one := SampleStats{T2: make([]float64, 1), Q: make([]float64, 1), Leverage: make([]float64, 1), Limits: r.Limits}
	used := 0
	err := st.Pass(func(row intake.StreamRow) error {
		if row.Missing {
			return nil
		}
		used++
		for c, kk := range keep {
			z[c] = (row.Values[kk] - r.Prep.Means[c]) / r.Prep.Scales[c]
		}
		s.T2, s.Q = 0, 0
		copy(s.Contributed, z)
		for a := 0; a < k; a++ {
			t := 0.0
			for j := 0; j < p; j++ {
				t += z[j] * v.At(j, a)
			}
			s.Scores[a] = t
			if live[a] {
				s.T2 += t * t / ev[a]
			}
			for j := 0; j < p; j++ {
				s.Contributed[j] -= t * v.At(j, a)
			}
			if tot := float64(n-1) * ev[a]; tot > 0 && t*t/tot > r.Dominance[a] {
				r.Dominance[a], r.DominanceID[a] = t*t/tot, row.ID
			}
		}
		for j, e := range s.Contributed {
			s.Contributed[j] = e * e
			s.Q += e * e
		}
		s.Lev = 1/float64(n) + s.T2/float64(n-1)
		one.T2[0], one.Q[0], one.Leverage[0] = s.T2, s.Q, s.Lev
		s.Beyond = one.Beyond(0)
		s.ID, s.Group, s.Line = row.ID, row.Group, row.Line
		r.noteFlagged(s)
		return each(s)
	})
	if err != nil {
		return err
	}
	if used != n || st.Info.SHA256 != r.Info.SHA256 {
		return &intake.InputError{File: r.Info.File, Reason: "the file changed between the two passes of --stream; audit a file that is not being written to"}
	}
	return nil
}

// noteFlagged counts a sample beyond a family-wise limit and keeps a copy
// of the first MaxListedRows of them.
func (r *StreamResult) noteFlagged(s StreamSample) {
	if !slices.Contains(s.Beyond, "t2-family") && !slices.Contains(s.Beyond, "q-family") {
		return
	}
	r.FlaggedCount++
	if len(r.Flagged) < MaxListedRows {
		c := s
		c.Scores = append([]float64(nil), s.Scores...)
		c.Contributed = append([]float64(nil), s.Contributed...)
		c.Beyond = append([]string(nil), s.Beyond...)
		r.Flagged = append(r.Flagged, c)
	}
}

// summariseBootstrap decomposes every Poisson-weighted resample's sums
// (Hanley & MacGibbon 2006, Comput. Methods Programs Biomed. 83:57–62:
// weighting each row by an independent Poisson(1) count approximates the
// multinomial counts of the ordinary bootstrap for large n, and lets every
// resample be accumulated in the one pass), aligns each retained
// component's sign with the reference, and summarises Tucker's congruence,
// the loadings and the eigenvalues as in Bootstrap. The Procrustes
// congruence is not computed (NaN).
func (r *StreamResult) summariseBootstrap(boot []*Sums, keep []int) {
	r.Stability = Stability{Resamples: len(boot)}
	if len(boot) == 0 {
		if r.BootstrapNote == "" {
			r.BootstrapNote = "not run (--bootstrap 0)"
		}
		return
	}
	k, m, p := r.Retained, r.Decomp.Components(), len(keep)
	ref := r.Decomp.Loadings
	var phi [][]float64 = make([][]float64, k)
	loads := make([][]float64, p*k)
	eig, pct := make([][]float64, m), make([][]float64, m)
	for _, b := range boot {
		s := b.Select(keep)
		pp, err := PreprocessingFromSums(s, r.Prep.Transform, r.Prep.Scaling)
		if err != nil || slices.ContainsFunc(pp.Scales, func(x float64) bool { return !(x > 0) }) {
			r.Stability.Degenerate++
			continue
		}
		d, err := DecomposeSums(s, pp)
		if err != nil || d.Components() < m {
			r.Stability.Degenerate++
			continue
		}
		r.Stability.Used++
		total := d.TotalVariance()
		for a := 0; a < m; a++ {
			eig[a] = append(eig[a], d.Eigenvalues[a])
			pct[a] = append(pct[a], 100*d.Eigenvalues[a]/total)
		}
		for a := 0; a < k; a++ {
			col, want := make([]float64, p), make([]float64, p)
			for j := range col {
				col[j], want[j] = d.Loadings.At(j, a), ref.At(j, a)
			}
			if TuckerCongruence(col, want) < 0 {
				for j := range col {
					col[j] = -col[j]
				}
			}
			phi[a] = append(phi[a], TuckerCongruence(col, want))
			for j := range col {
				loads[j*k+a] = append(loads[j*k+a], col[j])
			}
		}
	}
	r.Stability.fillFromDraws(phi, loads, eig, pct, p, k)
}

// fillFromDraws summarises the kept draws of each quantity.
func (st *Stability) fillFromDraws(phi, loads, eig, pct [][]float64, p, k int) {
	if st.Used == 0 {
		return
	}
	sorted := func(x []float64) []float64 { y := slices.Clone(x); slices.Sort(y); return y }
	st.Congruence, st.Procrustes = phi, make([][]float64, k)
	st.Components = make([]ComponentStability, k)
	for a := range phi {
		s := sorted(phi[a])
		st.Components[a] = ComponentStability{CongruenceMedian: percentile(s, 50), CongruenceP5: percentile(s, 5),
			ProcrustesMedian: math.NaN(), ProcrustesP5: math.NaN()}
	}
	st.Loadings = make([][]LoadingInterval, p)
	for j := 0; j < p; j++ {
		st.Loadings[j] = make([]LoadingInterval, k)
		for a := 0; a < k; a++ {
			s := sorted(loads[j*k+a])
			sum := 0.0
			for _, x := range s {
				sum += x
			}
			st.Loadings[j][a] = LoadingInterval{Mean: sum / float64(len(s)), Low: percentile(s, 2.5), High: percentile(s, 97.5)}
		}
	}
	for a := range eig {
		e, q := sorted(eig[a]), sorted(pct[a])
		st.Eigenvalues = append(st.Eigenvalues, Interval{percentile(e, 2.5), percentile(e, 97.5)})
		st.Percent = append(st.Percent, Interval{percentile(q, 2.5), percentile(q, 97.5)})
	}
}

// String describes the streamed audit in one line, for logs and tests.
func (r *StreamResult) String() string {
	return fmt.Sprintf("%s: %d rows × %d variables, %d components, %d flagged", r.Info.File, r.Rows, len(r.Variables), r.Retained, r.FlaggedCount)
}
