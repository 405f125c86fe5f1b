package checks

import (
	"bytes"
	"slices"
	"strings"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/demo"
)

func demoResult(t *testing.T) (*analysis.Result, []Result) {
	t.Helper()
	tab, err := intake.ReadTableFrom("demo-data.csv", bytes.NewReader(demo.Survey()), intake.ReadOptions{IDColumn: demo.SampleID, GroupColumn: demo.Station})
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Analyze(tab, analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.DefaultComponentRule, Permutations: analysis.DefaultPermutations, Seed: analysis.DefaultSeed})
	if err != nil {
		t.Fatal(err)
	}
	return res, RunAll(Input{Run: res})
}

// The demo's planted truth (demo/demo.go) is recovered: three processes, and
// every planted anomaly beyond a 99 % limit of T² or Q.
func TestDemoPlantedTruthRecovered(t *testing.T) {
	res, results := demoResult(t)
	if res.Counts.Parallel.Count != demo.Processes || res.Retained != demo.Processes {
		t.Errorf("parallel analysis kept %d, retained %d; planted %d processes", res.Counts.Parallel.Count, res.Retained, demo.Processes)
	}
	t2, q := resultByID(t, results, "outliers-t2"), resultByID(t, results, "outliers-q")
	for _, id := range append(slices.Clone(demo.SpillSamples), demo.UnitMixUpSample) {
		i := slices.Index(res.Table.IDs, id)
		if i < 0 {
			t.Fatalf("planted sample %s not in the table", id)
		}
		beyond := strings.Join(res.Samples.Beyond(i), " ")
		if !strings.Contains(beyond, "t2-99") && !strings.Contains(beyond, "q-99") {
			t.Errorf("planted anomaly %s not beyond a 99 %% limit (%q)", id, beyond)
		}
		if !strings.Contains(t2.Message, id) && !strings.Contains(q.Message, id) {
			t.Errorf("planted anomaly %s not named by outliers-t2 or outliers-q", id)
		}
	}
	// The spill breaks the correlation structure: Q, specifically.
	for _, id := range demo.SpillSamples {
		if !strings.Contains(q.Message, id) {
			t.Errorf("spill sample %s not flagged by outliers-q", id)
		}
	}
}

func TestEveryCheckReportsAllFields(t *testing.T) {
	_, results := demoResult(t)
	var audit []Check
	for _, c := range Registry {
		if c.Mode == ModeAudit {
			audit = append(audit, c)
		}
	}
	if len(results) != len(audit) {
		t.Fatalf("%d results for %d audit checks", len(results), len(audit))
	}
	seen := map[string]bool{}
	for i, r := range results {
		if r.ID != audit[i].ID || seen[r.ID] {
			t.Errorf("result %d has id %q", i, r.ID)
		}
		seen[r.ID] = true
		if r.Title == "" || r.Message == "" || r.Source == "" {
			t.Errorf("%s: empty title, message or source: %+v", r.ID, r)
		}
		switch r.Status {
		case Pass, Warn, Fail:
			if r.Value == nil || r.Limit == nil {
				t.Errorf("%s: no value or limit", r.ID)
			}
		case Skip:
		default:
			t.Errorf("%s: status %q", r.ID, r.Status)
		}
	}
}
