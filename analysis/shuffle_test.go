package analysis

import (
	"math"
	"testing"
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
