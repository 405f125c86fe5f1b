package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"

	"pcqc/analysis/intake"
)

var runCommand = &command{
	name:    "run",
	summary: "audit the PCA of a data table and write the evidence",
	usage:   "pcqc run DATA [flags]",
	help: `Run reads DATA (CSV, TSV or semicolon-separated, with a header row),
preprocesses it (optional transform, centring, scaling), computes the PCA by
singular value decomposition, checks the result, and writes the output folder
(default: <DATA name>-pcqc in the current folder).

The output folder is written complete or not at all: files are written to a
temporary folder beside it and renamed into place. An existing non-empty
output folder is refused unless --force is given, and even then unless pcqc
wrote it (see --force below).

Exit status: 0 success, 1 a check reached the --fail-on level (the
outputs are written), 2 usage or input error (nothing is written), 3 the
file system refused the outputs, 70 an internal error (a bug; please
report it), 129/130/143 interrupted.

` + auditFlagHelp + excludeFlagHelp + streamFlagHelp,
	run: runRun,
}

func runRun(args []string, stdout, stderr io.Writer) (int, error) {
	fs := flag.NewFlagSet("run", flag.ContinueOnError)
	var f auditFlags
	f.register(fs, "")
	f.exclude.register(fs)
	stream := fs.Bool("stream", false, "")
	pos, helped, err := parseCommand("run", fs, &f, args, 1, "one data file", stdout)
	if helped || err != nil {
		return exitOK, err
	}
	data := pos[0]
	if f.out == "" {
		f.out = intake.StemName(data) + "-pcqc"
	}
	read, err := f.validate(f.exclude.reads([]string{data})...)
	if err != nil {
		return 0, err
	}
	if _, err := os.Stat(data); err != nil {
		return 0, &intake.InputError{File: data, Reason: "cannot open: " + pathReason(err)}
	}
	if *stream {
		return runStream(&f, read, data, append([]string{"pcqc", "run"}, args...), stdout, stderr)
	}
	t, err := intake.ReadTable(data, read)
	if err != nil {
		return 0, err
	}
	return runAudit(auditJob{flags: &f, read: read, table: t, reads: f.exclude.reads([]string{data}), command: append([]string{"pcqc", "run"}, args...)}, stdout, stderr)
}

func pathReason(err error) string {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	return fmt.Sprint(err)
}
