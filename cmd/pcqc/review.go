package main

import (
	"flag"
	"io"
	"path/filepath"
	"strings"

	"pcqc/analysis"
	"pcqc/analysis/intake"
)

var reviewCommand = &command{
	name:    "review",
	summary: "check another person's PCA against the raw data",
	usage:   "pcqc review DATA --loadings FILE [--scores FILE] [--variance FILE] [--claimed-scale S] [flags]",
	help: `Review reads the raw DATA and another person's PCA results, and says whether
those results follow from the data, and if not, why.

  --loadings FILE     their loadings (required): variables as rows and
                      components as columns, or the transpose (found by
                      matching variable names to the data's columns);
                      component columns may have any names
  --scores FILE       their scores; matched to samples by id when a column
                      holds the sample ids, otherwise by row order
  --variance FILE     their eigenvalues, standard deviations, proportions or
                      percentages: a column (R's write.csv, pandas, a bare
                      numpy column) or a row (R's summary importance).
                      Which of the four they are is read from the header,
                      else from their sum (1 or 100), else from the
                      recomputation, and the report says which and why
  --claimed-scale S   the scaling the methods claim: unit, pareto, range or none

The analysis is recomputed under each plausible preprocessing (centred or
not × no, unit, Pareto or range scaling, after --transform), and the one their
loadings match best is found by the largest principal angle between their
retained subspace and ours. Review checks (ids review-*) report what is wrong
in sentences a reviewer can paste; the report opens with them and goes on
with the full audit of the recomputed analysis (centred, with the best
matching scaling unless --scale is given, and their number of components
unless --components is given).

The output folder defaults to <DATA name>-review.

` + reviewFlagHelp(),
	run: runReview,
}

// reviewDefaults are the flags whose defaults differ in review: what the
// shared help says of run would mislead here.
var reviewDefaults = []struct{ flag, text string }{
	{"scale", `  --scale S           unit | pareto | range | none (default: the scaling
                      their loadings match best, named in the findings)
`},
	{"components", `  --components RULE   N | auto | parallel | broken-stick | cv | kaiser |
                      variance:F (default: their number of components, the
                      columns of --loadings)
`},
	{"permutations", `  --permutations P    the most permutations parallel analysis may run, when
                      --components auto or parallel is given (default 2000;
                      0 turns it off, which review's default rule never
                      needs)
`},
	{"out", `  --out DIR           output folder (default <DATA name>-review)
`},
}

// reviewFlagHelp is the shared flag help with review's own defaults in
// place of run's. A flag whose entry is not found is listed at the end,
// so that a change to the shared text cannot drop review's defaults.
func reviewFlagHelp() string {
	text := auditFlagHelp
	var missing []string
	for _, d := range reviewDefaults {
		var ok bool
		if text, ok = replaceFlagEntry(text, d.flag, d.text); !ok {
			missing = append(missing, d.text)
		}
	}
	if len(missing) > 0 {
		text += "\nDefaults in review:\n" + strings.Join(missing, "")
	}
	return text
}

// replaceFlagEntry replaces the entry of --name in a flag help text: its
// first line and the indented lines that continue it.
func replaceFlagEntry(text, name, entry string) (string, bool) {
	lines := strings.SplitAfter(text, "\n")
	for i, l := range lines {
		if !strings.HasPrefix(l, "  --"+name+" ") {
			continue
		}
		end := i + 1
		for end < len(lines) && strings.HasPrefix(lines[end], "                ") {
			end++
		}
		return strings.Join(lines[:i], "") + entry + strings.Join(lines[end:], ""), true
	}
	return text, false
}

func runReview(args []string, stdout, stderr io.Writer) (int, error) {
	fs := flag.NewFlagSet("review", flag.ContinueOnError)
	var f auditFlags
	f.register(fs, "")
	var loadingsPath, scoresPath, variancePath, claimed string
	fs.StringVar(&loadingsPath, "loadings", "", "")
	fs.StringVar(&scoresPath, "scores", "", "")
	fs.StringVar(&variancePath, "variance", "", "")
	fs.StringVar(&claimed, "claimed-scale", "", "")
	pos, helped, err := parseCommand("review", fs, &f, args, 1, "one data file", stdout)
	if helped || err != nil {
		return exitOK, err
	}
	if loadingsPath == "" {
		return 0, usagef("needs --loadings FILE (their loadings); see 'pcqc help review'")
	}
	var claimedScale analysis.Scaling
	if claimed != "" {
		if claimedScale, err = oneOf("claimed-scale", claimed, analysis.Scalings); err != nil {
			return 0, err
		}
	}
	data := pos[0]
	if f.out == "" {
		f.out = intake.StemName(data) + "-review"
	}
	if !f.set["components"] {
		// Review keeps their number of components unless told otherwise;
		// it is known once their loadings are read (below). Until then a
		// fixed rule stands in, so that validation does not hold review to
		// parallel analysis, the default of run, and refuse
		// --permutations 0.
		f.components = analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 1}.String()
	}
	reads := []string{data, loadingsPath, scoresPath, variancePath}
	read, err := f.validate(reads...)
	if err != nil {
		return 0, err
	}
	t, err := intake.ReadTable(data, read)
	if err != nil {
		return 0, err
	}
	lt, err := intake.ReadLooseTable(loadingsPath, read.Encoding)
	if err != nil {
		return 0, err
	}
	loadings, err := analysis.ParseLoadings(lt, t.Variables)
	if err != nil {
		return 0, err
	}
	t = t.Subset(loadings.Variables)
	_, k := loadings.V.Dims()
	var scores *analysis.TheirScores
	if scoresPath != "" {
		st, err := intake.ReadLooseTable(scoresPath, read.Encoding)
		if err != nil {
			return 0, err
		}
		if scores, err = analysis.ParseScores(st, t.IDs, k); err != nil {
			return 0, err
		}
	}
	var variance *analysis.TheirVariance
	if variancePath != "" {
		vt, err := intake.ReadLooseTable(variancePath, read.Encoding)
		if err != nil {
			return 0, err
		}
		if variance, err = analysis.ParseVariance(vt); err != nil {
			return 0, err
		}
	}
	rv, err := analysis.CompareReview(t, loadings, scores, variance, claimedScale)
	if err != nil {
		return 0, err
	}
	best := rv.Variants[rv.Best]
	adjust := func(o *analysis.Options) {
		if !f.set["scale"] {
			o.Scaling = best.Scaling
		}
		if !f.set["components"] {
			o.Components = analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: k}
		}
	}
	if !f.set["scale"] {
		f.scale = string(best.Scaling)
	}
	if !f.set["components"] {
		f.components = analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: k}.String()
	}
	return runAudit(auditJob{
		flags:   &f,
		read:    read,
		table:   t,
		command: append([]string{"pcqc", "review"}, args...),
		reads:   reads,
		review:  rv,
		adjust:  adjust,
		title:   "Review of a PCA of " + filepath.Base(data),
	}, stdout, stderr)
}
