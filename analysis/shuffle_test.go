package analysis

import (
	"math"
	"slices"
	"testing"

	"pcqc/internal/synth"
)

// Every element must be equally likely to land in every position: with
// n = 20,000 (large enough for the bucket path) and 400 shuffles, the share
// of shuffles putting element 0 into each of 10 position bands is within
// five binomial standard errors of 1/10, and the result is always a
// permutation.
func TestShuffleIntoIsAUniformPermutation(t *testing.T) {
	const n, reps, bands = 20000, 400, 10
	src := make([]float64, n)
	for i := range src {
		src[i] = float64(i)
	}
	dst := make([]float64, n)
	var ws shuffleWorkspace
	hits := make([]int, bands)
	for r := 0; r < reps; r++ {
		shuffleInto(dst, src, taskRNG(uint64(r), streamPermutation, 0), &ws)
		seen := make([]bool, n)
		for pos, v := range dst {
			i := int(v)
			if seen[i] {
				t.Fatalf("shuffle %d repeats %d", r, i)
			}
			seen[i] = true
			if i == 0 {
				hits[pos*bands/n]++
			}
		}
	}
	se := math.Sqrt(reps * 0.1 * 0.9)
	for b, h := range hits {
		if math.Abs(float64(h)-reps/bands) > 5*se {
			t.Errorf("band %d: %d of %d", b, h, reps)
		}
	}
	// Neighbours stay neighbours no more often than chance: the share of
	// adjacent pairs (i, i+1) is about 2/n.
	adjacent := 0
	shuffleInto(dst, src, taskRNG(99, streamPermutation, 0), &ws)
	for pos := 1; pos < n; pos++ {
		if dst[pos] == dst[pos-1]+1 {
			adjacent++
		}
	}
	if adjacent > 10 {
		t.Errorf("%d adjacent pairs survived the shuffle", adjacent)
	}
}

// A panic in one worker is raised again in the caller, so that the command
// can report it, and the other workers stop taking tasks.
func TestParallelForRaisesWorkerPanicInCaller(t *testing.T) {
	var got any
	func() {
		defer func() { got = recover() }()
		parallelFor(1000, 4, func() int { return 0 }, func(_ int, i int) {
			if i == 17 {
				panic("task 17 failed")
			}
		}, "test", nil)
	}()
	if got != "task 17 failed" {
		t.Errorf("recovered %v", got)
	}
}

// With memory for a single worker, the columns of each permutation are
// shuffled by several goroutines (20,000 rows: the bucket path of
// shuffleInto); the result must not depend on how many.
func TestParallelAnalysisSingleWorkerThreadsAgree(t *testing.T) {
	x, _ := synth.LowRank(synth.RNG(9, 1), 20000, 6, []float64{3, 2}, 1)
	_, z, d := fitAndDecompose(t, x, ScaleUnit)
	saved := WorkspaceBudget
	defer func() { WorkspaceBudget = saved }()
	// Less than one copy of the data (8·n·p bytes) but room for several
	// column shufflers (10·n bytes each): one worker, several shufflers.
	WorkspaceBudget = int64(8*20000*6 - 1)
	var first Parallel
	for i, threads := range []int{1, 2, 3} {
		pa := ParallelAnalysis(z, d.Eigenvalues, 200, 4, threads, nil)
		if i == 0 {
			first = pa
			continue
		}
		if pa.Permutations != first.Permutations || !slices.Equal(pa.P95, first.P95) || !slices.Equal(pa.Exceedance, first.Exceedance) {
			t.Fatalf("threads %d: %d permutations, P95 %v; threads 1: %d, %v", threads, pa.Permutations, pa.P95, first.Permutations, first.P95)
		}
	}
	if first.Count != 2 {
		t.Errorf("count %d, want the 2 planted components", first.Count)
	}
}
