package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
)

var versionCommand = &command{
	name:    "version",
	summary: "print the pcqc version",
	usage:   "pcqc version",
	help:    "Version prints the pcqc version. pcqc --version does the same.\n",
	run: func(args []string, stdout, stderr io.Writer) (int, error) {
		pos, helped, err := parseBare("version", args, stdout)
		if helped || err != nil {
			return exitOK, err
		}
		if len(pos) > 0 {
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
	help:    "Help shows the list of commands, or the help of one command. pcqc -h and\npcqc --help do the same, and so does -h after a command.\n",
	run: func(args []string, stdout, stderr io.Writer) (int, error) {
		pos, helped, err := parseBare("help", args, stdout)
		if helped || err != nil {
			return exitOK, err
		}
		switch len(pos) {
		case 0:
			printTopHelp(stdout)
			return exitOK, nil
		case 1:
			c := lookupCommand(pos[0])
			if c == nil {
				return 0, unknownCommand(pos[0])
			}
			printCommandHelp(stdout, c)
			return exitOK, nil
		}
		return 0, usagef("takes at most one command name")
	},
}

// parseBare parses the arguments of a command that has no flags, so that
// -h gives its help and any other flag is refused as for every command.
func parseBare(name string, args []string, stdout io.Writer) (pos []string, helped bool, err error) {
	pos, err = parseArgs(flag.NewFlagSet(name, flag.ContinueOnError), args)
	if errors.Is(err, flag.ErrHelp) {
		printCommandHelp(stdout, lookupCommand(name))
		return nil, true, nil
	}
	return pos, false, err
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
	fmt.Fprint(w, "\nRun 'pcqc help <command>' (or 'pcqc <command> -h') for the flags of a command,\nand 'pcqc --version' for the version.\n")
}

func printCommandHelp(w io.Writer, c *command) {
	fmt.Fprintf(w, "usage: %s\n\n%s", c.usage, c.help)
}
