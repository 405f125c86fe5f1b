package main

import (
	"errors"
	"flag"
	"fmt"
	"sort"
	"strconv"
	"strings"

	"pcqc/analysis"
	"pcqc/analysis/intake"
)

// pcqc's own flag errors. The flag package's messages ("flag provided but
// not defined: -nosuch", `invalid value "abc" for flag -seed: parse
// error`) name the flag with one dash, give no allowed values and no way
// forward. checkFlags walks the arguments the way the flag package will,
// before it does, and refuses the first flag it would refuse with one
// sentence naming the flag, what it takes and, for an unknown flag, the
// known flag closest to it.

// flagValues says what each flag takes, for the messages. Flags not listed
// are described by their type.
var flagValues = map[string]string{
	"out":           "a folder",
	"id":            "a column name",
	"group":         "a column name",
	"columns":       "column names, comma-separated",
	"drop":          "column names, comma-separated",
	"exclude":       "sample ids, comma-separated",
	"exclude-file":  "a file",
	"missing":       "one of fail, drop, mean",
	"censored":      "one of " + joinNames(intake.CensorPolicies),
	"delim":         "one of auto, ',', ';', tab",
	"decimal":       "one of point, comma",
	"encoding":      "one of utf-8, latin1, cp1252",
	"skip":          "a whole number of lines, 0 or more",
	"comment":       "one character, such as #",
	"thousands":     "one of ',', '.', space, \"'\"",
	"transform":     "one of " + joinNames(intake.Transforms),
	"scale":         "one of " + joinNames(analysis.Scalings),
	"claimed-scale": "one of " + joinNames(analysis.Scalings),
	"components":    "N, auto, parallel, broken-stick, cv, kaiser or variance:F",
	"permutations":  "a whole number, 0 or more",
	"bootstrap":     "a whole number, 0 or more",
	"seed":          "a whole number from 0 to 18446744073709551615",
	"threads":       "a whole number, 0 for all cores",
	"fail-on":       "one of fail, warn, never",
	"format":        "md, pdf, html (comma-separated) or none",
	"title":         "a text",
	"author":        "a text",
	"date":          "a date, YYYY-MM-DD",
	"loadings":      "a file",
	"scores":        "a file",
	"variance":      "a file",
}

func joinNames[T ~string](names []T) string {
	s := make([]string, len(names))
	for i, n := range names {
		s[i] = string(n)
	}
	return strings.Join(s, ", ")
}

// flagKind is what a flag's value must parse as.
type flagKind int

const (
	kindString flagKind = iota
	kindBool
	kindInt
	kindUint
)

func kindOf(fl *flag.Flag) flagKind {
	if b, ok := fl.Value.(interface{ IsBoolFlag() bool }); ok && b.IsBoolFlag() {
		return kindBool
	}
	if g, ok := fl.Value.(flag.Getter); ok {
		switch g.Get().(type) {
		case int, int64:
			return kindInt
		case uint, uint64:
			return kindUint
		}
	}
	return kindString
}

// wants says what the flag takes, in words.
func wants(fl *flag.Flag) string {
	if s, ok := flagValues[fl.Name]; ok {
		return s
	}
	switch kindOf(fl) {
	case kindBool:
		return "no value, or true or false"
	case kindInt:
		return "a whole number"
	case kindUint:
		return "a whole number, 0 or more"
	}
	return "a value"
}

// checkFlags returns pcqc's message for the first flag in args that the
// flag package would refuse, or nil. It follows the package's rules: a
// flag is -name or --name, with its value after = or, except for on/off
// flags, as the next argument; anything else is a positional argument
// (parseArgs lets flags and positional arguments mix); -h and -help ask
// for help.
func checkFlags(fs *flag.FlagSet, args []string) error {
	for i := 0; i < len(args); i++ {
		s := args[i]
		if len(s) < 2 || s[0] != '-' {
			continue
		}
		name := strings.TrimPrefix(s[1:], "-")
		if name == "" && s == "--" {
			return nil // the rest is positional
		}
		if name == "" || name[0] == '-' || name[0] == '=' {
			return usagef("malformed flag %q: write --name or --name=value", s)
		}
		value, hasValue := "", false
		if eq := strings.IndexByte(name, '='); eq >= 0 {
			name, value, hasValue = name[:eq], name[eq+1:], true
		}
		fl := fs.Lookup(name)
		if fl == nil {
			if name == "h" || name == "help" {
				return nil // the flag package reports flag.ErrHelp
			}
			return unknownFlag(fs, name)
		}
		kind := kindOf(fl)
		if kind == kindBool {
			if hasValue {
				if _, err := strconv.ParseBool(value); err != nil {
					return usagef("invalid --%s=%s: --%s is on or off; write --%s, or --%s=false", name, value, name, name, name)
				}
			}
			continue
		}
		if !hasValue {
			if i+1 >= len(args) {
				return usagef("--%s needs a value: %s", name, wants(fl))
			}
			i++
			value = args[i]
		}
		if ok, why := checkValue(kind, value); !ok {
			return usagef("invalid --%s %q: %s--%s takes %s", name, value, why, name, wants(fl))
		}
	}
	return nil
}

// checkValue reports whether value is a number of the kind, and if not,
// why when the reason is not plain ("too large; "). The bases are the flag
// package's: decimal, or 0x, 0o, 0b prefixed.
func checkValue(kind flagKind, value string) (ok bool, why string) {
	var err error
	switch kind {
	case kindInt:
		_, err = strconv.ParseInt(value, 0, strconv.IntSize)
	case kindUint:
		if strings.HasPrefix(strings.TrimSpace(value), "-") {
			return false, "negative; "
		}
		_, err = strconv.ParseUint(value, 0, 64)
	}
	if errors.Is(err, strconv.ErrRange) {
		return false, "too large; "
	}
	return err == nil, ""
}

// unknownFlag names the unknown flag and the command's closest flag.
func unknownFlag(fs *flag.FlagSet, name string) error {
	cmd := fs.Name()
	var names []string
	fs.VisitAll(func(fl *flag.Flag) { names = append(names, fl.Name) })
	if len(names) == 0 {
		return usagef("unknown flag --%s: %s takes no flags", name, cmd)
	}
	if near := closest(name, names); near != "" {
		return usagef("unknown flag --%s; did you mean --%s? See 'pcqc help %s' for its flags", name, near, cmd)
	}
	return usagef("unknown flag --%s; see 'pcqc help %s' for its flags", name, cmd)
}

// closest returns the known name nearest to name, or "" when none is near
// enough to be a likely slip: within an edit distance of a third of the
// longer name (at least 1; letter case and _ for - count nothing), or the
// only known name that the given one begins (at least 3 letters).
func closest(name string, known []string) string {
	key := func(s string) string { return strings.ReplaceAll(strings.ToLower(s), "_", "-") }
	k := key(name)
	sorted := append([]string(nil), known...)
	sort.Strings(sorted)
	best, bestDist := "", -1
	var prefixed []string
	for _, n := range sorted {
		if len(k) >= 3 && strings.HasPrefix(n, k) {
			prefixed = append(prefixed, n)
		}
		d := editDistance(k, key(n))
		if bestDist < 0 || d < bestDist {
			best, bestDist = n, d
		}
	}
	if bestDist >= 0 && bestDist <= max(1, max(len(k), len(best))/3) {
		return best
	}
	if len(prefixed) == 1 {
		return prefixed[0]
	}
	return ""
}

// editDistance is the optimal-string-alignment distance between a and b,
// counted in runes: the fewest insertions, deletions, substitutions and
// swaps of two neighbours that turn one into the other. Swaps count once
// because they are the commonest slip of the fingers ("hlep").
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	d := make([][]int, len(ra)+1)
	for i := range d {
		d[i] = make([]int, len(rb)+1)
		d[i][0] = i
	}
	for j := range d[0] {
		d[0][j] = j
	}
	for i := 1; i <= len(ra); i++ {
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			d[i][j] = min(d[i-1][j]+1, d[i][j-1]+1, d[i-1][j-1]+cost)
			if i > 1 && j > 1 && ra[i-1] == rb[j-2] && ra[i-2] == rb[j-1] {
				d[i][j] = min(d[i][j], d[i-2][j-2]+1)
			}
		}
	}
	return d[len(ra)][len(rb)]
}

// commandNames lists the commands, for messages.
func commandNames() []string {
	names := make([]string, len(commands))
	for i, c := range commands {
		names[i] = c.name
	}
	return names
}

// unknownCommand names the closest command, or lists them all.
func unknownCommand(name string) error {
	if near := closest(name, commandNames()); near != "" {
		return usagef("unknown command %q; did you mean %s? Run 'pcqc help' for the list", name, near)
	}
	return usagef("unknown command %q; the commands are %s", name, strings.Join(commandNames(), ", "))
}

// flagError is the fallback for a refusal checkFlags did not foresee: the
// flag package's own words, with its one-dash spelling made pcqc's.
func flagError(err error) error {
	return usagef("%s", strings.Replace(fmt.Sprint(err), " -", " --", 1))
}
