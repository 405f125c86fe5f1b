package analysis

import (
	"math"
	"math/rand/v2"
	"testing"
)

// bruteAssignment finds the cheapest assignment by trying every
// permutation of the padded square: the definition of the problem, with no
// cleverness to share bugs with the Hungarian method.
func bruteAssignment(cost [][]float64) float64 {
	rows, cols := len(cost), len(cost[0])
	n := max(rows, cols)
	perm := make([]int, n)
	for i := range perm {
		perm[i] = i
	}
	best := math.Inf(1)
	var try func(k int)
	try = func(k int) {
		if k == n {
			total := 0.0
			for i := 0; i < rows; i++ {
				if perm[i] < cols {
					total += cost[i][perm[i]]
				}
			}
			best = math.Min(best, total)
			return
		}
		for i := k; i < n; i++ {
			perm[k], perm[i] = perm[i], perm[k]
			try(k + 1)
			perm[k], perm[i] = perm[i], perm[k]
		}
	}
	try(0)
	return best
}

func TestAssignmentMatchesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 4))
	for _, size := range [][2]int{{1, 1}, {2, 2}, {3, 3}, {4, 4}, {5, 5}, {6, 6}, {3, 5}, {5, 3}, {1, 4}, {4, 1}, {6, 4}} {
		for rep := 0; rep < 20; rep++ {
			cost := make([][]float64, size[0])
			for i := range cost {
				cost[i] = make([]float64, size[1])
				for j := range cost[i] {
					cost[i][j] = -rng.Float64()
				}
			}
			got := Assignment(cost)
			total := 0.0
			used := map[int]bool{}
			assigned := 0
			for i, j := range got {
				if j < 0 {
					continue
				}
				if used[j] {
					t.Fatalf("%v: column %d assigned twice in %v", size, j, got)
				}
				used[j] = true
				assigned++
				total += cost[i][j]
			}
			if assigned != min(size[0], size[1]) {
				t.Fatalf("%v: %d assigned, want %d (%v)", size, assigned, min(size[0], size[1]), got)
			}
			if want := bruteAssignment(cost); math.Abs(total-want) > 1e-12 {
				t.Fatalf("%v rep %d: total %g, optimum %g (%v)", size, rep, total, want, got)
			}
		}
	}
}

// TestAssignmentNotGreedy is the case where a greedy pairing (largest |φ|
// first) loses: greedy takes 0.9 and is left with 0.1 (total 1.0), the
// optimum is 0.8 + 0.85 = 1.65.
func TestAssignmentNotGreedy(t *testing.T) {
	cost := [][]float64{{-0.9, -0.8}, {-0.85, -0.1}}
	got := Assignment(cost)
	if got[0] != 1 || got[1] != 0 {
		t.Fatalf("assignment %v, want [1 0]", got)
	}
}
