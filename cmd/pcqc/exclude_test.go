package main

import (
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"pcqc/analysis"
)

// run --exclude and --exclude-file together: the fit uses the other 47
// states; samples.csv lists the three excluded states after them, marked,
// with scores that are the model's projection of their rows (the
// training means and scales and the loadings model.json records, applied
// here by hand); summary.json, the report and its methods name them.
func TestRunExcludesSamples(t *testing.T) {
	dir := t.TempDir()
	list := filepath.Join(dir, "leave-out.txt")
	if err := os.WriteFile(list, []byte("# two states\nFlorida\n\nVermont\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	data := filepath.Join("..", "..", "testdata", "datasets", "usarrests.csv")
	status, stdout, stderr := runPCQC(t, "run", data, "--exclude", "Alaska", "--exclude-file", list, "--components", "2",
		"--bootstrap", "20", "--permutations", "20", "--format", shortFormat(), "--out", out)
	if status != exitOK {
		t.Fatalf("status %d: %s", status, stderr)
	}
	if !strings.Contains(stdout, "47 samples (3 excluded)") {
		t.Errorf("stdout does not report the 47 fitted samples: %q", stdout)
	}
	m := readSummaryFile[struct {
		Input struct {
			Rows int `json:"rows"`
		} `json:"input"`
		Options struct {
			Exclude []string `json:"exclude"`
		} `json:"options"`
		Excluded struct {
			Samples []struct {
				ID     string    `json:"id"`
				Scores []float64 `json:"scores"`
			} `json:"samples"`
		} `json:"excluded"`
	}](t, out)
	if m.Input.Rows != 47 || strings.Join(m.Options.Exclude, ",") != "Alaska,Florida,Vermont" || len(m.Excluded.Samples) != 3 ||
		m.Excluded.Samples[0].ID != "Alaska" || m.Excluded.Samples[2].ID != "Vermont" {
		t.Errorf("summary.json: %+v", m)
	}

	model, err := analysis.LoadModel(filepath.Join(out, "model.json"))
	if err != nil {
		t.Fatal(err)
	}
	raw := readCSV(t, data)
	samples := readCSV(t, filepath.Join(out, "samples.csv"))
	if len(samples) != 51 || samples[0][7] != "excluded" || samples[0][8] != "PC1" || samples[0][9] != "PC2" {
		t.Fatalf("samples.csv has %d rows, header %v", len(samples), samples[0])
	}
	for _, row := range samples[1:] {
		excluded := row[0] == "Alaska" || row[0] == "Florida" || row[0] == "Vermont"
		if row[7] != strconv.FormatBool(excluded) {
			t.Errorf("%s: excluded %q", row[0], row[7])
		}
		if !excluded {
			continue
		}
		var x []string
		for _, r := range raw {
			if r[0] == row[0] {
				x = r[1:]
			}
		}
		for a := 0; a < 2; a++ {
			want := 0.0
			for j, s := range x {
				v, _ := strconv.ParseFloat(s, 64)
				want += (v - model.Means[j]) / model.Scales[j] * model.Loadings[j][a]
			}
			got, _ := strconv.ParseFloat(row[8+a], 64)
			if math.Abs(got-want) > 1e-10*math.Max(1, math.Abs(want)) {
				t.Errorf("%s PC%d: samples.csv %v, projection %v", row[0], a+1, got, want)
			}
		}
	}
	if testing.Short() {
		return
	}
	md, err := os.ReadFile(filepath.Join(out, "report.md"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"## Excluded samples", "3 samples were excluded from the fit (Alaska, Florida and Vermont)", "| Vermont |"} {
		if !strings.Contains(string(md), want) {
			t.Errorf("report.md lacks %q", want)
		}
	}
}
