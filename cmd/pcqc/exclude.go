package main

import (
	"flag"

	"pcqc/analysis/intake"
	"pcqc/report"
)

// excludeFlags are the flags that leave samples out of the fit; run and
// demo take them (review and apply do not: review must match another
// person's scores row by row, and apply fits nothing).
type excludeFlags struct {
	ids  string // --exclude ID[,ID…]
	file string // --exclude-file FILE
}

func (e *excludeFlags) register(fs *flag.FlagSet) {
	fs.StringVar(&e.ids, "exclude", "", "")
	fs.StringVar(&e.file, "exclude-file", "", "")
}

// excludeFlagHelp documents them, for `pcqc help run` and `pcqc help demo`.
const excludeFlagHelp = `
Excluding samples:
  --exclude ID,ID     leave these samples (by sample id) out of the fit; they
                      are projected onto the model as apply projects new
                      samples, marked excluded in samples.csv and the plots,
                      and listed in the report and summary.json
  --exclude-file F    the same, one id per line; blank lines and lines
                      starting with # are ignored. Both may be given
`

// entries reads both flags; an unreadable list is an input error naming it.
func (e *excludeFlags) entries() ([]intake.ExcludeEntry, error) {
	out := intake.ExcludeFlagEntries(e.ids)
	if e.file != "" {
		more, err := intake.ReadExcludeFile(e.file)
		if err != nil {
			return nil, err
		}
		out = append(out, more...)
	}
	return out, nil
}

// reads adds the exclusion list to the files the output folder may not hold.
func (e *excludeFlags) reads(reads []string) []string {
	if e.file != "" {
		return append(reads, e.file)
	}
	return reads
}

// resolve turns the flags into rows of t, for analysis.Options.Exclude,
// and the option summary.json records (the ids as given, in order).
func (e *excludeFlags) resolve(t *intake.Table) ([]int, report.Option, error) {
	entries, err := e.entries()
	if err != nil {
		return nil, report.Option{}, err
	}
	ids := []string{}
	for _, en := range entries {
		ids = append(ids, en.ID)
	}
	opt := report.Option{Name: "exclude", Value: ids}
	if len(entries) == 0 {
		return nil, opt, nil
	}
	rows, err := intake.ResolveExclusions(t, entries)
	return rows, opt, err
}
