package analysis

import (
	"math/rand/v2"
	"testing"
)

// The Hungarian assignment reaches the best total of every permutation,
// found by brute force on random 5 × 5 weight matrices (5! = 120 pairings).
func TestAssignMaximumMatchesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 5))
	const k = 5
	var perms [][]int
	var permute func(p []int, i int)
	permute = func(p []int, i int) {
		if i == len(p) {
			perms = append(perms, append([]int(nil), p...))
			return
		}
		for j := i; j < len(p); j++ {
			p[i], p[j] = p[j], p[i]
			permute(p, i+1)
			p[i], p[j] = p[j], p[i]
		}
	}
	permute([]int{0, 1, 2, 3, 4}, 0)
	for trial := 0; trial < 200; trial++ {
		w := make([][]float64, k)
		for i := range w {
			w[i] = make([]float64, k)
			for j := range w[i] {
				w[i][j] = rng.Float64()
			}
		}
		best := 0.0
		for _, p := range perms {
			s := 0.0
			for i, j := range p {
				s += w[i][j]
			}
			best = max(best, s)
		}
		got := AssignMaximum(w)
		s, used := 0.0, map[int]bool{}
		for i, j := range got {
			s += w[i][j]
			used[j] = true
		}
		if len(used) != k || s < best-1e-12 {
			t.Fatalf("trial %d: assignment %v sums to %v, best %v", trial, got, s, best)
		}
	}
}
