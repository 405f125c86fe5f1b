package report

import (
	"cmp"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/plot/vg"
)

// Per-sample figures of a large table draw a subsample. A score plot of a
// million points is an ink blot, an SVG of tens of megabytes and most of
// the report's memory; a few thousand well-chosen points show the same
// cloud. Which points are drawn:
//
//   - every sample the figure marks (flagged, set aside), up to markedCap;
//   - the outline: in each of outlineSectors directions from the centre, the
//     sample farthest out, so that the cloud's extent is kept;
//   - of the rest, a seeded random subsample stratified by group and by
//     distance band from the centre (distanceBands bands of equal count),
//     each stratum in proportion to its size, so that each drawn point
//     stands for about the same number of samples and the density reads true.
//
// Tables of up to figurePoints finite samples are drawn whole, as before.

// figurePoints is about the most sample points a per-sample figure draws
// (common practice: beyond a few thousand points a scatter plot saturates
// at print resolution and only its file size grows).
const figurePoints = 5000

// markedCap is the most marked samples a figure draws as marked, the
// first in the order given (most extreme first). Marks beyond it happen
// by chance alone at a million rows (1 % beyond each 99 % limit); the cap
// keeps an SVG to a few megabytes at any n, and the caption says so.
const markedCap = 4 * figurePoints

// minBackground is the fewest points of the unmarked samples drawn however
// many samples are marked, so that the cloud stays visible behind them.
const minBackground = 2000

// outlineSectors is how many directions from the centre keep their
// outermost sample.
const outlineSectors = 72

// distanceBands is how many bands of distance from the centre (of equal
// count) the subsample is stratified by.
const distanceBands = 10

// thinning is which samples a figure draws, and the caption's account.
type thinning struct {
	// drawn lists the drawn samples in input order; nil when the figure
	// draws every sample.
	drawn   []int
	total   int // samples with finite coordinates
	marked  int // marked samples drawn because they are marked
	markedN int // marked samples with finite coordinates (≥ marked)
	outline int // outermost samples drawn
	sampled int // subsample of the rest
	rest    int // the unmarked, non-outline samples it stands for
}

// all reports whether every sample is drawn.
func (t thinning) all() bool { return t.drawn == nil }

// indices returns the drawn samples of n.
func (t thinning) indices(n int) []int {
	if !t.all() {
		return t.drawn
	}
	all := make([]int, n)
	for i := range all {
		all[i] = i
	}
	return all
}

// glyph scales a marker radius for the figure: smaller when it draws a
// subsample, whose thousands of points would otherwise merge into one
// blot at the centre and hide the density they are drawn to show.
func (t thinning) glyph(r vg.Length) vg.Length {
	if t.all() {
		return r
	}
	return r * 0.55
}

// unseen is how many of n samples were left out for a coordinate that is
// not a finite number, when the figure draws a subsample (which holds
// finite samples only); 0 when it draws them all, whose drawing counts
// them itself.
func (t thinning) unseen(n int) int {
	if t.all() {
		return 0
	}
	return n - t.total
}

// subset returns the drawn entries of v (v itself when all are drawn).
func (t thinning) subset(v []float64) []float64 {
	if t.all() {
		return v
	}
	out := make([]float64, len(t.drawn))
	for k, i := range t.drawn {
		out[k] = v[i]
	}
	return out
}

// thinSamples chooses the samples of x, y (one per sample) a figure draws:
// all of them up to figurePoints finite ones, otherwise the marked ones,
// the outline and a stratified subsample (see above). group gives each
// sample's group index (nil: one group). The choice depends on the data
// alone, through a fixed seed, so a report is the same every run.
func thinSamples(x, y []float64, marked []int, group []int) thinning {
	n := len(x)
	finite := 0
	for i := range x {
		if isFinite(x[i]) && isFinite(y[i]) {
			finite++
		}
	}
	th := thinning{total: finite}
	if finite <= figurePoints {
		return th
	}
	take := make([]bool, n)
	for _, i := range marked {
		if i >= 0 && i < n && !take[i] && isFinite(x[i]) && isFinite(y[i]) {
			th.markedN++
			if th.marked < markedCap {
				take[i] = true
				th.marked++
			}
		}
	}
	dist, sector := polar(x, y)
	th.outline = keepOutline(dist, sector, take)
	rest := make([]int32, 0, finite)
	for i := range x {
		if !take[i] && isFinite(dist[i]) {
			rest = append(rest, int32(i))
		}
	}
	budget := max(figurePoints-th.marked-th.outline, minBackground)
	th.rest = len(rest)
	th.sampled = sampleStrata(rest, dist, group, budget, take)
	for i, ok := range take {
		if ok {
			th.drawn = append(th.drawn, i)
		}
	}
	return th
}

// polar returns each sample's distance from the centre (mean) in units of
// each axis' standard deviation, and its direction sector; NaN distance for
// a sample with a coordinate that is not finite.
func polar(x, y []float64) (dist []float64, sector []uint8) {
	mx, sx := meanSD(x, y, x)
	my, sy := meanSD(x, y, y)
	dist, sector = make([]float64, len(x)), make([]uint8, len(x)) // outlineSectors < 256
	for i := range x {
		if !isFinite(x[i]) || !isFinite(y[i]) {
			dist[i] = math.NaN()
			continue
		}
		u, v := (x[i]-mx)/sx, (y[i]-my)/sy
		dist[i] = math.Hypot(u, v)
		k := int((math.Atan2(v, u) + math.Pi) / (2 * math.Pi) * outlineSectors)
		sector[i] = uint8(min(max(k, 0), outlineSectors-1))
	}
	return dist, sector
}

// meanSD is the mean and standard deviation of v over the samples whose x
// and y are both finite; a spread of zero is taken as one.
func meanSD(x, y, v []float64) (mean, sd float64) {
	var s, ss float64
	k := 0
	for i := range v {
		if isFinite(x[i]) && isFinite(y[i]) {
			s += v[i]
			k++
		}
	}
	mean = s / float64(k)
	for i := range v {
		if isFinite(x[i]) && isFinite(y[i]) {
			ss += (v[i] - mean) * (v[i] - mean)
		}
	}
	sd = math.Sqrt(ss / float64(k))
	if !(sd > 0) || !isFinite(sd) {
		sd = 1
	}
	return mean, sd
}

// keepOutline marks the farthest unmarked sample of each sector and
// returns how many it marked.
func keepOutline(dist []float64, sector []uint8, take []bool) int {
	far := make([]int, outlineSectors)
	for k := range far {
		far[k] = -1
	}
	for i, d := range dist {
		if take[i] || !isFinite(d) {
			continue
		}
		if k := sector[i]; far[k] < 0 || d > dist[far[k]] {
			far[k] = i
		}
	}
	kept := 0
	for _, i := range far {
		if i >= 0 {
			take[i] = true
			kept++
		}
	}
	return kept
}

// sampleStrata marks a seeded random subsample of about budget of the
// samples in rest, stratified by group and distance band, each stratum in
// proportion to its size (largest remainders), and returns how many it
// marked. The strata are one array sorted by stratum (a counting sort), so
// that a million samples cost a few compact arrays.
func sampleStrata(rest []int32, dist []float64, group []int, budget int, take []bool) int {
	if budget >= len(rest) {
		for _, i := range rest {
			take[i] = true
		}
		return len(rest)
	}
	sorted := make([]float64, len(rest))
	for k, i := range rest {
		sorted[k] = dist[i]
	}
	slices.Sort(sorted)
	var cuts [distanceBands - 1]float64
	for b := range cuts {
		cuts[b] = sorted[(b+1)*len(sorted)/distanceBands]
	}
	sorted = nil
	stratum := make([]int32, len(rest))
	groups := 1
	for k, i := range rest {
		band, _ := slices.BinarySearch(cuts[:], dist[i])
		g := 0
		if group != nil {
			g = group[i]
			groups = max(groups, g+1)
		}
		stratum[k] = int32(g*distanceBands + band)
	}
	size := make([]int, groups*distanceBands)
	for _, s := range stratum {
		size[s]++
	}
	start := make([]int, len(size)+1)
	for s, c := range size {
		start[s+1] = start[s] + c
	}
	members := make([]int32, len(rest))
	next := slices.Clone(start[:len(size)])
	for k, i := range rest {
		members[next[stratum[k]]] = i
		next[stratum[k]]++
	}
	quota := apportion(size, budget, len(rest))
	rng := rand.New(rand.NewPCG(0x70637163, uint64(len(rest))))
	marked := 0
	for s := range size {
		m := members[start[s]:start[s+1]]
		// A partial Fisher–Yates shuffle: the first quota[s] are a
		// uniform sample without replacement.
		for j := 0; j < quota[s]; j++ {
			r := j + rng.IntN(len(m)-j)
			m[j], m[r] = m[r], m[j]
			take[m[j]] = true
			marked++
		}
	}
	return marked
}

// apportion divides budget among strata of the given sizes in proportion,
// by largest remainders (ties to the earlier stratum).
func apportion(size []int, budget, total int) []int {
	quota := make([]int, len(size))
	type rem struct {
		s int
		r float64
	}
	rems := make([]rem, len(size))
	given := 0
	for s, c := range size {
		exact := float64(budget) * float64(c) / float64(total)
		quota[s] = int(exact)
		given += quota[s]
		rems[s] = rem{s, exact - float64(quota[s])}
	}
	slices.SortStableFunc(rems, func(a, b rem) int { return cmp.Compare(b.r, a.r) })
	for k := 0; given < budget && k < len(rems); k++ {
		if s := rems[k].s; quota[s] < size[s] {
			quota[s]++
			given++
		}
	}
	return quota
}

// caption is the sentence a figure's caption gains when it draws a
// subsample; marked says which samples it always draws, in words that
// follow "samples" ("beyond a 99 % limit of T² or Q").
func (t thinning) caption(marked string) string {
	if t.all() {
		return ""
	}
	always := ""
	switch {
	case t.marked == 1:
		always = fmt.Sprintf("the one sample %s, ", marked)
	case t.marked < t.markedN:
		always = fmt.Sprintf("the %d most extreme of the %d samples %s, ", t.marked, t.markedN, marked)
	case t.marked > 1:
		always = fmt.Sprintf("all %d samples %s, ", t.marked, marked)
	}
	per := float64(t.rest) / float64(max(t.sampled, 1))
	return fmt.Sprintf("Of the %d samples, the figure draws %d: %sthe farthest out in each of %d directions from the centre (%d samples), and a seeded random %d of the other %d, stratified by group and by distance from the centre, so that each of these stands for about %s samples. The CSV tables list every sample.",
		t.total, len(t.drawn), always, outlineSectors, t.outline, t.sampled, t.rest, perText(per))
}

// perText writes how many samples one drawn point stands for.
func perText(v float64) string {
	if v < 10 {
		return fmt.Sprintf("%.1f", v)
	}
	return fmt.Sprintf("%.0f", v)
}
