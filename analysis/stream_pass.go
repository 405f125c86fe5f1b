package analysis

import (
	"math"
	"math/rand/v2"

	"pcqc/analysis/intake"
)

// Random streams of the streamed audit (see taskRNG).
const (
	streamReservoir = 11 << 40
	streamPoisson   = 12 << 40
)

// Reservoir is a uniform random sample of rows kept while a table streams
// past: Vitter's (1985, ACM TOMS 11:37–57) algorithm R. While fewer rows
// than its size have passed it holds them all, in file order, so a table
// that fits is sampled whole.
type Reservoir struct {
	Size   int
	Seen   int
	Values [][]float64 // raw rows (candidate variables)
	IDs    []string
	Groups []string
	Lines  []int
	rng    *rand.Rand
}

func newReservoir(size int, seed uint64) *Reservoir {
	return &Reservoir{Size: size, rng: taskRNG(seed, streamReservoir, 0)}
}

// offer shows the reservoir one row.
func (r *Reservoir) offer(row intake.StreamRow) {
	r.Seen++
	at := len(r.Values)
	if at >= r.Size {
		if at = r.rng.IntN(r.Seen); at >= r.Size {
			return
		}
		copy(r.Values[at], row.Values)
	} else {
		r.Values = append(r.Values, append([]float64(nil), row.Values...))
		r.IDs, r.Groups, r.Lines = append(r.IDs, ""), append(r.Groups, ""), append(r.Lines, 0)
	}
	r.IDs[at], r.Groups[at], r.Lines[at] = row.ID, row.Group, row.Line
}

// poissonOne draws counts from Poisson(1) by inversion of its cumulative
// distribution, P(K ≤ k) = e⁻¹ Σ_{i≤k} 1/i!.
type poissonOne struct {
	cdf [16]float64
	rng *rand.Rand
}

func newPoissonOne(rng *rand.Rand) *poissonOne {
	p := &poissonOne{rng: rng}
	term, sum := math.Exp(-1), 0.0
	for k := range p.cdf {
		sum += term
		p.cdf[k] = sum
		term /= float64(k + 1)
	}
	p.cdf[len(p.cdf)-1] = 1 // P(K ≥ 16) ≈ 1e-14 is folded into 15
	return p
}

func (p *poissonOne) draw() float64 {
	u := p.rng.Float64()
	k := 0
	for u >= p.cdf[k] {
		k++
	}
	return float64(k)
}

// firstPass is what the first reading of a streamed table gathers: the
// sums of the rows used, a reservoir sample of them, the Poisson-weighted
// sums of each bootstrap resample, and the rows dropped for missing cells.
type firstPass struct {
	sums      *Sums
	reservoir *Reservoir
	boot      []*Sums
	poisson   *poissonOne
	dropped   []intake.DroppedRow // the first MaxListedRows
	gaps      [][]int             // per dropped row, its missing variables (named after the pass)
	nDropped  int
	imputed   int
}

// MaxListedRows caps the dropped and flagged rows a streamed audit keeps by
// name: they are counted beyond it, not listed.
const MaxListedRows = 1000

func (f *firstPass) add(row intake.StreamRow) {
	if f.sums == nil {
		f.sums = NewSums(len(row.Values))
		for b := range f.boot {
			f.boot[b] = NewSums(len(row.Values))
		}
	}
	if row.Missing {
		f.nDropped++
		if len(f.dropped) < MaxListedRows {
			var gap []int
			for k, v := range row.Values {
				if math.IsNaN(v) {
					gap = append(gap, k)
				}
			}
			f.dropped = append(f.dropped, intake.DroppedRow{ID: row.ID, Line: row.Line})
			f.gaps = append(f.gaps, gap)
		}
		return
	}
	f.imputed += row.Imputed
	f.sums.Add(row.Values)
	f.reservoir.offer(row)
	for _, s := range f.boot {
		s.AddWeighted(row.Values, f.poisson.draw())
	}
}

// Select returns the sums of the variables keep (indices, ascending).
func (s *Sums) Select(keep []int) *Sums {
	out := NewSums(len(keep))
	out.N = s.N
	for c, k := range keep {
		out.Shift[c], out.mean[c], out.Min[c], out.Max[c] = s.Shift[k], s.mean[k], s.Min[k], s.Max[k]
		for d := c; d < len(keep); d++ {
			out.Co[packed(len(keep), c, d)] = s.Co[packed(s.P, k, keep[d])]
		}
	}
	return out
}
