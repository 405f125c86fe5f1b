// Command pcqc audits a principal component analysis and writes the
// evidence: result tables, a JSON summary and (in later subcommands) a
// report. Run `pcqc help` for the commands.
//
// This file and its siblings hold the command line only: flags,
// subcommands, exit statuses and the wiring between the analysis, checks and
// report packages. No statistics are computed here.
package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"runtime/pprof"

	"pcqc/analysis"
)

// Version is the pcqc version, written into every output.
const Version = "0.1.0"

// Exit statuses.
const (
	exitOK     = 0 // success, and no check reached the --fail-on level
	exitChecks = 1 // outputs written, but a check reached the --fail-on level
	exitUsage  = 2 // usage or input error; nothing written
	exitOutput = 3 // the outputs could not be written
)

// usageError is a mistake in the command line.
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

func usagef(format string, a ...any) error { return &usageError{fmt.Sprintf(format, a...)} }

// outputError is a failure to write the outputs.
type outputError struct{ err error }

func (e *outputError) Error() string { return e.err.Error() }

type command struct {
	name    string
	summary string
	usage   string
	help    string
	run     func(args []string, stdout, stderr io.Writer) (int, error)
}

var commands []*command

func init() {
	commands = []*command{runCommand, reviewCommand, applyCommand, demoCommand, versionCommand, helpCommand}
}

func lookupCommand(name string) *command {
	for _, c := range commands {
		if c.name == name {
			return c
		}
	}
	return nil
}

func main() {
	// PCQC_CPUPROFILE=file writes a CPU profile, for developers measuring
	// the whole process (see bench/).
	if path := os.Getenv("PCQC_CPUPROFILE"); path != "" {
		if f, err := os.Create(path); err == nil {
			pprof.StartCPUProfile(f)
			status := runProcess(os.Args[1:])
			pprof.StopCPUProfile()
			f.Close()
			os.Exit(status)
		}
	}
	os.Exit(runProcess(os.Args[1:]))
}

// runProcess runs pcqc as a process: with interrupts handled.
func runProcess(args []string) int {
	stop := handleInterrupts(os.Stderr)
	defer stop()
	return mainWithArgs(args, os.Stdout, os.Stderr)
}

// mainWithArgs runs pcqc and returns its exit status; tests call it directly.
func mainWithArgs(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		printTopHelp(stderr)
		return exitUsage
	}
	c := lookupCommand(args[0])
	if c == nil {
		fmt.Fprintf(stderr, "pcqc: unknown command %q; run 'pcqc help' for the list\n", args[0])
		return exitUsage
	}
	status, err := c.run(args[1:], stdout, stderr)
	if err != nil {
		fmt.Fprintf(stderr, "pcqc %s: %s\n", c.name, oneLine(err.Error()))
		return statusFor(err)
	}
	return status
}

func statusFor(err error) int {
	var ue *usageError
	var ie *analysis.InputError
	var oe *outputError
	switch {
	case errors.As(err, &ue), errors.As(err, &ie):
		return exitUsage
	case errors.As(err, &oe):
		return exitOutput
	}
	return exitUsage
}

// oneLine keeps an error message on one line of stderr.
func oneLine(s string) string {
	out := []rune{}
	for _, r := range s {
		if r == '\n' || r == '\r' {
			r = ' '
		}
		out = append(out, r)
	}
	return string(out)
}
