package main

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// edgeTable writes n rows of f(i, j) for p variables.
func edgeTable(t *testing.T, dir, name string, n, p int, f func(i, j int) float64) string {
	t.Helper()
	var b strings.Builder
	b.WriteString("id")
	for j := 0; j < p; j++ {
		fmt.Fprintf(&b, ",x%d", j+1)
	}
	b.WriteString("\n")
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "s%d", i+1)
		for j := 0; j < p; j++ {
			fmt.Fprintf(&b, ",%s", strconvG(f(i, j)))
		}
		b.WriteString("\n")
	}
	return writeFile(t, dir, name, b.String())
}

func strconvG(x float64) string { return fmt.Sprintf("%.17g", x) }

var notFinite = regexp.MustCompile(`(?i)\b(nan|[+-]?inf(inity)?)\b`)

// Numerical edge cases give a correct result or a clear error, and never a
// NaN or infinity in any output.
func TestNumericalEdgeCases(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	noise := make([][]float64, 200)
	for i := range noise {
		noise[i] = make([]float64, 6)
		for j := range noise[i] {
			noise[i][j] = rng.NormFloat64()
		}
	}
	cases := []struct {
		name string
		n, p int
		f    func(i, j int) float64
		args []string
		fail string // the expected error, when the case must be refused
	}{
		{"collinear", 200, 5, func(i, j int) float64 {
			if j == 4 {
				return noise[i][0] + noise[i][1] // an exact sum of two others
			}
			return noise[i][j]
		}, nil, ""},
		{"rank one", 120, 6, func(i, j int) float64 { return float64(j+1) * noise[i][0] }, nil, ""},
		{"three samples", 3, 4, func(i, j int) float64 { return noise[i][j] + float64(i*j) }, nil, ""},
		{"huge values", 150, 5, func(i, j int) float64 { return 1e150 * (3 + noise[i][j]) }, nil, ""},
		{"tiny values", 150, 5, func(i, j int) float64 { return 1e-150 * (3 + noise[i][j]) }, nil, ""},
		{"huge values unscaled", 150, 5, func(i, j int) float64 { return 1e150 * (3 + noise[i][j]) }, []string{"--scale", "none"}, "leave the range of double precision"},
		{"near the largest double, Pareto", 30, 5, func(i, j int) float64 { return 1e306 * (3 + noise[i][j]) }, []string{"--scale", "pareto"}, "leave the range of double precision"},
		{"sums beyond the largest double", 150, 5, func(i, j int) float64 { return 1e308 * (1 + 0.1*noise[i][j]) }, nil, "overflow double precision when the column's mean"},
		{"one huge outlier", 200, 5, func(i, j int) float64 {
			if i == 17 && j == 2 {
				return 1e12
			}
			return noise[i][j]
		}, nil, ""},
		{"all rows identical but one", 100, 4, func(i, j int) float64 {
			if i == 42 {
				return float64(j) + 2
			}
			return float64(j)
		}, nil, ""},
		{"more variables than samples", 12, 60, func(i, j int) float64 { return noise[(i*7+j)%200][j%6] }, nil, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			data := edgeTable(t, dir, "data.csv", c.n, c.p, c.f)
			out := filepath.Join(dir, "out")
			args := append([]string{"run", data, "--out", out, "--bootstrap", "30", "--permutations", "30", "--format", "html"}, c.args...)
			status, _, stderr := runPCQC(t, args...)
			if c.fail != "" {
				if status != exitUsage || !strings.Contains(stderr, c.fail) {
					t.Errorf("status %d, stderr %q; want a clear error %q", status, stderr, c.fail)
				}
				return
			}
			if status != exitOK && status != exitChecks {
				t.Fatalf("status %d: %s", status, stderr)
			}
			var summary map[string]any
			b, _ := os.ReadFile(filepath.Join(out, "summary.json"))
			if err := json.Unmarshal(b, &summary); err != nil {
				t.Fatalf("summary.json: %v", err)
			}
			for _, name := range []string{"summary.json", "report.html", "variance.csv", "loadings.csv", "scores.csv", "samples.csv"} {
				content, err := os.ReadFile(filepath.Join(out, name))
				if err != nil {
					t.Fatalf("%s: %v", name, err)
				}
				// Sample and variable names here hold no such words.
				if m := notFinite.Find(content); m != nil {
					t.Errorf("%s contains %q", name, m)
				}
			}
			for _, e := range summary["components"].(map[string]any)["eigenvalues"].([]any) {
				if v := e.(float64); v < 0 || math.IsNaN(v) {
					t.Errorf("eigenvalue %v", v)
				}
			}
		})
	}
}
