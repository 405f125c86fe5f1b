package analysis

import (
	"errors"
	"math"
)

// Sums are the mergeable summaries of a table read one row at a time: the
// count, the column means, the co-moment matrix C = Σ (x_i − x̄)(x_i − x̄)ᵀ
// (upper triangle, row-major packed) and each column's smallest and largest
// value. They are all a PCA of a tall table needs before its second pass.
//
// Rows are added with Welford's update generalised to co-moments, and two
// partial Sums combine with the pairwise formula of Chan, Golub & LeVeque
// (1983, Amer. Statist. 37:242–247):
//
//	n = n_a + n_b,  δ = x̄_b − x̄_a,  x̄ = x̄_a + δ n_b/n,
//	C = C_a + C_b + δ δᵀ n_a n_b / n.
//
// Both updates work on deviations from the running mean, so a column whose
// mean is large next to its spread keeps its digits (the textbook
// Σx² − n x̄² would cancel them). Merge is associative up to rounding, so the
// first pass could be split over line ranges, cores or machines and the
// parts combined in any grouping.
//
// Weighted rows (AddWeighted, for the Poisson bootstrap) use West's (1979,
// Comm. ACM 22:532–535) weighted form of the same update; N then counts the
// total weight.
type Sums struct {
	P int
	N float64 // rows added (total weight for weighted rows)
	// Shift is the first row added; the running means and co-moments are
	// those of x − Shift, whose differences are exact (Sterbenz) when a
	// column's mean is large next to its spread, so the update's rounding
	// is that of the spread, not of the mean (the "shifted data" remedy of
	// Chan, Golub & LeVeque 1983). Mean adds it back.
	Shift []float64 // p
	mean  []float64 // p, of x − Shift
	Co    []float64 // p(p+1)/2, packed upper triangle of C
	Min   []float64 // p; +Inf before the first row
	Max   []float64 // p; −Inf before the first row
	delta []float64 // scratch
}

// NewSums returns empty Sums for p variables.
func NewSums(p int) *Sums {
	s := &Sums{P: p, Shift: make([]float64, p), mean: make([]float64, p), Co: make([]float64, p*(p+1)/2),
		Min: make([]float64, p), Max: make([]float64, p), delta: make([]float64, p)}
	for j := range s.Min {
		s.Min[j], s.Max[j] = math.Inf(1), math.Inf(-1)
	}
	return s
}

// packed returns the index of C[j][l] (j ≤ l) in Co.
func packed(p, j, l int) int { return j*p - j*(j-1)/2 + (l - j) }

// Add updates the sums with one row x (length P).
func (s *Sums) Add(x []float64) { s.AddWeighted(x, 1) }

// AddWeighted updates the sums with row x counted w times (w ≥ 0).
func (s *Sums) AddWeighted(x []float64, w float64) {
	if w <= 0 {
		return
	}
	if s.N == 0 {
		copy(s.Shift, x)
	}
	s.N += w
	r := w / s.N
	p := s.P
	for j, v := range x {
		s.delta[j] = (v - s.Shift[j]) - s.mean[j]
		s.mean[j] += s.delta[j] * r
		s.Min[j] = math.Min(s.Min[j], v)
		s.Max[j] = math.Max(s.Max[j], v)
	}
	// C += w (x − x̄_old)(x − x̄_new)ᵀ = w (1 − w/n) δ δᵀ.
	f := w * (1 - r)
	at := 0
	for j := 0; j < p; j++ {
		dj := s.delta[j] * f
		row := s.Co[at : at+p-j]
		for l, d := range s.delta[j:] {
			row[l] += dj * d
		}
		at += p - j
	}
}

// Merge adds the rows summarised by o to s (Chan, Golub & LeVeque 1983).
func (s *Sums) Merge(o *Sums) error {
	if o.P != s.P {
		return errors.New("sums of different widths cannot merge")
	}
	if o.N == 0 {
		return nil
	}
	if s.N == 0 {
		s.N = o.N
		copy(s.Shift, o.Shift)
		copy(s.mean, o.mean)
		copy(s.Co, o.Co)
		copy(s.Min, o.Min)
		copy(s.Max, o.Max)
		return nil
	}
	n := s.N + o.N
	for j := range s.mean {
		s.delta[j] = (o.Shift[j] - s.Shift[j]) + (o.mean[j] - s.mean[j])
	}
	f := s.N * o.N / n
	at := 0
	for j := 0; j < s.P; j++ {
		for l := j; l < s.P; l++ {
			s.Co[at] += o.Co[at] + s.delta[j]*s.delta[l]*f
			at++
		}
	}
	for j := range s.mean {
		s.mean[j] += s.delta[j] * o.N / n
		s.Min[j] = math.Min(s.Min[j], o.Min[j])
		s.Max[j] = math.Max(s.Max[j], o.Max[j])
	}
	s.N = n
	return nil
}

// Covariance returns the sample covariance C/(n−1) as a full p×p row-major
// slice.
func (s *Sums) Covariance() []float64 {
	p := s.P
	out := make([]float64, p*p)
	for j := 0; j < p; j++ {
		for l := j; l < p; l++ {
			v := s.Co[packed(p, j, l)] / (s.N - 1)
			out[j*p+l], out[l*p+j] = v, v
		}
	}
	return out
}

// SD returns the sample standard deviation (n−1) of column j.
func (s *Sums) SD(j int) float64 {
	return math.Sqrt(math.Max(s.Co[packed(s.P, j, j)], 0) / (s.N - 1))
}

// Mean returns the column means.
func (s *Sums) Mean() []float64 {
	out := make([]float64, s.P)
	for j := range out {
		out[j] = s.Shift[j] + s.mean[j]
	}
	return out
}
