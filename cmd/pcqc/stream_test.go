package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"testing"
)

// Every bad table that run refuses while reading is refused by run --stream
// with the same one line and exit status 2, and no output folder.
func TestStreamBadInputsMatchInMemory(t *testing.T) {
	wants, _ := filepath.Glob("../../testdata/bad/*.want")
	compared := 0
	for _, want := range wants {
		spec, _ := os.ReadFile(want)
		name := strings.TrimSuffix(filepath.Base(want), ".want")
		data := strings.TrimSuffix(want, ".want") + ".csv"
		if _, err := os.Stat(data); err != nil || strings.Contains(string(spec), "generate:") ||
			strings.Contains(string(spec), "apply:") || strings.Contains(string(spec), "review:") ||
			strings.Contains(string(spec), "exit: ok") || strings.Contains(string(spec), "exclude") {
			continue
		}
		var extra []string
		for _, line := range strings.Split(string(spec), "\n") {
			if strings.HasPrefix(line, "args: ") {
				extra = strings.Fields(strings.TrimPrefix(line, "args: "))
			}
		}
		t.Run(name, func(t *testing.T) {
			dir := t.TempDir()
			run := func(flags ...string) (int, string, bool) {
				out := filepath.Join(dir, "out")
				var stdout, stderr bytes.Buffer
				args := append([]string{"run", data, "--out", out, "--format", "none", "--bootstrap", "0", "--permutations", "0"}, extra...)
				status := mainWithArgs(append(args, flags...), &stdout, &stderr)
				_, err := os.Stat(out)
				return status, stderr.String(), err == nil
			}
			memStatus, memErr, _ := run()
			if memStatus != exitUsage {
				t.Skipf("in memory: status %d", memStatus)
			}
			status, msg, wrote := run("--stream")
			if status != exitUsage || wrote || strings.Count(msg, "\n") != 1 || strings.Contains(msg, "panic:") {
				t.Fatalf("--stream: status %d, output written %v, stderr %q", status, wrote, msg)
			}
			// Checks made on the whole matrix after reading (overflow of
			// the preprocessed values) are worded for the matrix; the rest
			// must match word for word.
			if msg != memErr && !strings.Contains(memErr, "double precision") && !strings.Contains(memErr, "every value of this column is missing") {
				t.Errorf("--stream: %s in memory: %s", msg, memErr)
			}
			compared++
		})
	}
	if compared < 20 {
		t.Errorf("only %d bad tables compared", compared)
	}
}

// run --stream writes samples.csv with one row per sample, the tables,
// summary.json marked as streamed, and a report that says what was left
// out; what cannot stream is refused.
func TestStreamRunWritesOutputs(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	var stdout, stderr bytes.Buffer
	status := mainWithArgs([]string{"run", "../../testdata/datasets/wine.csv", "--group", "cultivar", "--stream", "--out", out,
		"--bootstrap", "50", "--permutations", "200"}, &stdout, &stderr)
	if status != exitOK {
		t.Fatalf("status %d: %s", status, stderr.String())
	}
	f, err := os.Open(filepath.Join(out, "samples.csv"))
	if err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(f).ReadAll()
	f.Close()
	if err != nil || len(rows) != 179 || rows[0][1] != "t2" {
		t.Fatalf("samples.csv: %d rows (%v), header %v", len(rows), err, rows[0])
	}
	var sum map[string]any
	raw, _ := os.ReadFile(filepath.Join(out, "summary.json"))
	if err := json.Unmarshal(raw, &sum); err != nil || sum["mode"] != "stream" || sum["rows"].(float64) != 178 {
		t.Fatalf("summary.json: %v %v", err, sum)
	}
	md, _ := os.ReadFile(filepath.Join(out, "report.md"))
	for _, want := range []string{"streamed", "reservoir", "Poisson", "Left out", "cross-validation", "figures/stream-scores.png",
		"Chan, T. F., Golub, G. H. & LeVeque", "Vitter, J. S. (1985)", "expert judgement", "accredited practice", "Hanley, J. A. & MacGibbon", "Horn, J. L. (1965)"} {
		if !strings.Contains(string(md), want) {
			t.Errorf("report.md does not mention %q", want)
		}
	}
	// The default formats: the same report as PDF and HTML, the score plot
	// drawn in each (PNG in the PDF, inline SVG in the HTML).
	pdf, err := os.ReadFile(filepath.Join(out, "report.pdf"))
	if err != nil || !bytes.HasPrefix(pdf, []byte("%PDF-")) || !bytes.Contains(pdf, []byte("/Subtype /Image")) {
		t.Errorf("report.pdf: %v, %d bytes, an image: %v", err, len(pdf), bytes.Contains(pdf, []byte("/Subtype /Image")))
	}
	page, err := os.ReadFile(filepath.Join(out, "report.html"))
	if err != nil || !bytes.Contains(page, []byte(`<svg class="figure"`)) || !bytes.Contains(page, []byte("Streamed audit")) {
		t.Errorf("report.html: %v, %d bytes", err, len(page))
	}

	fifo := filepath.Join(dir, "pipe.csv")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Fatal(err)
	}
	var header, row strings.Builder
	for j := 0; j <= 2000; j++ {
		fmt.Fprintf(&header, "v%d,", j)
		fmt.Fprintf(&row, "%d,", j%7)
	}
	wide := filepath.Join(dir, "wide.csv")
	text := strings.TrimSuffix(header.String(), ",") + "\n"
	for i := 0; i < 4; i++ {
		text += strings.TrimSuffix(row.String(), ",") + "\n"
	}
	if err := os.WriteFile(wide, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	refusals := []struct {
		name string
		args []string
		want string
	}{
		{"exclude", []string{"../../testdata/datasets/usarrests.csv", "--exclude", "Ohio"}, "--exclude"},
		{"cv", []string{"../../testdata/datasets/usarrests.csv", "--components", "cv"}, "--components cv"},
		{"fifo", []string{fifo}, "regular file"},
		{"wide", []string{wide}, "tall tables"},
	}
	for _, tc := range refusals {
		t.Run(tc.name, func(t *testing.T) {
			var stdout, stderr bytes.Buffer
			target := filepath.Join(dir, "refused-"+tc.name)
			status := mainWithArgs(append(append([]string{"run"}, tc.args...), "--stream", "--out", target), &stdout, &stderr)
			if _, err := os.Stat(target); status != exitUsage || err == nil {
				t.Fatalf("status %d, output exists %v", status, err == nil)
			}
			if msg := stderr.String(); !strings.Contains(msg, tc.want) || strings.Count(msg, "\n") != 1 {
				t.Errorf("stderr %q, want one line naming %q", msg, tc.want)
			}
		})
	}
}

// A units row read in stream mode labels the variables in summary.json and
// the report, as in an ordinary run.
func TestStreamShowsUnits(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "units.csv")
	text := "id,a,b,c\n,mg/L,[°C],\n"
	for i := 0; i < 12; i++ {
		text += fmt.Sprintf("r%d,%d,%d,%d\n", i, i%5+i/3, (i*7)%11, (i*i)%13)
	}
	if err := os.WriteFile(in, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	var stdout, stderr bytes.Buffer
	if status := mainWithArgs([]string{"run", in, "--stream", "--units-row", "--format", "md", "--out", out, "--bootstrap", "0", "--permutations", "50"}, &stdout, &stderr); status != exitOK {
		t.Fatalf("status %d: %s", status, stderr.String())
	}
	var sum struct{ Units []string }
	raw, _ := os.ReadFile(filepath.Join(out, "summary.json"))
	if err := json.Unmarshal(raw, &sum); err != nil || !slices.Equal(sum.Units, []string{"mg/L", "[°C]", ""}) {
		t.Errorf("summary.json units %q (%v)", sum.Units, err)
	}
	md, _ := os.ReadFile(filepath.Join(out, "report.md"))
	if !strings.Contains(string(md), "a \\[mg/L\\], b \\[°C\\], c") && !strings.Contains(string(md), "a [mg/L], b [°C], c") {
		t.Errorf("report.md does not label the variables with their units:\n%s", md)
	}
}
