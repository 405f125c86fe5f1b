package calib

import (
	"fmt"
	"regexp"
	"sync"

	"pcqc/analysis"
	"pcqc/checks"
)

// Expectation says which checks must catch a defect: detected when any of
// them warns or fails, named when one that fired names every planted
// sample or variable. Update Checks here when check ids change at a merge;
// Fired in the tally records which of them actually fired.
type Expectation struct {
	Defect Defect
	Checks []string
}

// Expectations maps each defect to the checks that must catch it.
var Expectations = []Expectation{
	{OffModel, []string{"outliers-q"}},
	{AlongModel, []string{"outliers-t2"}},
	{NoStructure, []string{"component-count", "sphericity"}},
	{SkewedVariable, []string{"skewness"}},
	{MixedUnits, []string{"scaling"}},
	// Whichever reports axis mixing after the stability rework.
	{EqualEigenvalues, []string{"eigenvalue-separation", "loading-stability"}},
	{DuplicateRows, []string{"duplicate-rows"}},
	// influence replaces leverage; dominance names a sample that holds a
	// retained component.
	{LoneComponent, []string{"influence", "dominance"}},
}

// ExpectedChecks returns the checks that must catch d.
func ExpectedChecks(d Defect) []string {
	for _, e := range Expectations {
		if e.Defect == d {
			return e.Checks
		}
	}
	return nil
}

// Settings are the resampling sizes of a run. Zero values mean the
// defaults `pcqc run` uses.
type Settings struct {
	Permutations int
	Bootstrap    int
}

// Outcome is the audit of one case.
type Outcome struct {
	Index       int
	Cell        Cell
	Defect      Defect
	Planted     []string
	Status      map[string]checks.Status
	Message     map[string]string
	Verdict     checks.Status
	Retained    int
	NoStructure bool
	Err         string // the analysis refused the table (never expected)
}

// Alarm reports whether the check warned or failed.
func (o Outcome) Alarm(id string) bool {
	s := o.Status[id]
	return s == checks.Warn || s == checks.Fail
}

// Names reports whether the message of check id names every planted
// sample or variable, as a whole word.
func (o Outcome) Names(id string) bool {
	msg := o.Message[id]
	for _, name := range o.Planted {
		if !regexp.MustCompile(`(^|[^\pL\pN_])` + regexp.QuoteMeta(name) + `($|[^\pL\pN_])`).MatchString(msg) {
			return false
		}
	}
	return true
}

// Audit runs the full default audit on the case in-process, as `pcqc run`
// does apart from reading and writing files: unit scaling (or the case's
// own), the default component rule, permutations, bootstrap, the case's
// seed, then every check and the verdict.
func Audit(c Case, s Settings, threads int) Outcome {
	opt := analysis.Options{
		Scaling:      c.Scaling,
		Components:   analysis.DefaultComponentRule,
		Permutations: analysis.DefaultPermutations,
		Bootstrap:    analysis.DefaultBootstrap,
		Seed:         c.Seed,
		Threads:      threads,
		InPlace:      true,
	}
	if s.Permutations > 0 {
		opt.Permutations = s.Permutations
	}
	if s.Bootstrap > 0 {
		opt.Bootstrap = s.Bootstrap
	}
	o := Outcome{Index: c.Index, Cell: c.Cell, Defect: c.Defect, Planted: c.Planted,
		Status: map[string]checks.Status{}, Message: map[string]string{}}
	res, err := analysis.Analyze(c.Table, opt)
	if err != nil {
		o.Err = err.Error()
		o.Verdict = checks.Fail
		return o
	}
	results := checks.RunAll(checks.Input{Run: res})
	for _, r := range results {
		o.Status[r.ID] = r.Status
		o.Message[r.ID] = r.Message
	}
	o.Verdict = checks.Verdict(results)
	o.Retained, o.NoStructure = res.Retained, res.NoStructure
	return o
}

// Spec describes one table to simulate and audit.
type Spec struct {
	Cell   Cell
	Defect Defect
}

// Plan returns the specs of a run: perCell clean tables of every cell, then
// perDefect tables of every defect.
func Plan(cells []Cell, perCell, perDefect int) []Spec {
	var specs []Spec
	for r := range perCell {
		_ = r
		for _, c := range cells {
			specs = append(specs, Spec{c, Clean})
		}
	}
	for i := range perDefect {
		for _, d := range Defects {
			specs = append(specs, Spec{DefectCell(i), d})
		}
	}
	return specs
}

// Run simulates and audits every spec with a pool of workers, each audit
// single-threaded. Table i depends only on seed and i, so the outcomes do
// not depend on the number of workers. done, when set, is called after
// each table (from the workers, serialised).
func Run(specs []Spec, seed uint64, s Settings, workers int, done func(Outcome)) []Outcome {
	out := make([]Outcome, len(specs))
	jobs := make(chan int)
	var wg sync.WaitGroup
	var mu sync.Mutex
	for range max(1, workers) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range jobs {
				sp := specs[i]
				var o Outcome
				if c, err := NewCase(seed, i, sp.Cell, sp.Defect); err != nil {
					o = Outcome{Index: i, Cell: sp.Cell, Defect: sp.Defect, Err: err.Error(), Verdict: checks.Fail}
				} else {
					o = Audit(c, s, 1)
				}
				out[i] = o
				if done != nil {
					mu.Lock()
					done(o)
					mu.Unlock()
				}
			}
		}()
	}
	for i := range specs {
		jobs <- i
	}
	close(jobs)
	wg.Wait()
	return out
}

// describe is a one-line account of an outcome, for progress output.
func (o Outcome) describe() string {
	return fmt.Sprintf("#%d %s %v: verdict %s, retained %d", o.Index, o.Defect, o.Cell, o.Verdict, o.Retained)
}
