package main

import (
	"fmt"
	"io"
	"os"
	"runtime/debug"
	"time"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
	"pcqc/report"
)

// auditJob is one audit to run and write: a table already read and
// validated, the options, and extra files to place in the output folder.
type auditJob struct {
	flags  *auditFlags
	review *analysis.Review // review mode: the comparison with their tables
	// adjust, when set, changes the analysis options before the analysis
	// (review mode keeps their number of components and scaling).
	adjust func(*analysis.Options)
	// extend, when set, writes more into the output folder after the audit
	// (the demo's later batch).
	extend   func(dir string, res *analysis.Result, meta report.Meta, formats report.Formats, ropt report.ReportOptions) error
	invented string // the demo's note that its data are invented
	title    string // the default title, when --title is not given
	read     intake.ReadOptions
	table    *intake.Table
	command  []string
	reads    []string          // the files read, which the output folder may not hold
	extra    map[string][]byte // file name → content, written beside the tables
}

// runAudit analyses the table, judges it and writes every output into the
// output folder, which appears complete or not at all.
func runAudit(job auditJob, stdout, stderr io.Writer) (int, error) {
	opt, err := job.flags.analysisOptions()
	if err != nil {
		return 0, err
	}
	opt.Progress = newProgress(stderr, job.flags.quiet)
	opt.InPlace = true // the table's raw matrix is not needed after preprocessing
	limitMemory(job.table)
	if job.adjust != nil {
		job.adjust(&opt)
	}
	rows, excludeOption, err := job.flags.exclude.resolve(job.table)
	if err != nil {
		return 0, err
	}
	opt.Exclude = rows
	formats, ropt, err := job.flags.reportOptions(time.Now())
	if err != nil {
		return 0, err
	}
	ropt.Invented = job.invented
	if ropt.Title == "" {
		ropt.Title = job.title
	}
	if ropt.Title == "" && job.invented != "" {
		ropt.Title = "PCA audit of an invented river-chemistry survey (pcqc demo)"
	}
	res, err := analysis.Analyze(job.table, opt)
	if err != nil {
		return 0, err
	}
	results := checks.RunAll(checks.Input{Run: res, Review: job.review})
	audit := report.Audit{Result: res, Review: job.review, Checks: results}
	meta := report.Meta{
		Version: Version,
		Command: job.command,
		Options: job.flags.effective(job.read, job.table),
	}
	if job.flags.set["exclude"] || job.flags.set["exclude-file"] {
		meta.Options = append(meta.Options, excludeOption)
	}

	out, err := job.flags.beginOutput(job.reads)
	if err != nil {
		return 0, err
	}
	defer setActiveOutput(nil)
	write := func() error {
		for name, content := range job.extra {
			if err := os.WriteFile(out.Path(name), content, 0o644); err != nil {
				return err
			}
		}
		if err := report.WriteTables(out.Dir(), audit, meta); err != nil {
			return err
		}
		holdWriting()
		if err := report.WriteModel(out.Dir(), res, Version); err != nil {
			return err
		}
		if err := report.WriteReport(out.Dir(), audit, meta, ropt, formats); err != nil {
			return err
		}
		if job.extend != nil {
			if err := job.extend(out.Dir(), res, meta, formats, ropt); err != nil {
				return err
			}
		}
		return out.Commit()
	}
	if err := write(); err != nil {
		out.Abort()
		return 0, writeFailure(err)
	}

	verdict := checks.Verdict(results)
	level, _ := job.flags.failLevel()
	excluded := ""
	if n := len(res.Excluded.IDs()); n > 0 {
		excluded = fmt.Sprintf(" (%d excluded)", n)
	}
	fmt.Fprintf(stdout, "pcqc: %d samples%s × %d variables, %d component%s retained (%s); verdict %s\n",
		res.Table.Rows(), excluded, len(job.table.Variables), res.Retained, plural(res.Retained), res.Rule, verdict)
	reportWritten(stdout, stderr, out)
	if level != "" && checks.Reached(results, level) {
		return exitChecks, nil
	}
	return exitOK, nil
}

// limitMemory sets a soft limit on the heap from the size of the data
// matrix, unless GOMEMLIMIT is set: 2.25 copies of the matrix plus 40 MiB,
// or for a wide table 3 copies plus 100 MB less 24 MiB, the resident size
// of the program's code and data outside the heap (about 19 MiB measured
// for pcqc help), so that the whole process stays within 3 copies plus
// 100 MB.
// The analysis itself needs about two copies (the preprocessed matrix and
// one resampling or permutation workspace) and, with one permutation worker,
// a column and its labels per thread (10 bytes a row each); the 40 MiB
// leave room for that and for the program outside the heap within issue
// 16's bound of 2.5 copies plus 100 MB. Without a limit the garbage
// collector lets the heap grow to twice what is live before it collects,
// which for large tables means hundreds of megabytes of garbage. The limit
// is soft: when more is live, the collector runs more often and the heap
// grows past it rather than failing.
func limitMemory(t *intake.Table) {
	if os.Getenv("GOMEMLIMIT") != "" {
		return
	}
	n, p := t.X.Dims()
	data := int64(8 * n * p)
	limit := data*9/4 + 40<<20
	if p > n {
		// Wide tables: element-wise cross-validation holds the matrix, the
		// loadings of every component (as large as the matrix when p > n),
		// the folds' imputed values in single precision and a filled copy
		// per worker, about 4.75 copies at two workers.
		limit = data*3 + 100_000_000 - 24<<20
	}
	debug.SetMemoryLimit(limit)
}
