package main

import (
	"errors"
	"flag"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// goFlagWords are phrases of the flag package's own messages, which pcqc
// replaces with its own.
var goFlagWords = []string{"flag provided but not defined", "parse error", "invalid value", "flag needs an argument", "bad flag syntax", "invalid boolean", "panic:", "goroutine"}

// checkOneLine fails unless stderr is exactly one line, holds every want,
// and none of the flag package's phrases.
func checkOneLine(t *testing.T, args []string, status int, stderr string, want ...string) {
	t.Helper()
	if status != exitUsage {
		t.Errorf("%q: status %d, want %d", args, status, exitUsage)
	}
	if strings.Count(stderr, "\n") != 1 || !strings.HasSuffix(stderr, "\n") {
		t.Errorf("%q: stderr is not one line: %q", args, stderr)
	}
	for _, w := range want {
		if !strings.Contains(stderr, w) {
			t.Errorf("%q: stderr %q lacks %q", args, stderr, w)
		}
	}
	for _, w := range goFlagWords {
		if strings.Contains(stderr, w) {
			t.Errorf("%q: stderr %q has the flag package's %q", args, stderr, w)
		}
	}
}

// Every subcommand refuses a bad flag in pcqc's words: one line naming the
// flag, what it takes and, for an unknown flag, the closest known one;
// exit status 2 and no output folder.
func TestFlagErrorsAreRephrased(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	data := usarrestsPath
	// Positional arguments each command needs, so that only the flag is
	// wrong.
	lead := map[string][]string{
		"run":    {data},
		"review": {data, "--loadings", data},
		"apply":  {dir, data},
		"demo":   nil,
	}
	cases := []struct {
		name  string
		flags []string
		want  []string
	}{
		{"unknown, near a flag", []string{"--sede", "3"}, []string{"unknown flag --sede", "did you mean --seed?", "pcqc help CMD"}},
		{"unknown, one dash", []string{"-nosuch"}, []string{"unknown flag --nosuch", "see 'pcqc help CMD'"}},
		{"unknown, swapped letters", []string{"--foramt", "md"}, []string{"unknown flag --foramt", "did you mean --format?"}},
		{"unknown, underscore", []string{"--fail_on", "warn"}, []string{"did you mean --fail-on?"}},
		{"unknown, capital", []string{"--Quiet"}, []string{"did you mean --quiet?"}},
		{"unknown, a prefix", []string{"--boot", "3"}, []string{"did you mean --bootstrap?"}},
		{"not a number", []string{"--seed", "abc"}, []string{`invalid --seed "abc"`, "--seed takes a whole number from 0"}},
		{"negative seed", []string{"--seed=-1"}, []string{`invalid --seed "-1": negative`}},
		{"not an integer", []string{"--bootstrap", "1e3"}, []string{`invalid --bootstrap "1e3"`, "0 or more"}},
		{"too large", []string{"--threads", "99999999999999999999999"}, []string{"too large", "--threads takes a whole number"}},
		{"no value, enumerated", []string{"--missing"}, []string{"--missing needs a value: one of fail, drop, mean"}},
		{"no value, a folder", []string{"--out"}, []string{"--out needs a value: a folder"}},
		{"bad on/off value", []string{"--force=maybe"}, []string{"invalid --force=maybe", "write --force, or --force=false"}},
		{"malformed", []string{"---seed", "3"}, []string{`malformed flag "---seed"`}},
		{"wrong value of a known set", []string{"--fail-on", "sometimes"}, []string{`invalid --fail-on "sometimes"`, "fail, warn or never"}},
	}
	for cmd, pos := range lead {
		for _, c := range cases {
			args := append(append([]string{cmd}, pos...), c.flags...)
			if c.name != "no value, a folder" && c.name != "no value, enumerated" {
				args = append(args, "--out", out)
			}
			status, _, stderr := runPCQC(t, args...)
			want := make([]string, len(c.want))
			for i, w := range c.want {
				want[i] = strings.ReplaceAll(w, "CMD", cmd)
			}
			checkOneLine(t, args, status, stderr, append(want, "pcqc "+cmd+": ")...)
			if _, err := os.Stat(out); err == nil {
				t.Fatalf("%q: output folder written", args)
			}
		}
	}
	// Review's own flags are known by name too.
	args := []string{"review", data, "--loading", data, "--out", out}
	status, _, stderr := runPCQC(t, args...)
	checkOneLine(t, args, status, stderr, "unknown flag --loading", "did you mean --loadings?")
}

// The commands without flags refuse any, in the same words.
func TestFlaglessCommandsRefuseFlags(t *testing.T) {
	for _, cmd := range []string{"version", "help"} {
		args := []string{cmd, "--json"}
		status, _, stderr := runPCQC(t, args...)
		checkOneLine(t, args, status, stderr, "unknown flag --json: "+cmd+" takes no flags")
	}
}

// checkFlags must refuse exactly what the flag package refuses, or a
// refusal would fall through to the package's own words (or pcqc would
// refuse what the package reads).
func TestCheckFlagsAgreesWithTheFlagPackage(t *testing.T) {
	lists := [][]string{
		{"a.csv"}, {"a.csv", "--seed", "3"}, {"--seed=3", "a.csv"}, {"-seed", "0x10"}, {"--seed", "-1"},
		{"--seed", "abc"}, {"--permutations", "-5"}, {"--permutations", "5.5"}, {"--force"}, {"--force=false"},
		{"--force=yes"}, {"--force", "a.csv"}, {"--out"}, {"--out", "--seed"}, {"--out=", "a.csv"}, {"-"},
		{"a.csv", "-", "--quiet"}, {"---x"}, {"-=x"}, {"--nosuch"}, {"a.csv", "--nosuch=3"}, {"--threads", "1_000"},
		{"--bootstrap", "0b101"}, {"--title", "-x"}, {"-h"}, {"a.csv", "--help"}, {"--seed", "18446744073709551616"},
	}
	for _, args := range lists {
		var f auditFlags
		fs := flag.NewFlagSet("run", flag.ContinueOnError)
		fs.SetOutput(io.Discard)
		f.register(fs, "")
		ours := checkFlags(fs, args)
		// The flag package, through parseArgs' loop without checkFlags.
		var theirs error
		rest := args
		for {
			if theirs = fs.Parse(rest); theirs != nil || len(fs.Args()) == 0 {
				break
			}
			rest = fs.Args()[1:]
		}
		if errors.Is(theirs, flag.ErrHelp) {
			theirs = nil // help is not a refusal
		}
		if (ours == nil) != (theirs == nil) {
			t.Errorf("%q: pcqc says %v, the flag package %v", args, ours, theirs)
		}
	}
}

func TestClosest(t *testing.T) {
	known := []string{"seed", "scale", "format", "fail-on", "bootstrap", "permutations", "out", "quiet"}
	cases := []struct{ name, want string }{
		{"sede", "seed"},         // swapped neighbours count once
		{"scael", "scale"},       //
		{"formt", "format"},      // one deletion
		{"FAIL_ON", "fail-on"},   // case and underscore are free
		{"perm", "permutations"}, // the only flag it begins
		{"o", ""},                // too short to guess from
		{"nosuch", ""},           // near nothing
		{"xyz", ""},
	}
	for _, c := range cases {
		if got := closest(c.name, known); got != c.want {
			t.Errorf("closest(%q) = %q, want %q", c.name, got, c.want)
		}
	}
}

// Help and version work as in the go command: pcqc -h, -help, --help and
// help; --version and version; help CMD and CMD -h for every command. All
// on stdout with status 0; help of an unknown command is an error naming
// the commands.
func TestHelpFlags(t *testing.T) {
	top := []struct {
		args []string
		want string
	}{
		{[]string{"--help"}, "Usage:\n  pcqc <command>"},
		{[]string{"-h"}, "Usage:\n  pcqc <command>"},
		{[]string{"-help"}, "Usage:\n  pcqc <command>"},
		{[]string{"help"}, "Usage:\n  pcqc <command>"},
		{[]string{"--help", "apply"}, "usage: pcqc apply"},
		{[]string{"--version"}, "pcqc " + Version + "\n"},
		{[]string{"-version"}, "pcqc " + Version + "\n"},
		{[]string{"version"}, "pcqc " + Version + "\n"},
		{[]string{"version", "-h"}, "usage: pcqc version"},
		{[]string{"help", "-h"}, "usage: pcqc help"},
	}
	for _, c := range commands {
		top = append(top,
			struct {
				args []string
				want string
			}{[]string{"help", c.name}, "usage: pcqc " + c.name},
			struct {
				args []string
				want string
			}{[]string{c.name, "--help"}, "usage: pcqc " + c.name},
			struct {
				args []string
				want string
			}{[]string{c.name, "-h"}, "usage: pcqc " + c.name})
	}
	for _, c := range top {
		status, stdout, stderr := runPCQC(t, c.args...)
		if status != exitOK || !strings.Contains(stdout, c.want) || stderr != "" {
			t.Errorf("%q: status %d, stdout %.80q, stderr %q; want %q on stdout", c.args, status, stdout, stderr, c.want)
		}
	}
	if _, stdout, _ := runPCQC(t, "--version"); stdout != "pcqc "+Version+"\n" {
		t.Errorf("--version: %q", stdout)
	}
	bad := []struct {
		args []string
		want []string
	}{
		{[]string{"help", "foo"}, []string{`pcqc help: unknown command "foo"; the commands are run, review, apply, compare, demo, version, help`}},
		{[]string{"help", "rnu"}, []string{`unknown command "rnu"; did you mean run?`}},
		{[]string{"hlep"}, []string{`pcqc: unknown command "hlep"; did you mean help?`}},
		{[]string{"--verison"}, []string{"unknown flag --verison; did you mean --version?"}},
		{[]string{"--nosuch", "run"}, []string{"unknown flag --nosuch: pcqc takes only --help or --version before a command"}},
		{[]string{"version", "extra"}, []string{"pcqc version: takes no arguments"}},
	}
	for _, c := range bad {
		status, stdout, stderr := runPCQC(t, c.args...)
		checkOneLine(t, c.args, status, stderr, c.want...)
		if stdout != "" {
			t.Errorf("%q: stdout %q", c.args, stdout)
		}
	}
}
