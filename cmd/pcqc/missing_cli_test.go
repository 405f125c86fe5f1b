package main

import (
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// run on USArrests with three cells blanked: --missing drop lists the
// dropped states by id and line in summary.json and the report;
// --missing mean (with one gappy state excluded from the fit) lists every
// imputed cell with the mean of the observed values, computed here from
// the file.
func TestRunListsMissingCells(t *testing.T) {
	dir := t.TempDir()
	raw := readCSV(t, filepath.Join("..", "..", "testdata", "datasets", "usarrests.csv"))
	blank := map[[2]int]bool{{2, 1}: true, {10, 3}: true, {10, 4}: true, {31, 2}: true} // Alaska Murder; Georgia UrbanPop, Rape; New Mexico Assault
	var b strings.Builder
	for i, row := range raw {
		for j, c := range row {
			if j > 0 {
				b.WriteByte(',')
			}
			if !blank[[2]int{i, j}] {
				b.WriteString(c)
			}
		}
		b.WriteByte('\n')
	}
	data := filepath.Join(dir, "gappy.csv")
	if err := os.WriteFile(data, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	type summary struct {
		Missing struct {
			Dropped []struct {
				ID   string `json:"id"`
				Line int    `json:"line"`
			} `json:"dropped_samples"`
			Imputed []struct {
				ID       string  `json:"id"`
				Variable string  `json:"variable"`
				Line     int     `json:"line"`
				Column   int     `json:"column"`
				Value    float64 `json:"value"`
			} `json:"imputed_cells"`
		} `json:"missing"`
	}
	common := []string{"--components", "2", "--bootstrap", "0", "--permutations", "20", "--format", shortFormat()}

	out := filepath.Join(dir, "drop")
	if status, _, stderr := runPCQC(t, append([]string{"run", data, "--missing", "drop", "--out", out}, common...)...); status != exitOK {
		t.Fatalf("drop: status %d: %s", status, stderr)
	}
	s := readSummaryFile[summary](t, out)
	var got []string
	for _, d := range s.Missing.Dropped {
		got = append(got, d.ID+":"+strconv.Itoa(d.Line))
	}
	if strings.Join(got, " ") != "Alaska:3 Georgia:11 New Mexico:32" {
		t.Errorf("dropped %v", got)
	}
	if md, _ := os.ReadFile(filepath.Join(out, "report.md")); !testing.Short() &&
		(!strings.Contains(string(md), "3 samples dropped for missing cells (--missing drop), worst first:") || !strings.Contains(string(md), "| New Mexico | 32 | 1 |")) {
		t.Errorf("report.md does not list the dropped samples")
	}

	out = filepath.Join(dir, "mean")
	if status, _, stderr := runPCQC(t, append([]string{"run", data, "--missing", "mean", "--exclude", "Georgia", "--out", out}, common...)...); status != exitOK {
		t.Fatalf("mean: status %d: %s", status, stderr)
	}
	s = readSummaryFile[summary](t, out)
	mean := func(j int) float64 {
		sum, n := 0.0, 0
		for i, row := range raw[1:] {
			if !blank[[2]int{i + 1, j}] {
				v, _ := strconv.ParseFloat(row[j], 64)
				sum += v
				n++
			}
		}
		return sum / float64(n)
	}
	want := []struct {
		id   string
		line int
		col  int
	}{{"Alaska", 3, 2}, {"Georgia", 11, 4}, {"Georgia", 11, 5}, {"New Mexico", 32, 3}}
	if len(s.Missing.Imputed) != len(want) {
		t.Fatalf("imputed %+v", s.Missing.Imputed)
	}
	for i, w := range want {
		c := s.Missing.Imputed[i]
		if c.ID != w.id || c.Line != w.line || c.Column != w.col || c.Variable != raw[0][w.col-1] || math.Abs(c.Value-mean(w.col-1)) > 1e-9*mean(w.col-1) {
			t.Errorf("cell %d: %+v, want %+v with the column mean %g", i, c, w, mean(w.col-1))
		}
	}
}
