package report

import (
	"encoding/csv"
	"fmt"
	"os"
	"strconv"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis"
)

// num formats a number for the CSV tables and JSON: the shortest decimal
// that reads back as the same float64, so tables are exact and diff-friendly.
func num(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// componentName is the label of the a-th component (0-based).
func componentName(a int) string { return fmt.Sprintf("PC%d", a+1) }

// writeCSV writes rows to path as RFC 4180 CSV (fields with commas, quotes or
// newlines are quoted, so ids survive a round trip).
func writeCSV(path string, rows [][]string) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := csv.NewWriter(f)
	if err := w.WriteAll(rows); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// VarianceRows builds variance.csv: one row per component (all m of them).
func VarianceRows(res *analysis.Result) [][]string {
	d := res.Decomp
	pct := Percentages(d.Eigenvalues)
	rows := [][]string{{"component", "eigenvalue", "percent", "cumulative_percent"}}
	cum := 0.0
	for a, l := range d.Eigenvalues {
		cum += pct[a]
		rows = append(rows, []string{componentName(a), num(l), num(pct[a]), num(cum)})
	}
	return rows
}

// Percentages returns each eigenvalue as a percentage of their sum.
func Percentages(eigenvalues []float64) []float64 {
	total := 0.0
	for _, l := range eigenvalues {
		total += l
	}
	out := make([]float64, len(eigenvalues))
	for a, l := range eigenvalues {
		out[a] = 100 * l / total
	}
	return out
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
func IDHeader(t *analysis.Table) string {
	if t.IDColumn != "" {
		return t.IDColumn
	}
	return "row"
}

// ScoresRows builds scores.csv: one row per sample used, in input order.
func ScoresRows(t *analysis.Table, scores *mat.Dense) [][]string {
	n, k := scores.Dims()
	header := []string{IDHeader(t)}
	for a := 0; a < k; a++ {
		header = append(header, componentName(a))
	}
	rows := make([][]string, 0, n+1)
	rows = append(rows, header)
	for i := 0; i < n; i++ {
		row := make([]string, 0, k+1)
		row = append(row, t.IDs[i])
		for a := 0; a < k; a++ {
			row = append(row, num(scores.At(i, a)))
		}
		rows = append(rows, row)
	}
	return rows
}
