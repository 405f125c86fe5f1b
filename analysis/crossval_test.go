package analysis

import (
	"encoding/csv"
	"math"
	"os"
	"slices"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// readCSVFloats reads a CSV file of numbers, skipping skipRows header rows
// and skipCols leading columns.
func readCSVFloats(t *testing.T, path string, skipRows, skipCols int) [][]float64 {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var out [][]float64
	for _, r := range recs[skipRows:] {
		var row []float64
		for _, v := range r[skipCols:] {
			x, err := strconv.ParseFloat(v, 64)
			if err != nil {
				t.Fatal(err)
			}
			row = append(row, x)
		}
		out = append(out, row)
	}
	return out
}

// PRESS of element-wise 7-fold cross-validation on USArrests, with the fold
// pattern fixed in testdata/crossval/usarrests_folds.csv, against an
// independent implementation of the same algorithm in numpy 1.24.2
// (testdata/crossval/ekf_reference.py, run offline; its output is
// usarrests_press.csv). Both iterate to a tolerance of 1e-13, so both reach
// the same fixed point of the imputation.
func TestCrossValidationMatchesNumpyReference(t *testing.T) {
	data := readCSVFloats(t, "../testdata/datasets/usarrests.csv", 1, 1)
	x := mat.NewDense(len(data), len(data[0]), nil)
	for i, r := range data {
		x.SetRow(i, r)
	}
	n, p := x.Dims()
	folds := readCSVFloats(t, "../testdata/crossval/usarrests_folds.csv", 0, 0)
	fold := make([][]int, n)
	for i := range fold {
		fold[i] = make([]int, p)
		for j := range fold[i] {
			fold[i][j] = int(folds[i][j])
		}
	}
	unit := make([]float64, p)
	for j := range unit {
		unit[j] = scaleOf(ScaleUnit, column(x, j, nil))
	}
	want := readCSVFloats(t, "../testdata/crossval/usarrests_press.csv", 1, 0)
	maxA := len(want) - 1
	for _, threads := range []int{1, 3} {
		cv := ekf(tableOf(x), ScaleUnit, unit, foldPattern{k: CVFolds, given: fold}, CVFolds, maxA, maxA+1, 1e-13, 100000, threads, nil)
		if len(cv.PRESS) != len(want) {
			t.Fatalf("PRESS for %d counts, want %d", len(cv.PRESS), len(want))
		}
		for a, w := range want {
			if math.Abs(cv.PRESS[a]-w[1]) > 1e-6*w[1] {
				t.Errorf("threads %d: PRESS(%d) = %.10g, numpy gives %.10g", threads, a, cv.PRESS[a], w[1])
			}
			for f := 0; f < CVFolds; f++ {
				if math.Abs(cv.FoldPRESS[f][a]-w[2+f]) > 1e-6*w[2+f] {
					t.Errorf("threads %d: fold %d PRESS(%d) = %.10g, numpy gives %.10g", threads, f+1, a, cv.FoldPRESS[f][a], w[2+f])
				}
			}
		}
		// numpy reference: PRESS 204.2, 133.9, 270.3 — smallest at one
		// component, which ISLR §10.2 also reads off the scree plot.
		if cv.Min != 1 || cv.Count != 1 {
			t.Errorf("smallest PRESS at %d, chosen %d; want 1 and 1", cv.Min, cv.Count)
		}
	}
}

// The diagonal pattern deletes each element exactly once, and each fold
// takes about a k-th of every column and no whole row.
func TestCVFoldAssignmentBalanced(t *testing.T) {
	for _, c := range []struct{ n, p int }{{50, 4}, {30, 7}, {100, 20}, {8, 3}} {
		fold := CVFoldAssignment(c.n, c.p, CVFolds, 3)
		for f := 0; f < CVFolds; f++ {
			for i := 0; i < c.n; i++ {
				left := 0
				for j := 0; j < c.p; j++ {
					if fold[i][j] == f {
						left++
					}
				}
				if left == c.p {
					t.Errorf("%dx%d: fold %d deletes all of row %d", c.n, c.p, f, i)
				}
			}
			for j := 0; j < c.p; j++ {
				cnt := 0
				for i := 0; i < c.n; i++ {
					if fold[i][j] == f {
						cnt++
					}
				}
				if lo, hi := c.n/CVFolds, (c.n+CVFolds-1)/CVFolds; cnt < lo || cnt > hi {
					t.Errorf("%dx%d: fold %d takes %d of column %d, want %d–%d", c.n, c.p, f, cnt, j, lo, hi)
				}
			}
		}
	}
}

// On planted low-rank data cross-validation keeps the planted number of
// components on most seeds, and none of pure noise; the result does not
// depend on threads.
func TestCrossValidationRecoversPlantedRank(t *testing.T) {
	cases := []struct {
		n, p int
		sd   []float64
	}{
		{200, 10, nil},
		{200, 10, []float64{3, 2}},
		{300, 12, []float64{3, 2.5, 2}},
		{60, 40, []float64{3, 2}}, // wide after the fold's deletions, n > p still
		{40, 60, []float64{4, 3}}, // wide
	}
	for _, c := range cases {
		hits := 0
		for seed := uint64(1); seed <= 3; seed++ {
			var x *mat.Dense
			if c.sd == nil {
				x = synth.Gaussian(synth.RNG(seed, 31), c.n, c.p)
			} else {
				x, _ = synth.LowRank(synth.RNG(seed, 31), c.n, c.p, c.sd, 1)
			}
			pp, _ := FitPreprocessing(x, intake.TransformNone, ScaleUnit)
			z := pp.Apply(nil, x)
			cv := CrossValidate(z, pp, seed, 1, nil)
			if cv.Count == len(c.sd) {
				hits++
			}
			if seed == 1 {
				cv2 := CrossValidate(z, pp, seed, 4, nil)
				for a := range cv.PRESS {
					if cv.PRESS[a] != cv2.PRESS[a] { // same arithmetic per fold: bit-identical
						t.Fatalf("%dx%d: PRESS(%d) %v with 1 thread, %v with 4", c.n, c.p, a, cv.PRESS[a], cv2.PRESS[a])
					}
				}
			}
		}
		if hits < 2 {
			t.Errorf("%dx%d planted %d: cross-validation found it on %d of 3 seeds", c.n, c.p, len(c.sd), hits)
		}
	}
}

// foldPattern.cells lists exactly the elements CVFoldAssignment gives each
// fold, in row-major order, for the diagonal and for a given pattern.
func TestFoldPatternCells(t *testing.T) {
	for _, c := range []struct{ n, p int }{{50, 4}, {30, 7}, {9, 20}, {8, 3}} {
		fold := CVFoldAssignment(c.n, c.p, CVFolds, 5)
		for _, fp := range []foldPattern{diagonalFolds(c.n, CVFolds, 5), {k: CVFolds, given: fold}} {
			for f := 0; f < CVFolds; f++ {
				var want []int32
				for i := 0; i < c.n; i++ {
					for j := 0; j < c.p; j++ {
						if fold[i][j] == f {
							want = append(want, int32(i*c.p+j))
						}
					}
				}
				if got := fp.cells(nil, f, c.n, c.p); !slices.Equal(got, want) {
					t.Fatalf("%dx%d fold %d (given %v): cells %v, want %v", c.n, c.p, f, fp.given != nil, got, want)
				}
			}
		}
	}
}
