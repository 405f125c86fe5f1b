package analysis

import (
	"math"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// sumsOf adds the rows [from, to) of x.
func sumsOf(x *mat.Dense, from, to int) *Sums {
	_, p := x.Dims()
	s := NewSums(p)
	for i := from; i < to; i++ {
		s.Add(x.RawRowView(i))
	}
	return s
}

func relClose(a, b, scale, tol float64) bool { return math.Abs(a-b) <= tol*math.Max(scale, 1e-300) }

// assertSumsEqual compares two Sums relative to each quantity's scale.
func assertSumsEqual(t *testing.T, got, want *Sums, tol float64) {
	t.Helper()
	if math.Abs(got.N-want.N) > 0 {
		t.Fatalf("n = %g, want %g", got.N, want.N)
	}
	gm, wm := got.Mean(), want.Mean()
	for j := range wm {
		if !relClose(gm[j], wm[j], math.Abs(wm[j])+want.SD(j), tol) {
			t.Errorf("mean %d = %.17g, want %.17g", j, gm[j], wm[j])
		}
		if got.Min[j] != want.Min[j] || got.Max[j] != want.Max[j] {
			t.Errorf("range %d = [%g, %g], want [%g, %g]", j, got.Min[j], got.Max[j], want.Min[j], want.Max[j])
		}
	}
	p := want.P
	for j := 0; j < p; j++ {
		for l := j; l < p; l++ {
			scale := math.Sqrt(want.Co[packed(p, j, j)] * want.Co[packed(p, l, l)])
			if g, w := got.Co[packed(p, j, l)], want.Co[packed(p, j, l)]; !relClose(g, w, scale, tol) {
				t.Errorf("co-moment [%d,%d] = %.17g, want %.17g", j, l, g, w)
			}
		}
	}
}

// A table split anywhere, summed in parts and merged in any grouping, has
// the sums of the whole, and those equal the two-pass textbook values.
func TestSumsMergeEqualsWhole(t *testing.T) {
	rng := synth.RNG(7, 1)
	x := synth.Gaussian(rng, 1000, 6)
	// A large offset in one column: the cancellation a naive Σx² would hit.
	for i := 0; i < 1000; i++ {
		x.Set(i, 2, 1e6+x.At(i, 2))
	}
	whole := sumsOf(x, 0, 1000)
	cases := []struct {
		name string
		cuts []int
	}{
		{"halves", []int{500}},
		{"first row alone", []int{1}},
		{"last row alone", []int{999}},
		{"uneven", []int{3, 17, 400, 401, 998}},
		{"empty part", []int{0, 250, 250, 1000}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			bounds := append(append([]int{0}, tc.cuts...), 1000)
			var parts []*Sums
			for i := 0; i+1 < len(bounds); i++ {
				parts = append(parts, sumsOf(x, bounds[i], bounds[i+1]))
			}
			left := NewSums(6) // ((a+b)+c)+…
			for _, s := range parts {
				if err := left.Merge(s); err != nil {
					t.Fatal(err)
				}
			}
			assertSumsEqual(t, left, whole, 1e-12)
			right := NewSums(6) // a+(b+(c+…))
			for i := len(parts) - 1; i >= 0; i-- {
				s := NewSums(6)
				_ = s.Merge(parts[i])
				_ = s.Merge(right)
				right = s
			}
			assertSumsEqual(t, right, whole, 1e-12)
		})
	}
	// Against the two-pass means and co-moments (centred first, then
	// summed), which are accurate to rounding (Chan, Golub & LeVeque 1983).
	for j := 0; j < 6; j++ {
		m := ColumnMean(x, j)
		if got := whole.Mean()[j]; !relClose(got, m, math.Abs(m)+whole.SD(j), 1e-14) {
			t.Errorf("mean %d = %.17g, two-pass %.17g", j, got, m)
		}
		for l := j; l < 6; l++ {
			ml, c := ColumnMean(x, l), 0.0
			for i := 0; i < 1000; i++ {
				c += (x.At(i, j) - m) * (x.At(i, l) - ml)
			}
			scale := 1000.0
			if !relClose(whole.Co[packed(6, j, l)], c, scale, 1e-12) {
				t.Errorf("co-moment [%d,%d] = %.17g, two-pass %.17g", j, l, whole.Co[packed(6, j, l)], c)
			}
		}
	}
	if err := NewSums(3).Merge(NewSums(4)); err == nil {
		t.Error("sums of different widths merged")
	}
}

// The decomposition from the sums equals the in-memory SVD to 1e-9 on the
// eigenvalues (relative to the largest) and the loadings (up to sign),
// on open datasets and a generated table, for every scaling.
func TestDecomposeSumsMatchesInMemory(t *testing.T) {
	gen := func() *intake.Table {
		x, _ := synth.LowRank(synth.RNG(3, 2), 5000, 8, []float64{5, 3, 2}, 0.5)
		return intake.TableFromMatrix("generated", x, nil, nil)
	}
	file := func(name string, opt intake.ReadOptions) func() *intake.Table {
		return func() *intake.Table {
			tab, err := intake.ReadTable(filepath.Join("..", "testdata", "datasets", name), opt)
			if err != nil {
				t.Fatal(err)
			}
			return tab
		}
	}
	tables := []struct {
		name string
		load func() *intake.Table
	}{
		{"wine", file("wine.csv", intake.ReadOptions{GroupColumn: "cultivar"})}, // UCI wine via scikit-learn
		{"usarrests", file("usarrests.csv", intake.ReadOptions{})},              // R datasets::USArrests
		{"generated", gen},
	}
	for _, tb := range tables {
		for _, sc := range Scalings {
			t.Run(tb.name+"/"+string(sc), func(t *testing.T) {
				tab := tb.load()
				want, err := Decompose(mustApply(t, tab, sc))
				if err != nil {
					t.Fatal(err)
				}
				n, _ := tab.X.Dims()
				s := sumsOf(tab.X, 0, n)
				pp, err := PreprocessingFromSums(s, tab.Transform, sc)
				if err != nil {
					t.Fatal(err)
				}
				got, err := DecomposeSums(s, pp)
				if err != nil {
					t.Fatal(err)
				}
				assertDecompositionsEqual(t, got, want, 1e-9)
			})
		}
	}
}

func mustApply(t *testing.T, tab *intake.Table, sc Scaling) *mat.Dense {
	t.Helper()
	pp, err := FitPreprocessing(tab.X, tab.Transform, sc)
	if err != nil {
		t.Fatal(err)
	}
	return pp.Apply(nil, tab.X)
}

func assertDecompositionsEqual(t *testing.T, got, want *Decomposition, tol float64) {
	t.Helper()
	if len(got.Eigenvalues) != len(want.Eigenvalues) {
		t.Fatalf("%d eigenvalues, want %d", len(got.Eigenvalues), len(want.Eigenvalues))
	}
	top := want.Eigenvalues[0]
	for a, w := range want.Eigenvalues {
		if math.Abs(got.Eigenvalues[a]-w) > tol*top {
			t.Errorf("eigenvalue %d = %.15g, in memory %.15g", a+1, got.Eigenvalues[a], w)
		}
	}
	p, m := want.Loadings.Dims()
	for a := 0; a < m; a++ {
		// Loadings are determined only where the eigenvalue is separated
		// from its neighbours; compare those (all are, on these tables).
		sign := 1.0
		if mat.Dot(got.Loadings.ColView(a), want.Loadings.ColView(a)) < 0 {
			sign = -1
		}
		for j := 0; j < p; j++ {
			if d := math.Abs(sign*got.Loadings.At(j, a) - want.Loadings.At(j, a)); d > tol {
				t.Errorf("loading [%d,PC%d] = %.12f, in memory %.12f", j+1, a+1, got.Loadings.At(j, a), want.Loadings.At(j, a))
			}
		}
	}
}

// A row added with weight w has the sums of the row added w times (West
// 1979), and weight 0 leaves the sums as they were.
func TestSumsWeightedEqualsRepeated(t *testing.T) {
	x := synth.Gaussian(synth.RNG(2, 2), 200, 4)
	weights := []float64{0, 1, 2, 3, 0, 5}
	weighted, repeated := NewSums(4), NewSums(4)
	for i := 0; i < 200; i++ {
		w := weights[i%len(weights)]
		weighted.AddWeighted(x.RawRowView(i), w)
		for c := 0; c < int(w); c++ {
			repeated.Add(x.RawRowView(i))
		}
	}
	assertSumsEqual(t, weighted, repeated, 1e-12)
}
