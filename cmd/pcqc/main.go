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
	"io/fs"
	"os"
	"pcqc/analysis/intake"
	"pcqc/internal/safetext"
	"runtime"
	"runtime/pprof"
	"strings"
	"syscall"

	"pcqc/outdir"
)

// Version is the pcqc version, written into every output.
const Version = "0.1.0"

// Exit statuses.
const (
	exitOK     = 0 // success, and no check reached the --fail-on level
	exitChecks = 1 // outputs written, but a check reached the --fail-on level
	exitUsage  = 2 // usage or input error; nothing written
	exitOutput = 3 // the outputs could not be written (disk full, permissions)
	// exitInternal is a fault in pcqc itself, never in the user's input or
	// system: EX_SOFTWARE of BSD's sysexits.h, "an internal software error".
	exitInternal = 70
)

// usageError is a mistake in the command line.
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

func usagef(format string, a ...any) error { return &usageError{fmt.Sprintf(format, a...)} }

// outputError is a failure of the file system to take the outputs.
type outputError struct{ err error }

func (e *outputError) Error() string { return e.err.Error() }

// internalError is a fault in pcqc: a result it could not render or
// encode. It is reported as such, never as a disk or input problem.
type internalError struct{ err error }

func (e *internalError) Error() string {
	return "internal error: " + e.err.Error() + "; nothing was written. " + pleaseReport
}

const pleaseReport = "Please report this, with the command line, as a pcqc bug"

// writeFailure sorts an error met while writing the outputs: the file
// system's refusals (no space, no permission, a vanished folder) are
// output errors (exit status 3); anything else is pcqc's own fault.
func writeFailure(err error) error {
	var pe *fs.PathError
	var le *os.LinkError
	var se *os.SyscallError
	var errno syscall.Errno
	var refused *outdir.RefusedError
	switch {
	case errors.As(err, &refused):
		return err
	case errors.As(err, &pe), errors.As(err, &le), errors.As(err, &se), errors.As(err, &errno):
		return &outputError{err}
	}
	return &internalError{err}
}

// reportWritten tells where the output went, and where files of a replaced
// folder that pcqc had not listed were kept.
func reportWritten(stdout, stderr io.Writer, out *outdir.Output) {
	fmt.Fprintf(stdout, "pcqc: wrote %s\n", out.Target())
	if kept := out.Leftover(); kept != "" {
		fmt.Fprintf(stderr, "pcqc: the replaced folder held files pcqc did not write; they were kept in %s\n", oneLine(kept))
	}
}

type command struct {
	name    string
	summary string
	usage   string
	help    string
	run     func(args []string, stdout, stderr io.Writer) (int, error)
}

var commands []*command

func init() {
	commands = []*command{runCommand, reviewCommand, applyCommand, compareCommand, demoCommand, versionCommand, helpCommand}
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
	// PCQC_MEMPROFILE=file writes a heap profile of every allocation made
	// (go tool pprof -sample_index=alloc_space), for the memory bounds.
	if path := os.Getenv("PCQC_MEMPROFILE"); path != "" {
		runtime.MemProfileRate = 64 << 10
		status := runProcess(os.Args[1:])
		if f, err := os.Create(path); err == nil {
			pprof.Lookup("allocs").WriteTo(f, 0)
			f.Close()
		}
		os.Exit(status)
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
// A panic, which is always a bug, becomes one line on stderr and the
// status exitInternal, after the output being written is removed; panics
// in worker goroutines reach here too (analysis re-raises them in the
// caller).
func mainWithArgs(args []string, stdout, stderr io.Writer) (status int) {
	defer func() {
		if r := recover(); r != nil {
			abortActiveOutput()
			name := "pcqc"
			if len(args) > 0 && lookupCommand(args[0]) != nil {
				name += " " + args[0]
			}
			fmt.Fprintf(stderr, "%s: internal error: %s; nothing was written. %s\n", name, oneLine(fmt.Sprint(r)), pleaseReport)
			status = exitInternal
		}
	}()
	if len(args) == 0 {
		printTopHelp(stderr)
		return exitUsage
	}
	c, rest, err := topLevel(args)
	if err != nil {
		fmt.Fprintf(stderr, "pcqc: %s\n", oneLine(err.Error()))
		return exitUsage
	}
	status, err = c.run(rest, stdout, stderr)
	if err != nil {
		fmt.Fprintf(stderr, "pcqc %s: %s\n", c.name, oneLine(err.Error()))
		return statusFor(err)
	}
	return status
}

// topLevel finds the command to run and its arguments. As with the go
// command, pcqc -h, -help and --help are pcqc help, and -version and
// --version are pcqc version; any other flag before the command is refused,
// naming the closest of these.
func topLevel(args []string) (*command, []string, error) {
	first := args[0]
	if strings.HasPrefix(first, "-") && len(first) > 1 {
		name, _, _ := strings.Cut(strings.TrimLeft(first, "-"), "=")
		switch name {
		case "h", "help":
			return helpCommand, args[1:], nil
		case "version":
			return versionCommand, args[1:], nil
		}
		if near := closest(name, []string{"help", "version"}); near != "" {
			return nil, nil, usagef("unknown flag %s; did you mean --%s? Give a command first: run 'pcqc help'", first, near)
		}
		return nil, nil, usagef("unknown flag %s: pcqc takes only --help or --version before a command; run 'pcqc help'", first)
	}
	c := lookupCommand(first)
	if c == nil {
		return nil, nil, unknownCommand(first)
	}
	return c, args[1:], nil
}

func statusFor(err error) int {
	var ue *usageError
	var ie *intake.InputError
	var oe *outputError
	var internal *internalError
	var refused *outdir.RefusedError
	switch {
	case errors.As(err, &ue), errors.As(err, &ie), errors.As(err, &refused):
		return exitUsage
	case errors.As(err, &internal):
		return exitInternal
	case errors.As(err, &oe):
		return exitOutput
	}
	return exitUsage
}

// oneLine keeps an error message on one line of stderr, with every other
// control character escaped (see internal/safetext), so that text from a
// user's file cannot drive the terminal or reorder what it shows.
func oneLine(s string) string { return safetext.OneLine(s) }
