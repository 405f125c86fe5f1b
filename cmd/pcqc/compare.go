package main

import (
	"flag"
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"time"

	"pcqc/analysis"
	"pcqc/checks"
	"pcqc/outdir"
	"pcqc/report"
)

var compareCommand = &command{
	name:    "compare",
	summary: "compare two audits: components, subspaces and check statuses",
	usage:   "pcqc compare AUDIT_A AUDIT_B [--out DIR] [--format LIST] [--fail-on LEVEL] [flags]",
	help: `Compare reads two audit folders written by pcqc run or demo (their
model.json and summary.json): for example the same table with and without
excluded samples, two batches, two labs, or this year and last.

Variables are matched by name; those in one audit only are listed, and the
components are compared over the common ones. Every retained component of A
is compared with every one of B by Tucker's congruence, and the components
are paired to maximise the total |congruence| (the Hungarian method, not one
pair at a time). For each pair the report gives the congruence, the
eigenvalue and percentage differences with both audits' bootstrap intervals
where they have them, and the variables whose loadings differ most (B's
signs aligned to A's). It gives the principal angles between the retained
subspaces, and every check's status in both audits, marking those that
changed.

Checks: the same variables; the same number of components; every pair's
congruence above what both audits' bootstraps allow; the largest principal
angle within both audits' bootstrap angles; no check passing in one audit
and failing in the other.

The output folder (default <A>-vs-<B>) holds report.md, report.pdf,
report.html, summary.json and compare-pairs.csv, compare-congruence.csv,
compare-angles.csv, compare-loadings.csv, compare-variables.csv and
compare-checks.csv. A folder that is not a pcqc audit, or a damaged one, is
refused with exit status 2.

Flags:
  --out DIR, --force, --format LIST, --title TEXT, --author TEXT,
  --date YYYY-MM-DD, --fail-on LEVEL, --quiet, as for run
`,
	run: runCompare,
}

func runCompare(args []string, stdout, stderr io.Writer) (int, error) {
	fs := flag.NewFlagSet("compare", flag.ContinueOnError)
	var f auditFlags
	fs.StringVar(&f.out, "out", "", "")
	fs.BoolVar(&f.force, "force", false, "")
	fs.BoolVar(&f.quiet, "quiet", false, "")
	fs.StringVar(&f.failOn, "fail-on", string(checks.Fail), "")
	fs.StringVar(&f.format, "format", "md,pdf,html", "")
	fs.StringVar(&f.title, "title", "", "")
	fs.StringVar(&f.author, "author", "", "")
	fs.StringVar(&f.date, "date", "", "")
	pos, helped, err := parseCommand("compare", fs, &f, args, 2, "two audit folders", stdout)
	if helped || err != nil {
		return exitOK, err
	}
	dirA, dirB := pos[0], pos[1]
	outGiven := f.out
	if f.out == "" {
		f.out = filepath.Base(filepath.Clean(dirA)) + "-vs-" + filepath.Base(filepath.Clean(dirB))
	}
	level, err := f.failLevel()
	if err != nil {
		return 0, err
	}
	formats, ropt, err := f.reportOptions(time.Now())
	if err != nil {
		return 0, err
	}
	var reads []string
	for _, d := range pos {
		reads = append(reads, filepath.Join(d, "model.json"), filepath.Join(d, "summary.json"))
	}
	if err := outdir.Check(f.out, f.outputOptions(reads)); err != nil {
		return 0, err
	}
	a, err := analysis.LoadAudit(dirA)
	if err != nil {
		return 0, err
	}
	b, err := analysis.LoadAudit(dirB)
	if err != nil {
		return 0, err
	}
	cmp := analysis.CompareAudits(a, b)
	run := report.CompareRun{Cmp: cmp, Checks: checks.RunCompare(cmp)}
	opts := report.Options{
		{Name: "fail_on", Value: f.failOn},
		{Name: "format", Value: f.format},
		{Name: "title", Value: f.title},
		{Name: "author", Value: f.author},
		{Name: "date", Value: f.date},
	}
	meta := report.Meta{Version: Version, Command: compareCommandLine(dirA, dirB, &f, outGiven), Options: opts}

	out, err := f.beginOutput(reads)
	if err != nil {
		return 0, err
	}
	defer setActiveOutput(nil)
	write := func() error {
		if err := report.WriteCompareTables(out.Dir(), run, meta); err != nil {
			return err
		}
		if err := report.WriteCompareReport(out.Dir(), run, meta, ropt, formats); err != nil {
			return err
		}
		return out.Commit()
	}
	if err := write(); err != nil {
		out.Abort()
		return 0, writeFailure(err)
	}
	printCompareSummary(stdout, run)
	reportWritten(stdout, stderr, out)
	if level != "" && checks.Reached(run.Checks, level) {
		return exitChecks, nil
	}
	return exitOK, nil
}

// compareCommandLine is the command for the report's Reproduce section:
// the two folders and every option that differs from its default.
func compareCommandLine(a, b string, f *auditFlags, out string) []string {
	cmd := []string{"pcqc", "compare"}
	var flags []string
	for _, o := range []struct{ name, value, def string }{
		{"fail-on", f.failOn, string(checks.Fail)}, {"format", f.format, "md,pdf,html"},
		{"title", f.title, ""}, {"author", f.author, ""}, {"date", f.date, ""}, {"out", out, ""},
	} {
		if o.value != o.def {
			flags = append(flags, "--"+o.name, o.value)
		}
	}
	if strings.HasPrefix(a, "-") || strings.HasPrefix(b, "-") {
		return append(append(append(cmd, flags...), "--"), a, b)
	}
	return append(append(cmd, a, b), flags...)
}

func printCompareSummary(w io.Writer, run report.CompareRun) {
	c := run.Cmp
	angle := "no principal angles"
	if len(c.Angles) > 0 {
		angle = fmt.Sprintf("largest principal angle %.3g°", c.LargestAngle())
	}
	fmt.Fprintf(w, "pcqc: %d common variables, %d component pairs, %s; verdict %s\n",
		len(c.Common), len(c.Pairs), angle, checks.Verdict(run.Checks))
}
