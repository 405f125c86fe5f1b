package main

import (
	"flag"
	"io"
	"path/filepath"

	"pcqc/analysis"
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
                      percentages (which one is detected and reported)
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

` + auditFlagHelp,
	run: runReview,
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
		f.out = analysis.StemName(data) + "-review"
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
	t, err := analysis.ReadTable(data, read)
	if err != nil {
		return 0, err
	}
	lt, err := analysis.ReadLooseTable(loadingsPath, read.Encoding)
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
		st, err := analysis.ReadLooseTable(scoresPath, read.Encoding)
		if err != nil {
			return 0, err
		}
		if scores, err = analysis.ParseScores(st, t.IDs, k); err != nil {
			return 0, err
		}
	}
	var variance *analysis.TheirVariance
	if variancePath != "" {
		vt, err := analysis.ReadLooseTable(variancePath, read.Encoding)
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
