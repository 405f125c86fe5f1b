package report

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"

	"pcqc/analysis"
	"pcqc/checks"
)

// CompareRun is a comparison of two audits and its check results.
type CompareRun struct {
	Cmp    *analysis.AuditComparison
	Checks []checks.Result
}

// CompareSummary is summary.json of pcqc compare.
type CompareSummary struct {
	Tool       ToolInfo          `json:"tool"`
	Audits     [2]CompareAudit   `json:"audits"`
	Options    Options           `json:"options"`
	Variables  CompareVariables  `json:"variables"`
	Pairs      []ComparePairInfo `json:"pairs"`
	UnpairedA  []string          `json:"unpaired_a"`
	UnpairedB  []string          `json:"unpaired_b"`
	AnglesDeg  []Number          `json:"principal_angles_deg"`
	CheckPairs []CompareCheck    `json:"check_statuses"`
	Checks     []checks.Result   `json:"checks"`
	Verdict    checks.Status     `json:"verdict"`
}

// CompareAudit identifies one of the audits compared.
type CompareAudit struct {
	Folder   string `json:"folder"`
	File     string `json:"file"`
	SHA256   string `json:"sha256"`
	Rows     int    `json:"rows"`
	Retained int    `json:"retained"`
	Version  string `json:"pcqc_version"`
	Verdict  string `json:"verdict"`
}

type CompareVariables struct {
	Common []string `json:"common"`
	OnlyA  []string `json:"only_a"`
	OnlyB  []string `json:"only_b"`
}

// ComparePairInfo is one pair of components in summary.json.
type ComparePairInfo struct {
	A           string         `json:"component_a"`
	B           string         `json:"component_b"`
	Congruence  Number         `json:"congruence"`
	Sign        int            `json:"sign_b"`
	EigenA      Number         `json:"eigenvalue_a"`
	EigenB      Number         `json:"eigenvalue_b"`
	EigenDiff   Number         `json:"eigenvalue_difference"`
	PercentA    Number         `json:"percent_a"`
	PercentB    Number         `json:"percent_b"`
	PercentDiff Number         `json:"percent_difference"`
	IntervalsA  *PairIntervals `json:"intervals_a"`
	IntervalsB  *PairIntervals `json:"intervals_b"`
	Largest     []LoadingDiff  `json:"largest_loading_differences"`
}

// PairIntervals are an audit's bootstrap 95 % intervals for a component.
type PairIntervals struct {
	EigenLow    Number `json:"eigenvalue_low"`
	EigenHigh   Number `json:"eigenvalue_high"`
	PercentLow  Number `json:"percent_low"`
	PercentHigh Number `json:"percent_high"`
}

type LoadingDiff struct {
	Variable string `json:"variable"`
	A        Number `json:"loading_a"`
	B        Number `json:"loading_b"`
	Diff     Number `json:"difference"`
}

type CompareCheck struct {
	ID      string `json:"id"`
	A       string `json:"status_a"`
	B       string `json:"status_b"`
	Changed bool   `json:"changed"`
}

func pairIntervals(iv analysis.SavedInterval) *PairIntervals {
	if math.IsNaN(iv.Low) && math.IsNaN(iv.High) {
		return nil
	}
	return &PairIntervals{Number(iv.Low), Number(iv.High), Number(iv.PercentLow), Number(iv.PercentHigh)}
}

func componentNames(idx []int) []string {
	out := []string{}
	for _, a := range idx {
		out = append(out, componentName(a))
	}
	return out
}

// BuildCompareSummary fills summary.json of a comparison.
func BuildCompareSummary(run CompareRun, meta Meta) CompareSummary {
	c := run.Cmp
	audit := func(a *analysis.SavedAudit) CompareAudit {
		m := a.Model
		return CompareAudit{Folder: a.Dir, File: m.Input.File, SHA256: m.Input.SHA256, Rows: m.Input.Rows, Retained: m.Retained, Version: m.Tool.Version, Verdict: a.Verdict}
	}
	s := CompareSummary{
		Tool:      ToolInfo{Name: "pcqc", Version: meta.Version},
		Audits:    [2]CompareAudit{audit(c.A), audit(c.B)},
		Options:   meta.Options,
		Variables: CompareVariables{Common: nonNil(c.Common), OnlyA: nonNil(c.OnlyA), OnlyB: nonNil(c.OnlyB)},
		Pairs:     []ComparePairInfo{},
		UnpairedA: componentNames(c.UnpairedA), UnpairedB: componentNames(c.UnpairedB),
		AnglesDeg: numbers(c.Angles),
		Checks:    jsonChecks(run.Checks),
		Verdict:   checks.Verdict(run.Checks),
	}
	for _, p := range c.Pairs {
		info := ComparePairInfo{A: componentName(p.A), B: componentName(p.B), Congruence: Number(p.Congruence), Sign: int(p.Sign),
			EigenA: Number(p.EigenA), EigenB: Number(p.EigenB), EigenDiff: Number(p.EigenB - p.EigenA),
			PercentA: Number(p.PercentA), PercentB: Number(p.PercentB), PercentDiff: Number(p.PercentB - p.PercentA),
			IntervalsA: pairIntervals(p.IntervalA), IntervalsB: pairIntervals(p.IntervalB)}
		for _, d := range p.Largest {
			info.Largest = append(info.Largest, LoadingDiff{d.Variable, Number(d.A), Number(d.B), Number(d.Diff)})
		}
		s.Pairs = append(s.Pairs, info)
	}
	for _, k := range c.Checks {
		s.CheckPairs = append(s.CheckPairs, CompareCheck{k.ID, k.A, k.B, k.Changed})
	}
	return s
}

func nonNil(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}

// WriteCompareTables writes summary.json and the tables of a comparison:
// compare-pairs.csv, compare-congruence.csv (every component of A against
// every component of B), compare-angles.csv, compare-loadings.csv (every
// common variable on every pair), compare-variables.csv and
// compare-checks.csv.
func WriteCompareTables(dir string, run CompareRun, meta Meta) error {
	c := run.Cmp
	join := func(name string) string { return filepath.Join(dir, name) }
	pairs := [][]string{{"component_a", "component_b", "congruence", "sign_b", "eigenvalue_a", "eigenvalue_b", "eigenvalue_difference",
		"eigenvalue_a_low", "eigenvalue_a_high", "eigenvalue_b_low", "eigenvalue_b_high",
		"percent_a", "percent_b", "percent_difference", "percent_a_low", "percent_a_high", "percent_b_low", "percent_b_high"}}
	for _, p := range c.Pairs {
		pairs = append(pairs, []string{componentName(p.A), componentName(p.B), num(p.Congruence), fmt.Sprint(int(p.Sign)),
			num(p.EigenA), num(p.EigenB), num(p.EigenB - p.EigenA),
			num(p.IntervalA.Low), num(p.IntervalA.High), num(p.IntervalB.Low), num(p.IntervalB.High),
			num(p.PercentA), num(p.PercentB), num(p.PercentB - p.PercentA),
			num(p.IntervalA.PercentLow), num(p.IntervalA.PercentHigh), num(p.IntervalB.PercentLow), num(p.IntervalB.PercentHigh)})
	}
	cong := [][]string{{"component_a"}}
	for b := 0; b < c.B.Model.Retained; b++ {
		cong[0] = append(cong[0], componentName(b)+"_b")
	}
	for a, row := range c.Congruence {
		line := []string{componentName(a)}
		for _, x := range row {
			line = append(line, num(x))
		}
		cong = append(cong, line)
	}
	angles := [][]string{{"angle", "degrees"}}
	for i, x := range c.Angles {
		angles = append(angles, []string{fmt.Sprint(i + 1), num(x)})
	}
	loads := [][]string{{"variable", "component_a", "component_b", "loading_a", "loading_b_aligned", "difference"}}
	for _, p := range c.Pairs {
		for r, v := range c.Common {
			x := c.A.Model.Loadings[c.RowA[r]][p.A]
			y := p.Sign * c.B.Model.Loadings[c.RowB[r]][p.B]
			loads = append(loads, []string{v, componentName(p.A), componentName(p.B), num(x), num(y), num(y - x)})
		}
	}
	vars := [][]string{{"variable", "in_a", "in_b"}}
	for _, v := range c.Common {
		vars = append(vars, []string{v, "true", "true"})
	}
	for _, v := range c.OnlyA {
		vars = append(vars, []string{v, "true", "false"})
	}
	for _, v := range c.OnlyB {
		vars = append(vars, []string{v, "false", "true"})
	}
	chk := [][]string{{"id", "title", "status_a", "status_b", "changed"}}
	for _, k := range c.Checks {
		chk = append(chk, []string{k.ID, k.Title, k.A, k.B, fmt.Sprint(k.Changed)})
	}
	for _, f := range []struct {
		name string
		rows [][]string
	}{{"compare-pairs.csv", pairs}, {"compare-congruence.csv", cong}, {"compare-angles.csv", angles},
		{"compare-loadings.csv", loads}, {"compare-variables.csv", vars}, {"compare-checks.csv", chk}} {
		if err := writeCSV(join(f.name), f.rows); err != nil {
			return err
		}
	}
	return writeJSON(join("summary.json"), BuildCompareSummary(run, meta))
}

// CompareDocument is what templates/compare.md.tmpl places.
type CompareDocument struct {
	Title, Author, Date, Version string
	Invented                     string
	Verdict                      VerdictBlock
	Checks                       []CheckRow
	AuditHeader                  []string
	AuditRows                    [][]string
	Variables                    string
	OnlyA, OnlyB                 string
	PairHeader                   []string
	PairRows                     [][]string
	Unpaired                     string
	Angles                       string
	LoadingHeader                []string
	LoadingRows                  [][]string
	StatusHeader                 []string
	StatusRows                   [][]string
	StatusNote                   string
	Methods                      string
	References                   []Reference
	Command                      string
	Options                      [][2]string
	Cautions                     []string

	footerFile, footerHash string
}

func (d *CompareDocument) page() Page {
	return Page{Title: d.Title, Author: d.Author, Date: d.Date, Version: d.Version, File: d.footerFile, SHA256: d.footerHash}
}

// footerIdentity names both inputs in the page footer, which has room for
// one file and 12 characters of hash: the two file names, and the first
// five characters of each hash.
func footerIdentity(a, b *analysis.Model) (file, hash string) {
	five := func(h string) string { return h[:min(5, len(h))] }
	return filepath.Base(a.Input.File) + " vs " + filepath.Base(b.Input.File), five(a.Input.SHA256) + "/" + five(b.Input.SHA256)
}

// interval formats a bootstrap interval, or a dash without one.
func interval(low, high float64) string {
	if !isFinite(low) || !isFinite(high) {
		return "–"
	}
	return "[" + g4(low) + ", " + g4(high) + "]"
}

// BuildCompareDocument fills the report of a comparison.
func BuildCompareDocument(run CompareRun, meta Meta, opt ReportOptions) *CompareDocument {
	c := run.Cmp
	d := &CompareDocument{Title: opt.Title, Author: opt.Author, Date: opt.Date, Version: meta.Version, Invented: opt.Invented,
		Command: shellQuote(meta.Command), Options: optionRows(meta.Options)}
	if d.Title == "" {
		d.Title = "Comparison of the audits of " + filepath.Base(c.A.Model.Input.File) + " and " + filepath.Base(c.B.Model.Input.File)
	}
	d.Verdict, d.Checks = verdictBlock(run.Checks)
	d.footerFile, d.footerHash = footerIdentity(c.A.Model, c.B.Model)
	d.AuditHeader = []string{"", "Folder", "Data", "SHA-256", "Samples", "Retained", "Verdict"}
	for i, a := range []*analysis.SavedAudit{c.A, c.B} {
		m := a.Model
		d.AuditRows = append(d.AuditRows, []string{string(rune('A' + i)), a.Dir, m.Input.File, m.Input.SHA256[:min(12, len(m.Input.SHA256))] + "…",
			fmt.Sprint(m.Input.Rows), fmt.Sprint(m.Retained), a.Verdict})
	}
	d.Variables = fmt.Sprintf("%d variables in common", len(c.Common))
	d.OnlyA, d.OnlyB = strings.Join(c.OnlyA, ", "), strings.Join(c.OnlyB, ", ")
	d.PairHeader = []string{"A", "B", "Congruence", "Eigenvalue A", "Eigenvalue B", "Difference", "% A", "% B", "Difference (points)"}
	for _, p := range c.Pairs {
		sign := ""
		if p.Sign < 0 {
			sign = " (sign flipped)"
		}
		d.PairRows = append(d.PairRows, []string{componentName(p.A), componentName(p.B) + sign, fmt.Sprintf("%.4f", p.Congruence),
			g4(p.EigenA) + " " + interval(p.IntervalA.Low, p.IntervalA.High), g4(p.EigenB) + " " + interval(p.IntervalB.Low, p.IntervalB.High), fmt.Sprintf("%+.4g", p.EigenB-p.EigenA),
			fmt.Sprintf("%.2f", p.PercentA) + " " + interval(p.IntervalA.PercentLow, p.IntervalA.PercentHigh),
			fmt.Sprintf("%.2f", p.PercentB) + " " + interval(p.IntervalB.PercentLow, p.IntervalB.PercentHigh), fmt.Sprintf("%+.2f", p.PercentB-p.PercentA)})
		for _, l := range p.Largest {
			d.LoadingRows = append(d.LoadingRows, []string{componentName(p.A) + "–" + componentName(p.B), l.Variable, fmt.Sprintf("%+.3f", l.A), fmt.Sprintf("%+.3f", l.B), fmt.Sprintf("%+.3f", l.Diff)})
		}
	}
	d.LoadingHeader = []string{"Pair", "Variable", "Loading A", "Loading B", "B − A"}
	var unpaired []string
	for _, a := range c.UnpairedA {
		unpaired = append(unpaired, "A's "+componentName(a))
	}
	for _, b := range c.UnpairedB {
		unpaired = append(unpaired, "B's "+componentName(b))
	}
	d.Unpaired = strings.Join(unpaired, ", ")
	if len(c.Angles) > 0 {
		parts := make([]string, len(c.Angles))
		for i, x := range c.Angles {
			parts[i] = fmt.Sprintf("%.3g°", x)
		}
		d.Angles = strings.Join(parts, ", ")
	}
	d.StatusHeader = []string{"Check", "A", "B", "Changed"}
	changed := 0
	for _, k := range c.Checks {
		mark := ""
		if k.Changed {
			mark = "changed"
			changed++
		}
		d.StatusRows = append(d.StatusRows, []string{k.ID, orDash(k.A), orDash(k.B), mark})
	}
	d.StatusNote = fmt.Sprintf("%d of %d checks changed status.", changed, len(c.Checks))
	d.Cautions = []string{
		"Two audits that agree do not make either correct; two that differ say only that the structure changed, not why.",
		"Components are compared over the variables both audits hold; components fitted with other variables may differ for that reason alone.",
		regulationCaution,
	}
	d.Methods = compareMethods(run, meta)
	return d
}

func orDash(s string) string {
	if s == "" {
		return "–"
	}
	return s
}

func compareMethods(run CompareRun, meta Meta) string {
	c := run.Cmp
	var b strings.Builder
	fmt.Fprintf(&b, "pcqc %s compared two audits read from their folders (model.json and summary.json): A, of %s, and B, of %s.", meta.Version, c.A.Model.Input.File, c.B.Model.Input.File)
	fmt.Fprintf(&b, " Variables were matched by name. Over the %d common variables, every retained component of A was compared with every one of B by Tucker's congruence coefficient φ (Tucker 1951), and the components were paired to maximise the total |φ| by the Hungarian method (Kuhn 1955), not one pair at a time; B's loadings were given the sign of their partners in A.", len(c.Common))
	b.WriteString(" The principal angles between the two retained subspaces were computed from the singular values of the product of orthonormal bases, small angles from their sines (Björck & Golub 1973).")
	b.WriteString(" A pair counts as the same component when its angle, arccos φ, is within the sum of both audits' bootstrap angles (arccos of each audit's 5th percentile of bootstrap congruence), or when φ is above 0.85 without bootstraps (Lorenzo-Seva & ten Berge 2006); the subspaces agree when the largest principal angle is within the sum of both audits' 95th percentiles of the bootstrap subspace angle. Both angles are metrics, so the sums bound the distance between two samples of one structure.")
	return b.String()
}

// WriteCompareReport writes the report of a comparison.
func WriteCompareReport(dir string, run CompareRun, meta Meta, opt ReportOptions, formats Formats) error {
	if !formats.Any() {
		return nil
	}
	d := BuildCompareDocument(run, meta, opt)
	md, err := renderCiting(func() ([]byte, error) { return renderTemplate("compare.md.tmpl", d) }, &d.References)
	if err != nil {
		return err
	}
	if err := writeRenderings(dir, md, nil, d.page(), formats); err != nil {
		return err
	}
	return os.WriteFile(filepath.Join(dir, "references.bib"), BibTeX(d.References), 0o644)
}
