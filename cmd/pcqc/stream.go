package main

import (
	"fmt"
	"io"
	"time"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/report"
)

// streamFlagHelp documents --stream, for `pcqc help run`.
const streamFlagHelp = `
Tables larger than memory:
  --stream            read DATA twice, row by row, instead of into memory: the
                      first pass accumulates the sums the decomposition needs,
                      the second writes samples.csv. DATA must be a regular
                      CSV file (not stdin or a pipe) of at most 2,000
                      variables. Parallel analysis runs on a random sample of
                      10,000 rows; the bootstrap weights rows by Poisson(1)
                      counts; cross-validation, influence, the robust fit,
                      tail-adapted limits, the checks and all figures but one
                      score plot are left out.
                      Refused with --exclude, --exclude-file, --components cv
`

// streamRefusal says why the flags given cannot stream, or "".
func streamRefusal(f *auditFlags) string {
	switch {
	case f.set["exclude"] || f.set["exclude-file"]:
		return "--exclude and --exclude-file cannot be combined with --stream (leave the rows out of the file, or audit in memory)"
	case f.components == string(analysis.RuleCV):
		return "--components cv needs every row in memory and cannot be combined with --stream"
	}
	return ""
}

// runStream audits data in two passes over the file and writes the output
// folder, which appears complete or not at all.
func runStream(f *auditFlags, read intake.ReadOptions, data string, command []string, stdout, stderr io.Writer) (int, error) {
	if why := streamRefusal(f); why != "" {
		return 0, usagef("%s", why)
	}
	aopt, err := f.analysisOptions()
	if err != nil {
		return 0, err
	}
	formats, ropt, err := f.reportOptions(time.Now())
	if err != nil {
		return 0, err
	}
	sopt := analysis.StreamOptions{Scaling: aopt.Scaling, Components: aopt.Components, Permutations: aopt.Permutations,
		Bootstrap: aopt.Bootstrap, Seed: aopt.Seed, Threads: aopt.Threads}
	// The input is checked (a pass's errors) before the output folder
	// exists: nothing is written for a bad table.
	out, err := f.beginOutput([]string{data})
	if err != nil {
		return 0, err
	}
	defer setActiveOutput(nil)
	var samples *report.StreamSamples
	res, err := analysis.StreamAnalyze(data, read, sopt, func(s analysis.StreamSample) error {
		return samples.Write(s)
	}, func(r *analysis.StreamResult) error {
		id := r.Info.IDColumn
		if id == "" {
			id = "row"
		}
		var err error
		samples, err = report.NewStreamSamples(out.Dir(), id, r.Retained)
		return err
	})
	if err == nil {
		err = samples.Close()
	}
	if err != nil {
		out.Abort()
		if _, ok := err.(*intake.InputError); ok {
			return 0, err
		}
		return 0, writeFailure(err)
	}
	tab := &intake.Table{IDColumn: res.Info.IDColumn, GroupColumn: res.Info.GroupColumn, Delimiter: res.Info.Delimiter}
	meta := report.Meta{Version: Version, Command: command, Options: append(f.effective(read, tab), report.Option{Name: "stream", Value: true})}
	if err := report.WriteStream(out.Dir(), res, meta, ropt, formats); err != nil {
		out.Abort()
		return 0, writeFailure(err)
	}
	if err := out.Commit(); err != nil {
		return 0, writeFailure(err)
	}
	fmt.Fprintf(stdout, "pcqc: %d samples × %d variables streamed, %d component%s retained (%s); %d beyond a family-wise limit; checks not run in stream mode\n",
		res.Rows, len(res.Variables), res.Retained, plural(res.Retained), aopt.Components, res.FlaggedCount)
	reportWritten(stdout, stderr, out)
	return exitOK, nil
}
