package report

import (
	"bytes"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/plot/vg/vgsvg"

	"pcqc/analysis"
	"pcqc/internal/synth"
)

// cloud returns n seeded Gaussian points, the first share of them in group
// 0 and the rest in group 1, with nan of them given a NaN coordinate.
func cloud(n, nan int, share float64) (x, y []float64, group []int) {
	rng := synth.RNG(7, uint64(n))
	x, y, group = make([]float64, n), make([]float64, n), make([]int, n)
	for i := range x {
		x[i], y[i] = 3*rng.NormFloat64(), rng.NormFloat64()
		if float64(i) >= share*float64(n) {
			group[i] = 1
		}
	}
	for k := 0; k < nan; k++ {
		y[(k*7919)%n] = math.NaN()
	}
	return x, y, group
}

func TestThinSamples(t *testing.T) {
	tests := []struct {
		name    string
		n, nan  int
		marked  int // the first marked samples (every 3rd) are marked
		whole   bool
		drawn   int // at most
		sampled int // the subsample of the rest, exactly
	}{
		{"small table drawn whole", figurePoints, 0, 20, true, 0, 0},
		{"small once NaN are left out", figurePoints + 30, 40, 20, true, 0, 0},
		{"large table", 50000, 0, 40, false, figurePoints, figurePoints - 40 - outlineSectors},
		{"large table with NaN", 50000, 500, 40, false, figurePoints, figurePoints - 40 - outlineSectors},
		{"many marked keep a background", 60000, 0, 8000, false, 8000 + outlineSectors + minBackground, minBackground},
		{"marks beyond the cap", 300000, 0, markedCap + 500, false, markedCap + outlineSectors + minBackground, minBackground},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			x, y, group := cloud(tt.n, tt.nan, 0.7)
			var marked []int
			for i := 0; len(marked) < tt.marked; i += 3 {
				if isFinite(y[i]) {
					marked = append(marked, i)
				}
			}
			th := thinSamples(x, y, marked, group)
			if th.total != tt.n-tt.nan || th.unseen(tt.n) != map[bool]int{true: 0, false: tt.nan}[tt.whole] {
				t.Errorf("total %d, unseen %d; want %d finite", th.total, th.unseen(tt.n), tt.n-tt.nan)
			}
			if th.all() != tt.whole {
				t.Fatalf("draws every sample: %v, want %v", th.all(), tt.whole)
			}
			if tt.whole {
				return
			}
			if len(th.drawn) > tt.drawn || th.sampled != tt.sampled {
				t.Errorf("drew %d (subsample %d), want at most %d (subsample %d)", len(th.drawn), th.sampled, tt.drawn, tt.sampled)
			}
			if !slices.IsSorted(th.drawn) || len(slices.Compact(slices.Clone(th.drawn))) != len(th.drawn) {
				t.Errorf("drawn samples are not in input order, or repeat")
			}
			drawn := map[int]bool{}
			for _, i := range th.drawn {
				drawn[i] = true
				if !isFinite(x[i]) || !isFinite(y[i]) {
					t.Errorf("sample %d has no finite coordinates but is drawn", i)
				}
			}
			for k, i := range marked {
				if k < markedCap && !drawn[i] {
					t.Fatalf("marked sample %d (rank %d) is not drawn", i, k)
				}
			}
			// The outline: the sample farthest from the centre is drawn.
			dist, _ := polar(x, y)
			far := -1
			for i, d := range dist {
				if isFinite(d) && (far < 0 || d > dist[far]) {
					far = i
				}
			}
			if !drawn[far] {
				t.Errorf("the farthest sample %d (distance %.2f) is not drawn", far, dist[far])
			}
			// Stratified in proportion: the unmarked drawn samples keep the
			// groups' shares of the unmarked ones within a point.
			isMarked := map[int]bool{}
			for _, i := range marked {
				isMarked[i] = true
			}
			var g0, un, g0all, unall int
			for i := range x {
				if !isMarked[i] && isFinite(y[i]) {
					unall++
					if group[i] == 0 {
						g0all++
					}
				}
			}
			for _, i := range th.drawn {
				if !isMarked[i] {
					un++
					if group[i] == 0 {
						g0++
					}
				}
			}
			want := float64(g0all) / float64(unall)
			if share := float64(g0) / float64(un); math.Abs(share-want) > 0.01 {
				t.Errorf("group 0 is %.3f of the unmarked drawn samples, want %.3f ± 0.01", share, want)
			}
			// Seeded: the same data give the same choice.
			if again := thinSamples(x, y, marked, group); !slices.Equal(again.drawn, th.drawn) {
				t.Errorf("a second call chose other samples")
			}
		})
	}
}

// Each distance band gets its share: the subsample's distances from the
// centre follow the whole table's, so the cloud's density reads true. The
// median distance of the drawn unmarked samples is the table's within 5 %.
func TestThinSamplesKeepsTheDensity(t *testing.T) {
	x, y, _ := cloud(200000, 0, 1)
	th := thinSamples(x, y, nil, nil)
	dist, _ := polar(x, y)
	all := slices.Clone(dist)
	slices.Sort(all)
	var drawn []float64
	for _, i := range th.drawn {
		drawn = append(drawn, dist[i])
	}
	slices.Sort(drawn)
	for _, q := range []float64{0.25, 0.5, 0.75, 0.9} {
		a, d := all[int(q*float64(len(all)))], drawn[int(q*float64(len(drawn)))]
		if math.Abs(d-a) > 0.05*a {
			t.Errorf("distance quantile %.2f: drawn %.3f, whole table %.3f", q, d, a)
		}
	}
}

func TestThinningCaption(t *testing.T) {
	tests := []struct {
		th   thinning
		want string
	}{
		{thinning{total: 300}, ""},
		{thinning{drawn: make([]int, 5000), total: 100000, marked: 1000, markedN: 1000, outline: 72, sampled: 3928, rest: 98928},
			"Of the 100000 samples, the figure draws 5000: all 1000 samples beyond a 99 % limit, the farthest out in each of 72 directions from the centre (72 samples), and a seeded random 3928 of the other 98928, stratified by group and by distance from the centre, so that each of these stands for about 25 samples. The CSV tables list every sample."},
		{thinning{drawn: make([]int, 5000), total: 6000, marked: 1, markedN: 1, outline: 70, sampled: 4929, rest: 5929},
			"Of the 6000 samples, the figure draws 5000: the one sample beyond a 99 % limit, the farthest out in each of 72 directions from the centre (70 samples), and a seeded random 4929 of the other 5929, stratified by group and by distance from the centre, so that each of these stands for about 1.2 samples. The CSV tables list every sample."},
		{thinning{drawn: make([]int, 22072), total: 1000000, marked: 20000, markedN: 21000, outline: 72, sampled: 2000, rest: 978928},
			"Of the 1000000 samples, the figure draws 22072: the 20000 most extreme of the 21000 samples beyond a 99 % limit, the farthest out in each of 72 directions from the centre (72 samples), and a seeded random 2000 of the other 978928, stratified by group and by distance from the centre, so that each of these stands for about 489 samples. The CSV tables list every sample."},
	}
	for _, tt := range tests {
		if got := tt.th.caption("beyond a 99 % limit"); got != tt.want {
			t.Errorf("caption\n got %q\nwant %q", got, tt.want)
		}
	}
}

// maxFigureSVG is the most bytes one figure's SVG may take: "a few MB".
const maxFigureSVG = 3 << 20

// The T²–Q figure's SVG stays bounded in bytes at 100,000 and 1,000,000
// samples, with 2 % of them flagged as chance alone gives at that n. Before
// thinning, 100,000 points took about 13 MB.
func TestLargeFigureSVGBounded(t *testing.T) {
	if testing.Short() {
		t.Skip("draws figures of a million points")
	}
	for _, n := range []int{100000, 1000000} {
		rng := synth.RNG(3, uint64(n))
		t2, q := make([]float64, n), make([]float64, n)
		for i := range t2 {
			a, b, c := rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()
			t2[i], q[i] = a*a+b*b, c*c
		}
		lim := analysis.Limits{T2_95: 6.0, T2_99: 9.2, Q95: 3.84, Q99: 6.63, QMethod: analysis.QJacksonMudholkar}
		flagged := analysis.RankBeyond99(t2, q, lim.T2_99, lim.Q99)
		ids := make([]string, n)
		for i := range ids {
			ids[i] = "s"
		}
		d := t2qDrawing("large", t2, q, lim, flagged, ids)
		svg := vgsvg.New(d.w, d.h)
		if err := d.draw(svg); err != nil {
			t.Fatal(err)
		}
		var b bytes.Buffer
		if _, err := svg.WriteTo(&b); err != nil {
			t.Fatal(err)
		}
		if b.Len() > maxFigureSVG {
			t.Errorf("n = %d: SVG of %d bytes, want at most %d", n, b.Len(), maxFigureSVG)
		}
		t.Logf("n = %d, %d flagged: SVG %d bytes; %s", n, len(flagged), b.Len(), d.sampled)
	}
}

// Integer axes step by 1, 2 or 5 times a power of ten, at most 12 ticks,
// or 6 once the labels are five digits long; before, sample numbers of a
// large table were stepped by powers of two into labels that ran together.
func TestIntegerTicks(t *testing.T) {
	tests := []struct {
		min, max float64
		want     []float64
	}{
		{0.5, 10.5, []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10}},
		{0.5, 20.5, []float64{2, 4, 6, 8, 10, 12, 14, 16, 18, 20}},
		{-3.5, 3.5, []float64{-3, -2, -1, 0, 1, 2, 3}},
		{0, 178, []float64{0, 20, 40, 60, 80, 100, 120, 140, 160}},
		{1, 100000, []float64{20000, 40000, 60000, 80000, 100000}},
		{1, 1000000, []float64{200000, 400000, 600000, 800000, 1000000}},
	}
	for _, tt := range tests {
		var got []float64
		for _, tk := range (integerTicks{}).Ticks(tt.min, tt.max) {
			got = append(got, tk.Value)
		}
		if !slices.Equal(got, tt.want) {
			t.Errorf("ticks of [%g, %g]: %v, want %v", tt.min, tt.max, got, tt.want)
		}
	}
}

// BenchmarkThinSamples measures the time and allocation of choosing the
// points of one figure of a million samples (go test -bench ThinSamples
// -benchmem ./report).
func BenchmarkThinSamples(b *testing.B) {
	x, y, group := cloud(1000000, 0, 0.5)
	b.ReportAllocs()
	for b.Loop() {
		thinSamples(x, y, nil, group)
	}
}
