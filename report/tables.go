package report

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"math"
	"os"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis"
	"pcqc/analysis/intake"
)

// num formats a number for the CSV tables: the shortest decimal that reads
// back as the same float64, so tables are exact and diff-friendly. A value
// that is not a finite number is an empty cell, which every reader
// (pcqc's included) takes as missing, rather than "NaN" or "+Inf".
func num(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return ""
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// componentName is the label of the a-th component (0-based).
func componentName(a int) string { return fmt.Sprintf("PC%d", a+1) }

// writeCSV writes rows to path as RFC 4180 CSV (fields with commas, quotes or
// newlines are quoted, so ids survive a round trip).
func writeCSV(path string, rows [][]string) error {
	return streamCSV(path, rows[0], len(rows)-1, func(i int, _ []string) []string { return rows[i+1] })
}

// streamCSV writes a header and n rows made one at a time by row (which may
// reuse dst), so that tables of millions of rows are never held in memory.
func streamCSV(path string, header []string, n int, row func(i int, dst []string) []string) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	bw := bufio.NewWriterSize(f, 1<<20)
	w := csv.NewWriter(bw)
	if err := w.Write(header); err != nil {
		f.Close()
		return err
	}
	dst := make([]string, len(header))
	for i := 0; i < n; i++ {
		if err := w.Write(row(i, dst[:0])); err != nil {
			f.Close()
			return err
		}
	}
	w.Flush()
	if err := w.Error(); err != nil {
		f.Close()
		return err
	}
	if err := bw.Flush(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// VarianceRows builds variance.csv: one row per component (all m of them).
// Beyond the eigenvalue and its shares it gives the 95th percentile of the
// permuted eigenvalues (empty when parallel analysis did not run), the
// broken-stick expected share, and for each count rule whether it keeps the
// component (empty when the rule does not apply), then whether the
// component was retained.
func VarianceRows(res *analysis.Result) [][]string {
	d := res.Decomp
	pct := Percentages(d.Eigenvalues)
	header := []string{"component", "eigenvalue", "percent", "cumulative_percent", "permutation_p95", "permutation_exceedance", "parallel_decision", "broken_stick_percent"}
	for _, c := range res.Counts.Counts {
		header = append(header, "kept_"+strings.ReplaceAll(string(c.Rule), "-", "_"))
	}
	header = append(header, "retained")
	rows := [][]string{header}
	cum := 0.0
	for a, l := range d.Eigenvalues {
		cum += pct[a]
		p95, exceed, decision := "", "", ""
		if pa := res.Counts.Parallel; pa.Permutations > 0 {
			p95, exceed, decision = num(pa.P95[a]), num(pa.Exceedance[a]), string(pa.Decision[a])
		}
		row := []string{componentName(a), num(l), num(pct[a]), num(cum), p95, exceed, decision, num(100 * res.Counts.BrokenStickShares[a])}
		for _, c := range res.Counts.Counts {
			kept := ""
			if c.Applies {
				kept = strconv.FormatBool(a < c.Count)
			}
			row = append(row, kept)
		}
		row = append(row, strconv.FormatBool(a < res.Retained))
		rows = append(rows, row)
	}
	return rows
}

// PressRows builds press.csv, the cross-validation curve: per number of
// components a (0 = the mean only), PRESS summed over the folds, PRESS as a
// share of the total sum of squares of the rows used, each fold's PRESS,
// and which count has the smallest PRESS and which the rule chose. It is
// nil when cross-validation did not run.
func PressRows(res *analysis.Result) [][]string {
	cv := res.Counts.CV
	if cv.Folds == 0 {
		return nil
	}
	header := []string{"components", "press", "press_share"}
	for f := 1; f <= cv.Folds; f++ {
		header = append(header, fmt.Sprintf("press_fold%d", f))
	}
	header = append(header, "smallest", "chosen")
	rows := [][]string{header}
	for a, v := range cv.PRESS {
		row := []string{strconv.Itoa(a), num(v), num(v / cv.SS)}
		for f := range cv.Folds {
			row = append(row, num(cv.FoldPRESS[f][a]))
		}
		rows = append(rows, append(row, strconv.FormatBool(a == cv.Min), strconv.FormatBool(a == cv.Count)))
	}
	return rows
}

// writeSamples writes samples.csv: per sample T², Q, leverage, the limits
// it passes (e.g. "t2-99 q-95"; empty when none), and its influence: the
// angle in degrees by which leaving it out turns the retained subspace,
// and the largest relative change of a retained eigenvalue, signed (both
// empty when influence was not computed).
func writeSamples(path string, res *analysis.Result) error {
	s := res.Samples
	header := []string{IDHeader(res.Table), "t2", "q", "leverage", "beyond", "influence_deg", "eigenvalue_change"}
	header = append(header, excludedColumns(res)...)
	inf := s.Influence
	n := len(res.Table.IDs)
	return streamCSV(path, header, samplesRowCount(res), func(i int, dst []string) []string {
		if i >= n {
			return excludedSampleRow(res, i-n, dst)
		}
		angle, change := "", ""
		if inf.Angle != nil {
			angle, change = num(inf.Angle[i]), num(largestChange(inf.EigenChange[i]))
		}
		dst = append(dst, res.Table.IDs[i], num(s.T2[i]), num(s.Q[i]), num(s.Leverage[i]), strings.Join(s.Beyond(i), " "), angle, change)
		return fittedScoreCells(res, i, dst)
	})
}

// largestChange returns the change of largest magnitude, with its sign.
func largestChange(c []float64) float64 {
	best := 0.0
	for _, x := range c {
		if math.Abs(x) > math.Abs(best) || math.IsNaN(x) {
			best = x
		}
	}
	return best
}

// Percentages returns each eigenvalue as a percentage of their sum.
func Percentages(eigenvalues []float64) []float64 {
	return analysis.PercentOfTotal(eigenvalues)
}

// LoadingsRows builds loadings.csv for the retained components.
func LoadingsRows(res *analysis.Result) [][]string {
	k := res.Retained
	header := []string{"variable"}
	for a := 0; a < k; a++ {
		header = append(header, componentName(a))
	}
	rows := [][]string{header}
	v := res.Decomp.Loadings
	for j, name := range res.Table.Variables {
		row := []string{name}
		for a := 0; a < k; a++ {
			row = append(row, num(v.At(j, a)))
		}
		rows = append(rows, row)
	}
	return rows
}

// IDHeader is the name of the id column in per-sample tables: the input's id
// column, or "row" when ids are data-row numbers.
func IDHeader(t *intake.Table) string {
	if t.IDColumn != "" {
		return t.IDColumn
	}
	return "row"
}

// writeScores writes scores.csv: one row per sample used, in input order.
func writeScores(path string, t *intake.Table, scores *mat.Dense) error {
	n, k := scores.Dims()
	header := []string{IDHeader(t)}
	for a := 0; a < k; a++ {
		header = append(header, componentName(a))
	}
	return streamCSV(path, header, n, func(i int, dst []string) []string {
		dst = append(dst, t.IDs[i])
		for a := 0; a < k; a++ {
			dst = append(dst, num(scores.At(i, a)))
		}
		return dst
	})
}

// StabilityRows builds stability.csv: per variable and retained component,
// the loading, its bootstrap mean and 95 % percentile interval, and whether
// the interval excludes zero. Nil when the bootstrap did not run.
func StabilityRows(res *analysis.Result) [][]string {
	st := res.Stability
	if st.Used == 0 {
		return nil
	}
	rows := [][]string{{"variable", "component", "loading", "boot_mean", "ci_low", "ci_high", "excludes_zero"}}
	v := res.Decomp.Loadings
	for j, name := range res.Table.Variables {
		for a := 0; a < res.Retained; a++ {
			li := st.Loadings[j][a]
			rows = append(rows, []string{name, componentName(a), num(v.At(j, a)), num(li.Mean), num(li.Low), num(li.High), strconv.FormatBool(li.ExcludesZero())})
		}
	}
	return rows
}
