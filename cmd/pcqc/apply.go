package main

import (
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
	"pcqc/report"
)

var applyCommand = &command{
	name:    "apply",
	summary: "score new samples against the model of an earlier run",
	usage:   "pcqc apply AUDIT_DIR|MODEL_JSON NEW_DATA [--out DIR] [--id COL] [--group COL] [flags]",
	help: `Apply reads model.json from AUDIT_DIR, a folder written by pcqc run (or the
model file itself, MODEL_JSON, when it is given by its path), and scores the
samples of NEW_DATA against it: they are preprocessed with the
training means and scales (never re-estimated), projected on the training
loadings, and judged by Hotelling T² against the limit for new observations,
k(n²−1)/(n(n−k))·F(k, n−k), and by Q against the training limits. For every
sample beyond a 99 % limit, contributions.csv gives each variable's
contribution to its T² and its Q; the report shows the new samples on the
training score plot, and the contributions and signed residuals of the
worst of them. The training scores are read from scores.csv beside the
model, when it is there.

The variables are found by name; columns the model does not know are
ignored. The transform, scaling and components come from the model, so
--transform, --scale, --components, --columns and --drop are refused, as are
--bootstrap and --permutations (apply resamples nothing). With
--missing mean, missing cells get the training means. NEW_DATA is read in
the training data's encoding unless --encoding is given.

The output folder defaults to <NEW_DATA name>-apply. The report's Reproduce
section gives the command with every option in force.

Input, output and report flags as for run:
  --id COL, --group COL, --missing fail|drop|mean, --censored fail|half|sqrt2,
  --delim D, --decimal MARK, --encoding ENC, --skip N, --comment CHAR,
  --units-row, --thousands SEP,
  --out DIR, --force, --format LIST, --title TEXT, --author TEXT,
  --date YYYY-MM-DD, --fail-on LEVEL, --quiet
`,
	run: runApply,
}

// modelFixedFlags are the flags whose meaning the saved model fixes.
var modelFixedFlags = []string{"transform", "scale", "components", "columns", "drop", "bootstrap", "permutations", "seed"}

func runApply(args []string, stdout, stderr io.Writer) (int, error) {
	fs := flag.NewFlagSet("apply", flag.ContinueOnError)
	var f auditFlags
	f.register(fs, "")
	pos, helped, err := parseCommand("apply", fs, &f, args, 2, "an audit folder and a data file", stdout)
	if helped || err != nil {
		return exitOK, err
	}
	for _, name := range modelFixedFlags {
		if f.set[name] {
			return 0, usagef("--%s is fixed by the saved model; apply takes the model as it is", name)
		}
	}
	auditDir, modelPath := modelLocation(pos[0])
	data := pos[1]
	outGiven := ""
	if f.set["out"] {
		outGiven = f.out
	}
	if f.out == "" {
		f.out = intake.StemName(data) + "-apply"
	}
	reads := []string{modelPath, filepath.Join(auditDir, "scores.csv"), data}
	read, err := f.validate(reads...)
	if err != nil {
		return 0, err
	}
	if read.Missing == intake.MissingIterative {
		// New samples are scored one by one against a fixed model, which
		// gives the imputation no table to learn from.
		return 0, usagef("--missing iterative imputes within the table being analysed; apply scores new samples against a saved model, so use --missing mean (the model's means) or drop")
	}
	level, _ := f.failLevel()
	formats, ropt, _ := f.reportOptions(time.Now())
	model, err := analysis.LoadModel(modelPath)
	if err != nil {
		return 0, err
	}
	// New batches usually come from where the training data came from, so
	// they are read in the training file's encoding unless told otherwise.
	if enc, ok := intake.ParseEncoding(model.Input.Encoding); ok && !f.set["encoding"] {
		read.Encoding = enc
	}
	training, err := analysis.ReadTrainingScores(filepath.Join(auditDir, "scores.csv"), model)
	if err != nil {
		return 0, err
	}
	t, others, err := readForModel(data, model, read)
	if err != nil {
		return 0, err
	}
	if err := analysis.CheckNewValues(model, t); err != nil {
		return 0, err
	}
	app := analysis.Apply(model, t)
	app.Extra = append(app.Extra, others...)
	run := report.ApplyRun{
		App:            app,
		Checks:         checks.RunAll(checks.Input{Apply: app}),
		TrainingScores: training,
		AuditDir:       auditDir,
	}
	opts := f.applyOptions(read, t)
	meta := report.Meta{Version: Version, Command: applyCommandLine(pos[0], data, opts, outGiven), Options: opts}

	out, err := f.beginOutput(reads)
	if err != nil {
		return 0, err
	}
	defer setActiveOutput(nil)
	write := func() error {
		if err := report.WriteApplyTables(out.Dir(), run, meta); err != nil {
			return err
		}
		if err := report.WriteApplyReport(out.Dir(), run, meta, ropt, formats); err != nil {
			return err
		}
		return out.Commit()
	}
	if err := write(); err != nil {
		out.Abort()
		return 0, writeFailure(err)
	}
	printApplySummary(stdout, run)
	reportWritten(stdout, stderr, out)
	if level != "" && checks.Reached(run.Checks, level) {
		return exitChecks, nil
	}
	return exitOK, nil
}

// modelLocation reads apply's first argument: an audit folder, or the
// path of a model file (a name ending in .json, or any file that is not a
// folder), whose folder is then the audit folder.
func modelLocation(arg string) (auditDir, modelPath string) {
	st, err := os.Stat(arg)
	isDir := err == nil && st.IsDir()
	if !isDir && (err == nil || strings.EqualFold(filepath.Ext(arg), ".json")) {
		return filepath.Dir(arg), arg
	}
	return arg, filepath.Join(arg, "model.json")
}

// applyCommandLine is the command for the report's Reproduce section: the
// model and data arguments and every option in force that differs from
// apply's default, those the user typed and those set for them (the demo's
// id and group columns, the encoding taken from the model, the detected
// id column), so that the line alone gives the same report. --out is kept
// when it was given; options that cannot change the results (--force,
// --quiet, --threads) are left out, as they are from the options table.
func applyCommandLine(model, data string, opts report.Options, out string) []string {
	defaults := map[string]string{"id": "", "group": "", "missing": string(intake.MissingFail), "censored": string(intake.CensorFail), "delim": "auto",
		"decimal": "point", "encoding": string(intake.EncodingUTF8), "fail_on": string(checks.Fail), "format": "md,pdf,html",
		"title": "", "author": "", "date": "", "skip": "0", "comment": "", "units_row": "false", "thousands": ""}
	var flags []string
	for _, o := range opts {
		def, ok := defaults[o.Name]
		value := fmt.Sprint(o.Value)
		if !ok || value == def {
			continue
		}
		if b, isBool := o.Value.(bool); isBool && b {
			flags = append(flags, "--"+strings.ReplaceAll(o.Name, "_", "-")) // an on/off flag takes no value
			continue
		}
		flags = append(flags, "--"+strings.ReplaceAll(o.Name, "_", "-"), value)
	}
	if out != "" {
		flags = append(flags, "--out", out)
	}
	cmd := []string{"pcqc", "apply"}
	if strings.HasPrefix(model, "-") || strings.HasPrefix(data, "-") {
		// Arguments that look like flags go after "--".
		return append(append(append(cmd, flags...), "--"), model, data)
	}
	return append(append(cmd, model, data), flags...)
}

// readForModel reads the new data: the model's variables that the file has
// (so that other columns, numeric or not, do not get in the way), the
// model's transform, any number of rows, constant columns kept, and
// training means for missing cells. It also returns the file's other
// columns, which are ignored.
func readForModel(path string, m *analysis.Model, read intake.ReadOptions) (*intake.Table, []string, error) {
	header, err := intake.ReadHeader(path, read)
	if err != nil {
		return nil, nil, err
	}
	index := map[string]int{}
	for j, v := range m.Variables {
		index[analysis.ColumnKey(v)] = j
	}
	var present []string
	var means []float64
	for _, h := range header {
		if j, ok := index[analysis.ColumnKey(h)]; ok && h != read.IDColumn && h != read.GroupColumn {
			present = append(present, h)
			means = append(means, m.Means[j])
		}
	}
	if len(present) == 0 {
		return nil, nil, &intake.InputError{File: path, Line: 1, Reason: fmt.Sprintf("none of the model's variables (%s) is a column of the new data", listVariables(m.Variables))}
	}
	read.Columns = present
	read.Transform = m.Transform
	read.MinRows = 1
	read.KeepConstant = true
	read.ImputeWith = means
	t, err := intake.ReadTable(path, read)
	if err != nil {
		return nil, nil, err
	}
	known := map[string]bool{analysis.ColumnKey(t.IDColumn): true, analysis.ColumnKey(t.GroupColumn): true}
	for _, v := range m.Variables {
		known[analysis.ColumnKey(v)] = true
	}
	var others []string
	for _, h := range header {
		if !known[analysis.ColumnKey(h)] {
			others = append(others, h)
		}
	}
	return t, others, nil
}

func listVariables(v []string) string {
	if len(v) > 8 {
		return fmt.Sprintf("%s … and %d more", v[:8], len(v)-8)
	}
	return fmt.Sprint(v)
}

func (f *auditFlags) applyOptions(read intake.ReadOptions, t *intake.Table) report.Options {
	// The model fixes the variables, preprocessing and components; apply
	// records the rest of run's options, in the same order.
	fromModel := map[string]bool{"columns": true, "drop": true, "transform": true, "scale": true, "center": true,
		"components": true, "permutations": true, "bootstrap": true, "seed": true}
	var opts report.Options
	for _, o := range f.effective(read, t) {
		if !fromModel[o.Name] {
			opts = append(opts, o)
		}
	}
	return opts
}

func printApplySummary(w io.Writer, run report.ApplyRun) {
	app := run.App
	if app.Scores == nil {
		fmt.Fprintf(w, "pcqc: the new data lack model variables %v; nothing scored; verdict %s\n", app.Missing, checks.Verdict(run.Checks))
	} else {
		fmt.Fprintf(w, "pcqc: %d new samples scored against %d components; %d beyond a 99 %% limit; verdict %s\n",
			app.Table.Rows(), app.Model.Retained, len(app.Flagged), checks.Verdict(run.Checks))
	}
}
