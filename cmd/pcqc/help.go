package main

import (
	"fmt"
	"io"
)

var versionCommand = &command{
	name:    "version",
	summary: "print the pcqc version",
	usage:   "pcqc version",
	help:    "Version prints the pcqc version.\n",
	run: func(args []string, stdout, stderr io.Writer) (int, error) {
		if len(args) > 0 {
			return 0, usagef("takes no arguments")
		}
		fmt.Fprintf(stdout, "pcqc %s\n", Version)
		return exitOK, nil
	},
}

var helpCommand = &command{
	name:    "help",
	summary: "show help for pcqc or for one command",
	usage:   "pcqc help [command]",
	help:    "Help shows the list of commands, or the help of one command.\n",
	run: func(args []string, stdout, stderr io.Writer) (int, error) {
		switch len(args) {
		case 0:
			printTopHelp(stdout)
			return exitOK, nil
		case 1:
			c := lookupCommand(args[0])
			if c == nil {
				return 0, usagef("unknown command %q; run 'pcqc help' for the list", args[0])
			}
			printCommandHelp(stdout, c)
			return exitOK, nil
		}
		return 0, usagef("takes at most one command name")
	},
}

func printTopHelp(w io.Writer) {
	fmt.Fprint(w, `pcqc audits a principal component analysis and writes the evidence:
the decomposition with its preprocessing written down, diagnostics with
pass / warn / fail flags, tables and a JSON summary.

Usage:
  pcqc <command> [arguments]

Commands:
`)
	for _, c := range commands {
		fmt.Fprintf(w, "  %-9s %s\n", c.name, c.summary)
	}
	fmt.Fprint(w, "\nRun 'pcqc help <command>' for the flags of a command.\n")
}

func printCommandHelp(w io.Writer, c *command) {
	fmt.Fprintf(w, "usage: %s\n\n%s", c.usage, c.help)
}
