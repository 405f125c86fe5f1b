package analysis

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
)

// Cross-validation settings.
const (
	// CVFolds is the number of element-wise folds. Seven is common practice
	// in chemometrics (Wold 1978, Technometrics 20:397–405, deleted about a
	// seventh of the elements at a time): each fold trains on 6/7 of the
	// elements, close enough to the whole table for the model to be the
	// same, while seven folds keep the cost at seven model fits per count.
	CVFolds = 7
	// CVMaxRows is the most rows cross-validation uses; larger tables are
	// cross-validated on a seeded random subset of this many rows. PRESS
	// judges where the structure stops, and 300 rows determine components
	// well above noise; the cost is then bounded whatever n is.
	CVMaxRows = 300
	// CVMaxComponents is the largest count whose PRESS is computed.
	CVMaxComponents = 15
	// CVPatience: the PRESS curve is followed until this many successive
	// counts bring no new minimum (common practice in early stopping); the
	// curve beyond is noise being fitted.
	CVPatience = 2
	// CVTolerance and CVMaxIterations stop the imputation of each fold's
	// left-out elements: iterations stop when the imputed values change by
	// less than CVTolerance times the root mean square of the training
	// elements, or after CVMaxIterations.
	CVTolerance     = 1e-4
	CVMaxIterations = 50
)

// streamCrossValidation is the random stream of the fold assignment.
const streamCrossValidation = 3 << 40

// CrossValidation is the result of element-wise k-fold cross-validation
// of the PCA model.
type CrossValidation struct {
	Folds     int
	Rows      int // rows used (a seeded subset when the table has more than CVMaxRows)
	RowsTotal int
	// PRESS[a] is the sum, over every element of the rows used, of the
	// squared error of its prediction by an a-component model fitted
	// without it, in the units of the preprocessed table; PRESS[0] is the
	// mean-only model.
	PRESS []float64
	// FoldPRESS[f][a] is fold f's share of PRESS[a].
	FoldPRESS [][]float64
	// SS is the sum of squares of the preprocessed elements of the rows
	// used, for reading PRESS as a share.
	SS float64
	// Min is the count with the smallest PRESS; SE is the standard error of
	// the PRESS difference between Count and Min over the folds.
	Min   int
	SE    float64
	Count int
	// Iterations is the most imputation iterations any fit needed;
	// Unconverged counts the fits stopped at CVMaxIterations.
	Iterations  int
	Unconverged int
}

// CVFoldAssignment returns the diagonal element-wise fold pattern of an
// n×p table: element (i, j) belongs to fold (r_i + j) mod k, where r is a
// seeded random permutation of the rows. Each row loses about p/k elements
// to each fold and each column about n/k, so no fold deletes a whole row
// or column (Bro et al. 2008 recommend such patterns for element-wise
// cross-validation).
func CVFoldAssignment(n, p, k int, seed uint64) [][]int {
	folds := diagonalFolds(n, k, seed)
	fold := make([][]int, n)
	for i := range fold {
		fold[i] = make([]int, p)
		for j := range fold[i] {
			fold[i][j] = folds.of(i, j)
		}
	}
	return fold
}

// foldPattern assigns every element of an n × p table to one of k folds:
// the diagonal pattern of CVFoldAssignment, held as one shift per row
// rather than n·p labels, or a given assignment (a reference's pattern, in
// tests).
type foldPattern struct {
	k     int
	shift []int   // diagonal: element (i, j) is in fold (shift[i] + j) mod k
	given [][]int // otherwise the fold of every element
}

// diagonalFolds is the pattern of CVFoldAssignment.
func diagonalFolds(n, k int, seed uint64) foldPattern {
	return foldPattern{k: k, shift: taskRNG(seed, streamCrossValidation, 0).Perm(n)}
}

// of returns the fold of element (i, j).
func (fp foldPattern) of(i, j int) int {
	if fp.given != nil {
		return fp.given[i][j]
	}
	return (fp.shift[i] + j) % fp.k
}

// cells appends to dst the row-major offsets of fold f's elements in an
// n × p table, in increasing order.
func (fp foldPattern) cells(dst []int32, f, n, p int) []int32 {
	for i := 0; i < n; i++ {
		if fp.given != nil {
			for j := 0; j < p; j++ {
				if fp.given[i][j] == f {
					dst = append(dst, int32(i*p+j))
				}
			}
			continue
		}
		for j := ((f-fp.shift[i])%fp.k + fp.k) % fp.k; j < p; j += fp.k {
			dst = append(dst, int32(i*p+j))
		}
	}
	return dst
}

// CrossValidate runs element-wise k-fold cross-validation ("ekf") of the
// PCA model, the method Bro, Kjeldahl, Smilde & Kiers (2008, Anal.
// Bioanal. Chem. 390:1241–1251) recommend after showing that leaving out
// whole rows is flawed (the left-out row's scores are then estimated from
// the very values they predict, so PRESS keeps falling as components are
// added). Each fold's elements are treated as missing: the centring and
// scaling are refitted on the remaining elements, a PCA model with missing
// values is fitted by expectation–maximisation (the missing elements are
// imputed by the model's reconstruction until they stop changing), and the
// left-out elements are predicted by that model. PRESS(a) sums the squared
// prediction errors for a = 0, 1, …; the count is the fewest components
// whose PRESS is within one standard error of the minimum (the
// one-standard-error rule of Breiman et al. 1984, Classification and
// Regression Trees, §3.4.3; the standard error is that of the paired
// fold-by-fold difference, common practice).
//
// Cross-validation refits the centring and scaling inside each fold, so it
// works on the transformed table before preprocessing, x = z·Scales + Means
// (recovered row by row from z, which may have replaced the table in place).
// Tables with more than CVMaxRows rows are cross-validated on a seeded
// subset of rows.
// The folds run in parallel and each has its own arithmetic, so the result
// does not depend on threads.
func CrossValidate(z *mat.Dense, pp Preprocessing, seed uint64, threads int, progress Progress) CrossValidation {
	n, p := z.Dims()
	scaling := pp.Scaling
	rows := make([]int, n)
	for i := range rows {
		rows[i] = i
	}
	if n > CVMaxRows {
		rng := taskRNG(seed, streamCrossValidation, 1)
		rows = rng.Perm(n)[:CVMaxRows]
		slices.Sort(rows)
	}
	sub := cvTable{z: z, rows: rows, scale: pp.Scales, mean: pp.Means}
	unit := make([]float64, p)
	col := make([]float64, len(rows))
	for j := range unit {
		unit[j] = scaleOf(scaling, sub.column(j, col))
		if !(unit[j] > 0) {
			unit[j] = 1
		}
	}
	// a = p−1 components leave an element whose row lost only it exactly
	// determined by the other p−1 values and p−1 scores: its imputation
	// drifts without bound, so PRESS is followed to p−2 at most.
	maxA := min(p-2, len(rows)-2, CVMaxComponents)
	cv := ekf(sub, scaling, unit, diagonalFolds(len(rows), CVFolds, seed), CVFolds, maxA, CVPatience, CVTolerance, CVMaxIterations, threads, progress)
	cv.RowsTotal = n
	return cv
}

// cvTable is the transformed table that cross-validation works on: the
// chosen rows of the preprocessed z turned back into x = z·scale + mean,
// element by element when asked, so that no copy of the matrix is held.
type cvTable struct {
	z           *mat.Dense
	rows        []int
	scale, mean []float64
}

// tableOf wraps a matrix that is already the transformed table.
func tableOf(x *mat.Dense) cvTable {
	n, p := x.Dims()
	t := cvTable{z: x, rows: make([]int, n), scale: make([]float64, p), mean: make([]float64, p)}
	for i := range t.rows {
		t.rows[i] = i
	}
	for j := range t.scale {
		t.scale[j] = 1
	}
	return t
}

func (t cvTable) dims() (n, p int) { _, p = t.z.Dims(); return len(t.rows), p }

// at returns element (i, j) of the table.
func (t cvTable) at(i, j int) float64 { return t.z.At(t.rows[i], j)*t.scale[j] + t.mean[j] }

// row writes row i of the table into dst.
func (t cvTable) row(i int, dst []float64) {
	for j, v := range t.z.RawRowView(t.rows[i]) {
		dst[j] = v*t.scale[j] + t.mean[j]
	}
}

// column writes column j of the table into dst.
func (t cvTable) column(j int, dst []float64) []float64 {
	dst = dst[:0]
	for i := range t.rows {
		dst = append(dst, t.at(i, j))
	}
	return dst
}

// column copies column j of x into dst.
func column(x *mat.Dense, j int, dst []float64) []float64 {
	n, _ := x.Dims()
	dst = dst[:0]
	for i := 0; i < n; i++ {
		dst = append(dst, x.At(i, j))
	}
	return dst
}

// scaleOf is the divisor the scaling gives a column of values.
func scaleOf(s Scaling, v []float64) float64 {
	if len(v) < 2 {
		return 1
	}
	switch s {
	case ScaleUnit:
		return sampleSD(v)
	case ScalePareto:
		return math.Sqrt(sampleSD(v))
	case ScaleRange:
		return slices.Max(v) - slices.Min(v)
	}
	return 1
}

// ekf computes PRESS for a = 0 … maxA (or until patience counts bring no
// new minimum) with the given fold pattern; errors are divided by unit
// (per variable) so that PRESS is in the units of the preprocessed table.
func ekf(x cvTable, scaling Scaling, unit []float64, folds foldPattern, k, maxA, patience int, tol float64, maxIter, threads int, progress Progress) CrossValidation {
	n, p := x.dims()
	cv := CrossValidation{Folds: k, Rows: n, FoldPRESS: make([][]float64, k)}
	v := make([]float64, n)
	for j := 0; j < p; j++ {
		v = x.column(j, v)
		mean := 0.0
		for _, t := range v {
			mean += t
		}
		mean /= float64(n)
		for _, t := range v {
			d := (t - mean) / unit[j]
			cv.SS += d * d
		}
	}
	states := foldStates(x, scaling, unit, folds, k)
	// press sums fold f's squared prediction errors; w nil stands for a
	// prediction of 0 everywhere (the training mean).
	press := func(f int, w []float64, miss []int32) float64 {
		st := states[f]
		e := 0.0
		for _, o := range miss {
			i, j := int(o)/p, int(o)%p
			pred := 0.0
			if w != nil {
				pred = w[o]
			}
			d := (x.at(i, j) - (st.mean[j] + st.scale[j]*pred)) / unit[j]
			e += d * d
		}
		return e
	}
	var miss []int32
	for f := 0; f < k; f++ {
		// Left-out elements start at the training mean, 0.
		miss = folds.cells(miss[:0], f, n, p)
		cv.FoldPRESS[f] = []float64{press(f, nil, miss)}
	}
	cv.PRESS = []float64{sumFold(cv.FoldPRESS, 0)}
	best, since := 0, 0
	// The workers' workspaces (a filled n × p matrix each) are kept from
	// one count to the next: made afresh, the old ones were garbage the
	// size of the table, twice over, at every count.
	var pool workspacePool[*imputeWorkspace]
	pool.make = func() *imputeWorkspace { return &imputeWorkspace{} }
	for a := 1; a <= maxA && since < patience; a++ {
		pool.reset()
		parallelFor(k, threads, pool.get, func(ws *imputeWorkspace, f int) {
			st := states[f]
			ws.miss = folds.cells(ws.miss[:0], f, n, p)
			w := st.fill(x, ws.miss, ws)
			it, ok := imputePCA(w, ws.miss, st.ssObs, st.nObs, a, tol, maxIter, ws)
			st.keep(w, ws.miss)
			st.iters = max(st.iters, it)
			st.unconverged = !ok
			cv.FoldPRESS[f] = append(cv.FoldPRESS[f], press(f, w.RawMatrix().Data, ws.miss))
		}, "cross-validation", nil)
		if progress != nil {
			progress("cross-validation", a, maxA)
		}
		for f := 0; f < k; f++ {
			cv.Iterations = max(cv.Iterations, states[f].iters)
			if states[f].unconverged {
				cv.Unconverged++
			}
		}
		cv.PRESS = append(cv.PRESS, sumFold(cv.FoldPRESS, a))
		if cv.PRESS[a] < cv.PRESS[best] {
			best, since = a, 0
		} else {
			since++
		}
	}
	cv.Min = best
	cv.Count = best
	for a := 0; a < best; a++ {
		d := make([]float64, k)
		for f := 0; f < k; f++ {
			d[f] = cv.FoldPRESS[f][a] - cv.FoldPRESS[f][best]
		}
		se := math.Sqrt(float64(k)) * sampleSD(d)
		if cv.PRESS[a]-cv.PRESS[best] <= se {
			cv.Count, cv.SE = a, se
			break
		}
	}
	return cv
}

// sumFold sums the folds' PRESS at a components.
func sumFold(fp [][]float64, a int) float64 {
	s := 0.0
	for _, f := range fp {
		s += f[a]
	}
	return s
}

// foldState is one fold's state between component counts: its training
// centring and scaling, and the current imputed values of its left-out
// elements, carried from one count to the next as the warm start of the
// imputation. The filled matrix itself is rebuilt from x in the worker's
// workspace (fill), so that k folds hold k·(n·p/k) imputed values rather
// than k copies of the matrix: on wide tables those copies were most of
// the audit's memory. The left-out elements' offsets are listed again from
// the fold pattern for each fit (foldPattern.cells), in the worker's
// workspace, rather than held for every fold.
type foldState struct {
	mean, scale []float64
	// imp holds the left-out elements' current values, preprocessed, in
	// row-major order, in single precision: they are only where the next
	// count's imputation starts, which then iterates to its own tolerance,
	// and on wide tables they were a fifth of the audit's memory.
	imp         []float32
	ssObs       float64
	nObs        int
	iters       int
	unconverged bool
}

// foldStates sets up every fold: training means and scales per column, the
// sum of squares of the preprocessed training elements, and the left-out
// elements, which start at the training mean (0).
func foldStates(x cvTable, scaling Scaling, unit []float64, folds foldPattern, k int) []*foldState {
	n, p := x.dims()
	states := make([]*foldState, k)
	train := make([]float64, 0, n)
	for f := 0; f < k; f++ {
		st := &foldState{mean: make([]float64, p), scale: make([]float64, p)}
		for j := 0; j < p; j++ {
			train = train[:0]
			for i := 0; i < n; i++ {
				if folds.of(i, j) != f {
					train = append(train, x.at(i, j))
				}
			}
			m := 0.0
			for _, t := range train {
				m += t
			}
			if len(train) > 0 {
				m /= float64(len(train))
			}
			s := scaleOf(scaling, train)
			if !(s > 0) { // constant on the training elements: keep the table's scale
				s = unit[j]
			}
			st.mean[j], st.scale[j] = m, s
			for _, t := range train {
				v := (t - m) / s
				st.ssObs += v * v
			}
			st.nObs += len(train)
		}
		st.imp = make([]float32, n*p-st.nObs)
		states[f] = st
	}
	return states
}

// fill writes the fold's filled matrix into the workspace: the training
// elements preprocessed with the fold's centring and scaling, the left-out
// ones at their current imputed values.
func (st *foldState) fill(x cvTable, miss []int32, ws *imputeWorkspace) *mat.Dense {
	n, p := x.dims()
	if ws.w == nil {
		ws.w = mat.NewDense(n, p, nil)
	}
	wd := ws.w.RawMatrix().Data
	for i := 0; i < n; i++ {
		row := wd[i*p : (i+1)*p]
		x.row(i, row)
		for j, v := range row {
			row[j] = (v - st.mean[j]) / st.scale[j]
		}
	}
	for c, o := range miss {
		wd[o] = float64(st.imp[c])
	}
	return ws.w
}

// keep stores the imputed values of w's left-out elements for the next
// count.
func (st *foldState) keep(w *mat.Dense, miss []int32) {
	wd := w.RawMatrix().Data
	for c, o := range miss {
		st.imp[c] = float32(wd[o])
	}
}

// sampleSD is the standard deviation with the n−1 divisor; 0 for fewer
// than two values.
func sampleSD(v []float64) float64 {
	if len(v) < 2 {
		return 0
	}
	return stat.StdDev(v, nil)
}

// imputeWorkspace is the reusable memory of a cross-validation worker: the
// filled matrix of the fold it works on, and the scratch of imputePCA.
type imputeWorkspace struct {
	w    *mat.Dense
	miss []int32 // the offsets of the fold being fitted
	gram []float64
	mu   []float64
	sym  mat.EigenSym
	v, t mat.Dense
	lead leadingSolver
}

// imputePCA fits an a-component PCA model with column offsets to w, whose
// elements listed in miss (row-major offsets into w's data) are missing,
// by expectation–maximisation (the iterative imputation of Kiers 1997,
// Psychometrika 62:251–266): the missing elements are replaced by the
// model's reconstruction, the model is refitted, and so on, until the
// root mean square change of the imputed elements is below tol times the
// root mean square of the training elements. w holds the imputed values on
// return. It returns the iterations used and whether they converged.
//
// w is centred in place during the iteration (its column offsets kept in
// ws.mu and added back at the end) and the model is evaluated only at the
// missing elements, so that no other n × p matrix is needed.
func imputePCA(w *mat.Dense, miss []int32, ssObs float64, nObs int, a int, tol float64, maxIter int, ws *imputeWorkspace) (int, bool) {
	n, p := w.Dims()
	data := w.RawMatrix().Data // w is contiguous: made by mat.NewDense
	limit := tol * tol * ssObs / float64(max(nObs, 1)) * float64(max(len(miss), 1))
	if len(ws.mu) != p {
		ws.mu = make([]float64, p)
	}
	mu := ws.mu
	clear(mu)
	shift := make([]float64, p)
	defer func() { // w back to the filled values, offsets added
		for i := 0; i < n; i++ {
			for j := range mu {
				data[i*p+j] += mu[j]
			}
		}
	}()
	for it := 1; it <= maxIter; it++ {
		// Offsets: the column means of the filled matrix, whose centred
		// part data holds; data is re-centred by the change of the means.
		clear(shift)
		for i := 0; i < n; i++ {
			for j, v := range data[i*p : (i+1)*p] {
				shift[j] += v
			}
		}
		for j := range shift {
			shift[j] /= float64(n)
			mu[j] += shift[j]
		}
		for i := 0; i < n; i++ {
			row := data[i*p : (i+1)*p]
			for j := range row {
				row[j] -= shift[j]
			}
		}
		fitAt := lowRank(w, a, ws)
		change := 0.0
		for _, o := range miss {
			v := fitAt(int(o))
			d := v - data[o]
			change += d * d
			data[o] = v
		}
		if change <= limit {
			return it, true
		}
	}
	return maxIter, false
}

// lowRank returns the best rank-a approximation of the centred wc as a
// function of the row-major offset of an element, from the eigenvectors of
// the smaller cross-product (p×p for tall, n×n for wide): only the missing
// elements are ever evaluated.
func lowRank(wc *mat.Dense, a int, ws *imputeWorkspace) func(o int) float64 {
	n, p := wc.Dims()
	ws.v.Reset()
	ws.t.Reset()
	if n >= p {
		if !ws.sym.Factorize(crossProduct(wc, true, &ws.gram), true) {
			panic("analysis: symmetric eigendecomposition failed in cross-validation")
		}
		ws.sym.VectorsTo(&ws.v)
		va := ws.v.Slice(0, p, p-a, p)
		ws.t.Mul(wc, va) // n × a
		return func(o int) float64 {
			i, j := o/p, o%p
			s := 0.0
			for c := 0; c < a; c++ {
				s += ws.t.At(i, c) * va.At(j, c)
			}
			return s
		}
	}
	// Only the a leading eigenvectors of the n×n Gram matrix are needed
	// (their order does not matter to the reconstruction).
	ua, ok := ws.lead.leading(crossProduct(wc, false, &ws.gram).RawSymmetric().Data, n, a)
	if !ok {
		panic("analysis: symmetric eigendecomposition failed in cross-validation")
	}
	ws.t.Mul(ua.T(), wc) // a × p
	return func(o int) float64 {
		i, j := o/p, o%p
		s := 0.0
		for c := 0; c < a; c++ {
			s += ua.At(i, c) * ws.t.At(c, j)
		}
		return s
	}
}

// crossProduct returns wcᵀwc (tall) or wc·wcᵀ (wide) as a symmetric matrix
// held in *buf, which it grows as needed.
func crossProduct(wc *mat.Dense, tall bool, buf *[]float64) *mat.SymDense {
	raw := wc.RawMatrix()
	a := blas64.General{Rows: raw.Rows, Cols: raw.Cols, Stride: raw.Stride, Data: raw.Data}
	if tall {
		*buf = grow(*buf, raw.Cols*raw.Cols)
		c := blas64.Symmetric{N: raw.Cols, Stride: raw.Cols, Uplo: blas.Upper, Data: *buf}
		blas64.Syrk(blas.Trans, 1, a, 0, c)
		return mat.NewSymDense(raw.Cols, c.Data)
	}
	*buf = grow(*buf, raw.Rows*raw.Rows)
	c := blas64.Symmetric{N: raw.Rows, Stride: raw.Rows, Uplo: blas.Upper, Data: *buf}
	gramUpper(c, a)
	return mat.NewSymDense(raw.Rows, c.Data)
}
