package main

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"io"

	"pcqc/analysis"
	"pcqc/demo"
	"pcqc/report"
)

const demoDataName = "demo-data.csv"

var demoCommand = &command{
	name:    "demo",
	summary: "audit the built-in invented river-chemistry survey",
	usage:   "pcqc demo [--out DIR] [flags]",
	help: `Demo generates an invented data set, a river-chemistry monitoring survey
of 240 water samples from 12 sampling stations with 13 variables, and audits it
exactly as run would. The data are not measurements: three latent processes
(farm runoff, winter road salt, summer warming with oxygen loss) plus noise,
and a few planted anomalies (a slurry spill, a temperature entered in
Fahrenheit), so that you can see what pcqc finds when the truth is known.

The table is written to demo-data.csv inside the output folder (default
pcqc-demo). Demo takes run's flags; --id and --group default to sample_id and
station.

` + auditFlagHelp,
	run: runDemo,
}

func runDemo(args []string, stdout, stderr io.Writer) (int, error) {
	fs := flag.NewFlagSet("demo", flag.ContinueOnError)
	var f auditFlags
	f.register(fs, "pcqc-demo")
	pos, err := parseArgs(fs, args)
	if errors.Is(err, flag.ErrHelp) {
		printCommandHelp(stdout, lookupCommand("demo"))
		return exitOK, nil
	}
	if err != nil {
		return 0, err
	}
	if err := requireArgs("demo", pos, 0, "no arguments"); err != nil {
		return 0, err
	}
	f.set = markSet(fs)
	if !f.set["id"] {
		f.id = demo.SampleID
	}
	if !f.set["group"] {
		f.group = demo.Station
	}
	read, err := f.readOptions()
	if err != nil {
		return 0, err
	}
	if _, err := f.analysisOptions(); err != nil {
		return 0, err
	}
	if _, err := f.failLevel(); err != nil {
		return 0, err
	}
	if err := report.CheckTarget(f.out, f.force); err != nil {
		return 0, usagef("%v", err)
	}
	data := demo.Survey()
	t, err := analysis.ReadTableFrom(demoDataName, bytes.NewReader(data), read)
	if err != nil {
		return 0, err
	}
	fmt.Fprintln(stdout, "pcqc demo: an invented river-chemistry survey (not real measurements); see 'pcqc help demo'")
	return runAudit(auditJob{
		flags:   &f,
		read:    read,
		table:   t,
		command: append([]string{"pcqc", "demo"}, args...),
		extra:   map[string][]byte{demoDataName: data},
	}, stdout, stderr)
}
