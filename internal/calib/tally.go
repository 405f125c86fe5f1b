package calib

import (
	"fmt"
	"io"
	"slices"
	"sort"
	"strings"

	"pcqc/checks"
)

// Summary is the tally of a run.
type Summary struct {
	Clean      int            // clean tables audited
	Pass       int            // of them, verdict pass
	RetainedK  int            // of them, retained count = planted k
	Alarms     map[string]int // check id → clean tables where it warned or failed
	Errors     []string       // tables the analysis refused
	Cells      []CellTally    // per cell of the grid, in first-seen order
	DefectRuns []DefectTally  // per defect, in the order of Defects
}

// CellTally is the clean-table breakdown of one grid cell.
type CellTally struct {
	Cell      Cell
	Tables    int
	Pass      int
	RetainedK int
	Retained  map[int]int    // retained count → tables
	Alarms    map[string]int // check id → tables where it alarmed
}

// DefectTally is the detection record of one defect.
type DefectTally struct {
	Defect   Defect
	Checks   []string
	Tables   int
	Detected int            // an expected check warned or failed
	Named    int            // and named every planted sample or variable
	Fired    map[string]int // expected check id → tables where it fired
}

// Tally counts the outcomes.
func Tally(outs []Outcome) Summary {
	s := Summary{Alarms: map[string]int{}}
	cellAt := map[Cell]int{}
	defects := map[Defect]*DefectTally{}
	for _, d := range Defects {
		defects[d] = &DefectTally{Defect: d, Checks: ExpectedChecks(d), Fired: map[string]int{}}
	}
	for _, o := range outs {
		if o.Err != "" {
			s.Errors = append(s.Errors, fmt.Sprintf("%s %v: %s", o.Defect, o.Cell, o.Err))
		}
		if o.Defect == Clean {
			i, ok := cellAt[o.Cell]
			if !ok {
				i = len(s.Cells)
				cellAt[o.Cell] = i
				s.Cells = append(s.Cells, CellTally{Cell: o.Cell, Retained: map[int]int{}, Alarms: map[string]int{}})
			}
			ct := &s.Cells[i]
			s.Clean++
			ct.Tables++
			if o.Verdict == checks.Pass {
				s.Pass++
				ct.Pass++
			}
			if o.Retained == o.Cell.K && !o.NoStructure {
				s.RetainedK++
				ct.RetainedK++
			}
			ct.Retained[o.Retained]++
			for id := range o.Status {
				if o.Alarm(id) {
					s.Alarms[id]++
					ct.Alarms[id]++
				}
			}
			continue
		}
		dt := defects[o.Defect]
		dt.Tables++
		detected, named := false, false
		for _, id := range dt.Checks {
			if o.Alarm(id) {
				detected = true
				dt.Fired[id]++
				if o.Names(id) {
					named = true
				}
			}
		}
		if detected {
			dt.Detected++
		}
		if named {
			dt.Named++
		}
	}
	for _, d := range Defects {
		if defects[d].Tables > 0 {
			s.DefectRuns = append(s.DefectRuns, *defects[d])
		}
	}
	return s
}

func rate(k, n int) float64 {
	if n == 0 {
		return 0
	}
	return float64(k) / float64(n)
}

func pct(k, n int) string { return fmt.Sprintf("%5.1f %%", 100*rate(k, n)) }

// sortedIDs returns the map's keys in order.
func sortedIDs(m map[string]int) []string {
	ids := make([]string, 0, len(m))
	for id := range m {
		ids = append(ids, id)
	}
	sort.Strings(ids)
	return ids
}

// Write prints the summary as plain text: the headline rates, per-check
// false alarms, per-defect detection, and the grid cells that missed.
func (s Summary) Write(w io.Writer) {
	fmt.Fprintf(w, "Clean tables: %d\n", s.Clean)
	fmt.Fprintf(w, "  verdict pass            %s  (%d/%d; target ≥ 95 %%)\n", pct(s.Pass, s.Clean), s.Pass, s.Clean)
	fmt.Fprintf(w, "  retained = planted k    %s  (%d/%d; target ≥ 95 %%)\n", pct(s.RetainedK, s.Clean), s.RetainedK, s.Clean)
	fmt.Fprintf(w, "\nFalse alarms on clean tables (warn or fail; target ≤ 2 %% each):\n")
	if len(s.Alarms) == 0 {
		fmt.Fprintf(w, "  none\n")
	}
	for _, id := range sortedIDs(s.Alarms) {
		fmt.Fprintf(w, "  %-24s %s  (%d/%d)\n", id, pct(s.Alarms[id], s.Clean), s.Alarms[id], s.Clean)
	}
	fmt.Fprintf(w, "\nPlanted defects (target: caught and named on ≥ 95 %% of seeds):\n")
	fmt.Fprintf(w, "  %-18s %-42s %6s %9s %9s  %s\n", "defect", "expected checks", "tables", "detected", "named", "fired")
	for _, d := range s.DefectRuns {
		var fired []string
		for _, id := range d.Checks {
			fired = append(fired, fmt.Sprintf("%s %d", id, d.Fired[id]))
		}
		fmt.Fprintf(w, "  %-18s %-42s %6d %9s %9s  %s\n", d.Defect, strings.Join(d.Checks, " | "), d.Tables,
			pct(d.Detected, d.Tables), pct(d.Named, d.Tables), strings.Join(fired, ", "))
	}
	fmt.Fprintf(w, "\nClean cells with a non-pass verdict or a wrong count:\n")
	shown := 0
	for _, c := range s.Cells {
		if c.Pass == c.Tables && c.RetainedK == c.Tables {
			continue
		}
		shown++
		var alarms []string
		for _, id := range sortedIDs(c.Alarms) {
			alarms = append(alarms, fmt.Sprintf("%s %d", id, c.Alarms[id]))
		}
		var counts []string
		keys := make([]int, 0, len(c.Retained))
		for k := range c.Retained {
			keys = append(keys, k)
		}
		slices.Sort(keys)
		for _, k := range keys {
			counts = append(counts, fmt.Sprintf("%d×%d", c.Retained[k], k))
		}
		fmt.Fprintf(w, "  %-26s pass %d/%d, k ok %d/%d (retained %s); alarms: %s\n", c.Cell, c.Pass, c.Tables,
			c.RetainedK, c.Tables, strings.Join(counts, " "), strings.Join(alarms, ", "))
	}
	if shown == 0 {
		fmt.Fprintf(w, "  none\n")
	}
	for _, e := range s.Errors {
		fmt.Fprintf(w, "ERROR: %s\n", e)
	}
}

// Bounds are the rates a run must reach.
type Bounds struct {
	MinPass      float64            // verdict pass on clean tables
	MinRetainedK float64            // retained = planted k on clean tables
	MaxAlarm     map[string]float64 // per check; others get DefaultMaxAlarm
	// DefaultMaxAlarm bounds any check not in MaxAlarm, so a new check that
	// alarms on clean data fails the run.
	DefaultMaxAlarm float64
	MinDetected     float64 // per defect
	MinNamed        float64 // per defect with planted culprits
}

// Violations lists every bound the summary misses; none means it holds.
func (s Summary) Violations(b Bounds) []string {
	var v []string
	if len(s.Errors) > 0 {
		v = append(v, fmt.Sprintf("%d tables refused: %s", len(s.Errors), s.Errors[0]))
	}
	if s.Clean > 0 {
		if r := rate(s.Pass, s.Clean); r < b.MinPass {
			v = append(v, fmt.Sprintf("verdict pass on %.3f of clean tables, below %.3f", r, b.MinPass))
		}
		if r := rate(s.RetainedK, s.Clean); r < b.MinRetainedK {
			v = append(v, fmt.Sprintf("retained = planted k on %.3f of clean tables, below %.3f", r, b.MinRetainedK))
		}
		for _, id := range sortedIDs(s.Alarms) {
			limit, ok := b.MaxAlarm[id]
			if !ok {
				limit = b.DefaultMaxAlarm
			}
			if r := rate(s.Alarms[id], s.Clean); r > limit {
				v = append(v, fmt.Sprintf("%s alarms on %.3f of clean tables, above %.3f", id, r, limit))
			}
		}
	}
	for _, d := range s.DefectRuns {
		if r := rate(d.Detected, d.Tables); r < b.MinDetected {
			v = append(v, fmt.Sprintf("%s caught by %s on %.3f of tables, below %.3f", d.Defect, strings.Join(d.Checks, "/"), r, b.MinDetected))
		}
		if r := rate(d.Named, d.Tables); r < b.MinNamed {
			v = append(v, fmt.Sprintf("%s named by %s on %.3f of tables, below %.3f", d.Defect, strings.Join(d.Checks, "/"), r, b.MinNamed))
		}
	}
	return v
}

// Targets are the targets for the full harness.
var Targets = Bounds{MinPass: 0.95, MinRetainedK: 0.95, DefaultMaxAlarm: 0.02, MinDetected: 0.95, MinNamed: 0.95}
