package analysis

import (
	"math"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// imputeCVTolerance is the tolerance of the cross-validation's runs: they
// rank values of S, for which a change below a millionth of the data's
// norm no longer matters, and a looser tolerance saves most iterations.
const imputeCVTolerance = 1e-6

// ChooseImputeComponents chooses the number of components S of the
// imputation by cross-validation, as Josse & Husson (2012, section 4)
// recommend: ImputeCVRepeats times, hide ImputeCVShare of the observed
// cells at random (never a row's or a column's last observed cells), impute
// them with S = 1, …, Smax components, and score the squared differences
// from the hidden values on the preprocessed scale (the divisors of the
// starting table). S with the smallest mean error wins; ties go to the
// smaller S. Smax = min(ImputeMaxComponents, min(n−1, p) − 1). It returns
// S and the mean error per S.
func ChooseImputeComponents(x *mat.Dense, missing []intake.CellRef, scaling Scaling, seed uint64, threads int) (int, []float64) {
	n, p := x.Dims()
	smax := min(ImputeMaxComponents, min(n-1, p)-1)
	if smax <= 1 {
		return 1, nil
	}
	pp, err := FitPreprocessing(x, intake.TransformNone, scaling)
	if err != nil {
		return 1, nil
	}
	hidden := make([][]intake.CellRef, ImputeCVRepeats)
	for r := range hidden {
		hidden[r] = hideCells(n, p, missing, seed, r)
	}
	errs := make([]float64, ImputeCVRepeats*smax)
	counts := make([]int, ImputeCVRepeats*smax)
	parallelFor(len(errs), threads, func() struct{} { return struct{}{} }, func(_ struct{}, task int) {
		r, s := task/smax, task%smax+1
		if len(hidden[r]) == 0 {
			return
		}
		y := mat.DenseCopyOf(x)
		cells := append(append([]intake.CellRef(nil), missing...), hidden[r]...)
		startAtObservedMeans(y, cells)
		if _, err := ImputeRegularised(y, cells, s, scaling, imputeCVTolerance, ImputeMaxIterations); err != nil {
			errs[task] = math.Inf(1)
			return
		}
		for _, c := range hidden[r] {
			d := (y.At(c.Row, c.Var) - x.At(c.Row, c.Var)) / pp.Scales[c.Var]
			errs[task] += d * d
		}
		counts[task] = len(hidden[r])
	}, "imputation cross-validation", nil)
	mean := make([]float64, smax)
	best := 0
	for s := 0; s < smax; s++ {
		sum, cnt := 0.0, 0
		for r := 0; r < ImputeCVRepeats; r++ {
			sum += errs[r*smax+s]
			cnt += counts[r*smax+s]
		}
		mean[s] = math.Inf(1)
		if cnt > 0 {
			mean[s] = sum / float64(cnt)
		}
		if mean[s] < mean[best] {
			best = s
		}
	}
	return best + 1, mean
}

// hideCells draws the observed cells repeat r hides: ImputeCVShare of them
// (at least one), visited in a random order and kept only while their row
// keeps one observed cell and their column two (a column needs a spread).
func hideCells(n, p int, missing []intake.CellRef, seed uint64, r int) []intake.CellRef {
	miss := make([]bool, n*p)
	rowObs := make([]int, n)
	colObs := make([]int, p)
	for i := range rowObs {
		rowObs[i] = p
	}
	for j := range colObs {
		colObs[j] = n
	}
	for _, c := range missing {
		miss[c.Row*p+c.Var] = true
		rowObs[c.Row]--
		colObs[c.Var]--
	}
	want := max(1, int(math.Round(ImputeCVShare*float64(n*p-len(missing)))))
	rng := taskRNG(seed, streamImputeCV, r)
	var out []intake.CellRef
	for _, k := range rng.Perm(n * p) {
		if len(out) == want {
			break
		}
		i, j := k/p, k%p
		if miss[k] || rowObs[i] <= 1 || colObs[j] <= 2 {
			continue
		}
		miss[k] = true
		rowObs[i]--
		colObs[j]--
		out = append(out, intake.CellRef{Row: i, Var: j})
	}
	return out
}

// startAtObservedMeans sets the cells to their column's mean over the
// cells not listed, the starting point intake gives missing cells.
func startAtObservedMeans(y *mat.Dense, cells []intake.CellRef) {
	n, p := y.Dims()
	out := make([]bool, n*p)
	for _, c := range cells {
		out[c.Row*p+c.Var] = true
	}
	for j := 0; j < p; j++ {
		sum, cnt := 0.0, 0
		for i := 0; i < n; i++ {
			if !out[i*p+j] {
				sum += y.At(i, j)
				cnt++
			}
		}
		for i := 0; i < n && cnt > 0; i++ {
			if out[i*p+j] {
				y.Set(i, j, sum/float64(cnt))
			}
		}
	}
}
