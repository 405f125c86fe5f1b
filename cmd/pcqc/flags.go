package main

import (
	"errors"
	"flag"
	"io"
	"os"
	"slices"
	"strconv"
	"strings"
	"time"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
	"pcqc/outdir"
	"pcqc/report"
)

// auditFlags are the flags shared by every subcommand that audits data (run
// and demo), so that they mean the same everywhere.
type auditFlags struct {
	out          string
	force        bool
	id           string
	group        string
	columns      string
	drop         string
	missing      string
	censored     string
	delim        string
	decimal      string
	encoding     string
	skip         int
	comment      string
	unitsRow     bool
	thousands    string
	sheet        string
	transform    string
	scale        string
	components   string
	permutations int
	bootstrap    int
	quiet        bool
	seed         uint64
	threads      int
	failOn       string
	format       string
	title        string
	author       string
	date         string

	exclude excludeFlags // run and demo only (see exclude.go)

	set map[string]bool // flags given on the command line
}

func (f *auditFlags) register(fs *flag.FlagSet, defaultOut string) {
	fs.StringVar(&f.out, "out", defaultOut, "")
	fs.BoolVar(&f.force, "force", false, "")
	fs.StringVar(&f.id, "id", "", "")
	fs.StringVar(&f.group, "group", "", "")
	fs.StringVar(&f.columns, "columns", "", "")
	fs.StringVar(&f.drop, "drop", "", "")
	fs.StringVar(&f.missing, "missing", string(intake.MissingFail), "")
	fs.StringVar(&f.censored, "censored", string(intake.CensorFail), "")
	fs.StringVar(&f.delim, "delim", "auto", "")
	fs.StringVar(&f.decimal, "decimal", "point", "")
	fs.StringVar(&f.encoding, "encoding", string(intake.EncodingUTF8), "")
	fs.IntVar(&f.skip, "skip", 0, "")
	fs.StringVar(&f.comment, "comment", "", "")
	fs.BoolVar(&f.unitsRow, "units-row", false, "")
	fs.StringVar(&f.thousands, "thousands", "", "")
	fs.StringVar(&f.sheet, "sheet", "", "")
	fs.StringVar(&f.transform, "transform", string(intake.TransformNone), "")
	fs.StringVar(&f.scale, "scale", string(analysis.ScaleUnit), "")
	fs.StringVar(&f.components, "components", analysis.DefaultComponentRule.String(), "")
	fs.IntVar(&f.permutations, "permutations", analysis.DefaultPermutations, "")
	fs.IntVar(&f.bootstrap, "bootstrap", analysis.DefaultBootstrap, "")
	fs.BoolVar(&f.quiet, "quiet", false, "")
	fs.Uint64Var(&f.seed, "seed", analysis.DefaultSeed, "")
	fs.IntVar(&f.threads, "threads", 0, "")
	fs.StringVar(&f.failOn, "fail-on", string(checks.Fail), "")
	fs.StringVar(&f.format, "format", "md,pdf,html", "")
	fs.StringVar(&f.title, "title", "", "")
	fs.StringVar(&f.author, "author", "", "")
	fs.StringVar(&f.date, "date", "", "")
}

// auditFlagHelp documents the shared flags, for `pcqc help run`.
const auditFlagHelp = `Input:
  --id COL            sample-id column (default: the first column if it is not
                      numeric, otherwise the 1-based data-row numbers)
  --group COL         label column used to colour plots; never a variable
  --columns a,b,c     analyse only these variables
  --drop a,b          leave these columns out
  --missing POLICY    fail | drop | mean | iterative (default fail). fail stops
                      at the first missing cell; drop removes rows with a
                      missing cell; mean replaces a missing cell by its
                      column's mean (after the transform), so it sits at zero
                      after centring; iterative imputes missing cells by
                      regularised iterative PCA (Josse & Husson 2012), with
                      the number of components chosen by cross-validation
                      Missing cells are empty, NA, N/A, #N/A, NaN or null.
  --censored POLICY   fail | half | sqrt2 (default fail): cells written as a
                      limit, <0.05 or >2000. fail stops at the first; half
                      reads <L as L/2, sqrt2 as L/√2 (Hornung & Reed 1990);
                      >L is kept at L. Applied before --transform; every
                      such cell is listed in the report and summary.json
  --delim D           auto | , | ; | tab (default auto: detected from the header)
  --decimal MARK      point | comma (default point); comma reads 3,14 in
                      semicolon- or tab-separated files
  --encoding ENC      utf-8 | latin1 | cp1252 (default utf-8): the text
                      encoding of the data (and of review's tables); latin1
                      and cp1252 (Windows-1252) are converted to UTF-8 as
                      they are read. Text that is not UTF-8 is refused
                      without it
  --skip N            leave out the first N lines of the file (a title or an
                      instrument's preamble), whatever they hold
  --comment CHAR      leave out every line that starts with CHAR (such as #),
                      before the header and among the rows
  --units-row         the row under the header holds units (mg/L, [°C]); they
                      label the variable table, the figures and summary.json
  --thousands SEP     , | . | space | ' : remove this digit-group separator
                      from numbers in groups of three (1,234,567); anything
                      else holding it is refused. Not the decimal mark
  --sheet NAME|N      the worksheet of an .xlsx workbook to read, by name or
                      number from 1 (default: the first sheet)

Preprocessing (centring is always done):
  --transform T       none | log | log10 | log1p (default none)
  --scale S           unit | pareto | range | none (default unit: divide by the
                      sample standard deviation, n−1)

Components:
  --components RULE   N | auto | parallel | broken-stick | cv | kaiser |
                      variance:F (default auto = parallel analysis). cv is
                      element-wise 7-fold cross-validation (PRESS);
                      variance:0.8 keeps the fewest components reaching 80 %
                      of the variance; kaiser (λ > 1) needs --scale unit
  --permutations P    the most column-wise permutations parallel analysis may
                      run (default 2000; 0 turns it off). They run in batches
                      of 100 and stop once every keep/drop decision is
                      settled; a decision unsettled at P is reported as
                      borderline and not counted

Stability:
  --bootstrap B       bootstrap resamples of the whole pipeline for loading
                      stability (default 500; 0 turns it off)
  --seed S            seed of every random stream (default 1)
  --threads T         worker threads (default: all cores); results do not
                      depend on it
  --quiet             no progress bar (it is shown only on a terminal)

Report:
  --format LIST       md, pdf, html, comma-separated, or none (default
                      md,pdf,html); none writes the tables only
  --title TEXT        report title (default: from the input name)
  --author TEXT       author named in the report
  --date YYYY-MM-DD   report date (default: from SOURCE_DATE_EPOCH, else today)

Exit status:
  --fail-on LEVEL     fail | warn | never (default fail): exit status 1 when any
                      check reaches LEVEL; the outputs are written either way

Output:
  --out DIR           output folder
  --force             replace an existing, non-empty output folder that pcqc
                      wrote (it holds pcqc's stamp, .pcqc-output.json, and
                      nothing else); a folder holding anything else, the
                      current or home folder, and any folder holding an
                      input file are refused whatever the flags
`

// layoutOptions reads the flags about the layout of the text around the
// table: --skip, --comment, --units-row and --thousands. The conflicts
// that depend on the file (a comment character that is its delimiter) are
// refused by intake, which knows the delimiter.
func (f *auditFlags) layoutOptions(opt *intake.ReadOptions) error {
	if f.skip < 0 {
		return usagef("invalid --skip %d: give the number of lines before the header, 0 or more", f.skip)
	}
	opt.Skip, opt.UnitsRow = f.skip, f.unitsRow
	if f.comment != "" {
		if len(f.comment) != 1 {
			return usagef("invalid --comment %q: give one character, such as #", f.comment)
		}
		opt.Comment = f.comment[0]
	}
	switch f.thousands {
	case "":
	case ",", "comma":
		opt.Thousands = ','
	case ".", "point":
		opt.Thousands = '.'
	case "space", " ":
		opt.Thousands = ' '
	case "'", "apostrophe":
		opt.Thousands = '\''
	default:
		return usagef("invalid --thousands %q: use ',', '.', space or \"'\"", f.thousands)
	}
	return nil
}

// splitList reads a comma-separated flag value.
func splitList(s string) []string {
	var out []string
	for _, p := range strings.Split(s, ",") {
		if p = strings.TrimSpace(p); p != "" {
			out = append(out, p)
		}
	}
	return out
}

func oneOf[T ~string](flagName, value string, allowed []T) (T, error) {
	for _, a := range allowed {
		if string(a) == value {
			return a, nil
		}
	}
	names := make([]string, len(allowed))
	for i, a := range allowed {
		names[i] = string(a)
	}
	return "", usagef("invalid --%s %q: use one of %s", flagName, value, strings.Join(names, ", "))
}

func (f *auditFlags) readOptions() (intake.ReadOptions, error) {
	var opt intake.ReadOptions
	var err error
	switch f.delim {
	case "auto", "":
	case ",", "comma":
		opt.Delimiter = ','
	case ";", "semicolon":
		opt.Delimiter = ';'
	case "tab", "\\t", "\t":
		opt.Delimiter = '\t'
	default:
		return opt, usagef("invalid --delim %q: use auto, ',', ';' or tab", f.delim)
	}
	switch f.decimal {
	case "point", ".":
		opt.Decimal = '.'
	case "comma", ",":
		opt.Decimal = ','
	default:
		return opt, usagef("invalid --decimal %q: use point or comma", f.decimal)
	}
	if err := f.layoutOptions(&opt); err != nil {
		return opt, err
	}
	enc, ok := intake.ParseEncoding(f.encoding)
	if !ok {
		return opt, usagef("invalid --encoding %q: use utf-8, latin1 or cp1252", f.encoding)
	}
	opt.Encoding = enc
	opt.Sheet = f.sheet
	opt.IDColumn, opt.GroupColumn = f.id, f.group
	opt.Columns, opt.Drop = splitList(f.columns), splitList(f.drop)
	if opt.Missing, err = oneOf("missing", f.missing, []intake.MissingPolicy{intake.MissingFail, intake.MissingDrop, intake.MissingMean, intake.MissingIterative}); err != nil {
		return opt, err
	}
	if opt.Censored, err = oneOf("censored", f.censored, intake.CensorPolicies); err != nil {
		return opt, err
	}
	if opt.Transform, err = oneOf("transform", f.transform, intake.Transforms); err != nil {
		return opt, err
	}
	return opt, nil
}

func (f *auditFlags) analysisOptions() (analysis.Options, error) {
	var opt analysis.Options
	var err error
	if opt.Scaling, err = oneOf("scale", f.scale, analysis.Scalings); err != nil {
		return opt, err
	}
	if opt.Components, err = analysis.ParseComponentRule(f.components); err != nil {
		return opt, usagef("%v", err)
	}
	if f.permutations < 0 {
		return opt, usagef("invalid --permutations %d: use 0 or more", f.permutations)
	}
	if f.permutations == 0 && opt.Components.Kind == analysis.RuleParallel {
		return opt, usagef("--components %s needs permutations: give --permutations > 0 or another rule", opt.Components)
	}
	if f.bootstrap < 0 {
		return opt, usagef("invalid --bootstrap %d: use 0 or more", f.bootstrap)
	}
	if f.threads < 0 {
		return opt, usagef("invalid --threads %d: use 1 or more, or 0 for all cores", f.threads)
	}
	opt.Permutations, opt.Bootstrap, opt.Seed, opt.Threads = f.permutations, f.bootstrap, f.seed, f.threads
	return opt, nil
}

// reportOptions returns the report's formats and options. The date comes
// from --date, else from SOURCE_DATE_EPOCH (reproducible builds'
// convention), else today's date.
func (f *auditFlags) reportOptions(now time.Time) (report.Formats, report.ReportOptions, error) {
	formats, err := report.ParseFormats(f.format)
	if err != nil {
		return formats, report.ReportOptions{}, usagef("%v", err)
	}
	opt := report.ReportOptions{Title: f.title, Author: f.author, Date: f.date}
	if opt.Date == "" {
		if epoch := os.Getenv("SOURCE_DATE_EPOCH"); epoch != "" {
			secs, err := strconv.ParseInt(epoch, 10, 64)
			if err != nil {
				return formats, opt, usagef("invalid SOURCE_DATE_EPOCH %q: want seconds since 1970", epoch)
			}
			now = time.Unix(secs, 0)
		}
		opt.Date = now.UTC().Format("2006-01-02")
	} else if _, err := time.Parse("2006-01-02", opt.Date); err != nil {
		return formats, opt, usagef("invalid --date %q: use YYYY-MM-DD", opt.Date)
	}
	return formats, opt, nil
}

// failLevel returns the status at which the exit status becomes 1, or ""
// for never.
func (f *auditFlags) failLevel() (checks.Status, error) {
	switch f.failOn {
	case "fail":
		return checks.Fail, nil
	case "warn":
		return checks.Warn, nil
	case "never":
		return "", nil
	}
	return "", usagef("invalid --fail-on %q: use fail, warn or never", f.failOn)
}

// effective lists every option with the value in force, defaults included,
// in the order of the help text. Options that cannot change any result are
// left out, so that runs differing only in them write identical summaries:
// --out and --force (where the folder goes), --threads (results do not
// depend on it) and --quiet. read is the input options actually used
// (the demo sets its own id and group columns).
func (f *auditFlags) effective(read intake.ReadOptions, t *intake.Table) report.Options {
	list := func(s []string) []string {
		if s == nil {
			return []string{}
		}
		return s
	}
	delim := "auto"
	if f.delim != "auto" && f.delim != "" {
		delim = f.delim
	}
	return report.Options{
		{Name: "id", Value: t.IDColumn},
		{Name: "group", Value: t.GroupColumn},
		{Name: "columns", Value: list(read.Columns)},
		{Name: "drop", Value: list(read.Drop)},
		{Name: "missing", Value: string(read.Missing)},
		{Name: "censored", Value: string(read.Censored)},
		{Name: "delim", Value: delim},
		{Name: "delim_used", Value: delimUsed(t)},
		{Name: "sheet", Value: t.Sheet},
		{Name: "decimal", Value: f.decimal},
		{Name: "encoding", Value: string(read.Encoding)},
		{Name: "skip", Value: read.Skip},
		{Name: "comment", Value: f.comment},
		{Name: "units_row", Value: read.UnitsRow},
		{Name: "thousands", Value: f.thousands},
		{Name: "transform", Value: string(read.Transform)},
		{Name: "scale", Value: f.scale},
		{Name: "center", Value: true},
		{Name: "components", Value: f.components},
		{Name: "permutations", Value: f.permutations},
		{Name: "bootstrap", Value: f.bootstrap},
		{Name: "seed", Value: f.seed},
		{Name: "fail_on", Value: f.failOn},
		{Name: "format", Value: f.format},
		{Name: "title", Value: f.title},
		{Name: "author", Value: f.author},
		{Name: "date", Value: f.date},
	}
}

// outputOptions says how the output folder may be written.
func (f *auditFlags) outputOptions(reads []string) outdir.Options {
	return outdir.Options{Force: f.force, Reads: reads, Version: Version}
}

// beginOutput starts writing the output folder, after checking it once
// more, and registers it for removal on an interrupt or an internal error.
func (f *auditFlags) beginOutput(reads []string) (*outdir.Output, error) {
	out, err := outdir.Begin(f.out, f.outputOptions(reads))
	var refused *outdir.RefusedError
	if errors.As(err, &refused) {
		return nil, err
	}
	if err != nil {
		return nil, &outputError{err}
	}
	setActiveOutput(out)
	return out, nil
}

// parseArgs parses flags that may appear before, between or after the
// positional arguments (`pcqc run data.csv --scale none`), the way users
// type them. Everything after "--" is positional.
func parseArgs(fs *flag.FlagSet, args []string) ([]string, error) {
	fs.SetOutput(io.Discard)
	var rest []string
	if i := slices.Index(args, "--"); i >= 0 {
		args, rest = args[:i], args[i+1:]
	}
	// pcqc's own messages for flags the flag package would refuse.
	if err := checkFlags(fs, args); err != nil {
		return nil, err
	}
	var positional []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				return nil, err
			}
			return nil, flagError(err)
		}
		args = fs.Args()
		if len(args) == 0 {
			break
		}
		positional = append(positional, args[0])
		args = args[1:]
	}
	return append(positional, rest...), nil
}

// markSet records which flags were given explicitly.
func markSet(fs *flag.FlagSet) map[string]bool {
	set := map[string]bool{}
	fs.Visit(func(fl *flag.Flag) { set[fl.Name] = true })
	return set
}

func requireArgs(cmd string, args []string, n int, what string) error {
	if len(args) != n {
		return usagef("expects %s (got %d argument%s); see 'pcqc help %s'", what, len(args), plural(len(args)), cmd)
	}
	return nil
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// parseCommand parses a command's flags and its nArgs positional arguments
// (what names them in the error). When -h is given it prints the help and
// reports helped.
func parseCommand(name string, fs *flag.FlagSet, f *auditFlags, args []string, nArgs int, what string, stdout io.Writer) (pos []string, helped bool, err error) {
	pos, err = parseArgs(fs, args)
	if errors.Is(err, flag.ErrHelp) {
		printCommandHelp(stdout, lookupCommand(name))
		return nil, true, nil
	}
	if err != nil {
		return nil, false, err
	}
	if err := requireArgs(name, pos, nArgs, what); err != nil {
		return nil, false, err
	}
	f.set = markSet(fs)
	return pos, false, nil
}

// validate checks every flag value, and that the output folder may be
// written, before any work is done; it returns the input options. reads
// are the files the command reads, which the output folder may not hold.
func (f *auditFlags) validate(reads ...string) (intake.ReadOptions, error) {
	read, err := f.readOptions()
	if err != nil {
		return read, err
	}
	if _, err := f.analysisOptions(); err != nil {
		return read, err
	}
	if _, err := f.failLevel(); err != nil {
		return read, err
	}
	if _, _, err := f.reportOptions(time.Now()); err != nil {
		return read, err
	}
	if err := outdir.Check(f.out, f.outputOptions(reads)); err != nil {
		return read, err
	}
	return read, nil
}

// delimUsed is the field separator the table was read with; a spreadsheet
// has none.
func delimUsed(t *intake.Table) string {
	if t.Delimiter == 0 {
		return ""
	}
	return string(t.Delimiter)
}
