package report

import (
	"go/ast"
	"go/parser"
	"go/token"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
)

func TestFindCitations(t *testing.T) {
	type cite struct {
		authors string // surnames joined by "|"
		etAl    bool
		years   string // joined by "|"
	}
	cases := []struct {
		text string
		want []cite
	}{
		{"analysis (Jolliffe & Cadima 2016) was", []cite{{"Jolliffe|Cadima", false, "2016"}}},
		{"limits of Tracy, Young & Mason (1992) for", []cite{{"Tracy|Young|Mason", false, "1992"}}},
		{"(Tracy et al. 1992; 7.7 at 95 %)", []cite{{"Tracy", true, "1992"}}},
		{"Box's (1954) χ² approximation", []cite{{"Box", false, "1954"}}},
		{"with Šidák's (1967) correction", []cite{{"Šidák", false, "1967"}}},
		{"(Bartlett 1950, 1951; χ² = 3)", []cite{{"Bartlett", false, "1950|1951"}}},
		{"(van den Berg et al. 2006)", []cite{{"van den Berg", true, "2006"}}},
		{"thresholds of Lorenzo-Seva & ten Berge (2006), 0.95", []cite{{"Lorenzo-Seva|ten Berge", false, "2006"}}},
		{"matching after Hubert, Rousseeuw & Vanden Branden 2005)", []cite{{"Hubert|Rousseeuw|Vanden Branden", false, "2005"}}},
		{"North, Bell, Cahalan and Moeng (1982) and Horn 1965", []cite{{"North|Bell|Cahalan|Moeng", false, "1982"}, {"Horn", false, "1965"}}},
		{"parallel analysis (Horn 1965; 2000 permutations)", []cite{{"Horn", false, "1965"}}},
		{"Clopper–Pearson bounds (Clopper & Pearson 1934)", []cite{{"Clopper|Pearson", false, "1934"}}},
		// Not citations: a seed, a date, a lowercase word, a number
		// glued to a word, a year inside a longer number.
		{"Random streams were seeded with 1999.", nil},
		{"**Date:** 2026-01-02 · pcqc 0.1.0", nil},
		{"samples 2005 and ABox 1954 and Box 19545", nil},
	}
	for _, c := range cases {
		var got []cite
		for _, f := range findCitations(c.text) {
			got = append(got, cite{strings.Join(f.Authors, "|"), f.EtAl, strings.Join(f.Years, "|")})
		}
		if !slices.Equal(got, c.want) {
			t.Errorf("%q: found %+v, want %+v", c.text, got, c.want)
		}
	}
}

// citationProblem says what is wrong with a citation of bibliography key
// k, or "": the key must exist and the authors named must be the entry's
// (all of them, in order, or the first and "et al." for three or more).
func citationProblem(c citation, k string) string {
	ref, ok := bibliography[k]
	if !ok {
		return "cites a work missing from the bibliography"
	}
	bib := bibAuthors(ref.BibTeX)
	var named []string
	for _, a := range c.Authors {
		named = append(named, foldName(a))
	}
	switch {
	case c.EtAl && len(bib) < 3:
		return "writes “et al.” for a work of " + strconv.Itoa(len(bib)) + " authors"
	case c.EtAl && bib[0] != named[0]:
		return "names another first author than the bibliography's " + k
	case !c.EtAl && !slices.Equal(bib, named):
		return "names other authors than the bibliography's " + k + " (" + strings.Join(bib, ", ") + ")"
	}
	return ""
}

// referencesHeading starts the reference list in every report template.
const referencesHeading = "### References\n"

// citationProblems checks a rendered Markdown report: every author–year
// citation outside its reference list names a work of the bibliography,
// with the right authors, that the list holds; and every work the list
// holds is cited. It returns one line per problem.
func citationProblems(md string) []string {
	var problems []string
	body, list := md, ""
	if i := strings.Index(md, referencesHeading); i >= 0 {
		rest := md[i+len(referencesHeading):]
		end := strings.Index(rest, "\n## ")
		if end < 0 {
			end = len(rest)
		}
		body, list = md[:i]+rest[end:], rest[:end]
	}
	listed := map[string]bool{}
	for _, line := range strings.Split(list, "\n") {
		item, ok := strings.CutPrefix(line, "- ")
		if !ok {
			continue
		}
		item = strings.ReplaceAll(item, `\`, "") // Markdown escapes
		key := ""
		for k, r := range bibliography {
			if r.Citation == item {
				key = k
			}
		}
		if key == "" {
			problems = append(problems, "listed but not in the bibliography: "+item)
			continue
		}
		listed[key] = true
	}
	cited := map[string]bool{}
	for _, c := range findCitations(body) {
		for _, k := range c.Keys() {
			cited[k] = true
			if p := citationProblem(c, k); p != "" {
				problems = append(problems, "“"+c.Text+"” "+p)
			} else if !listed[k] {
				problems = append(problems, "“"+c.Text+"” is cited but not in the reference list")
			}
		}
	}
	for k := range listed {
		if !cited[k] {
			problems = append(problems, "listed but cited nowhere: "+k)
		}
	}
	slices.Sort(problems)
	return problems
}

// The checker finds each kind of fault, so that the report tests that use
// it can fail.
func TestCitationProblemsFindsFaults(t *testing.T) {
	list := func(keys ...string) string {
		s := referencesHeading + "\n"
		for _, k := range keys {
			s += "- " + escapeMarkdown(bibliography[k].Citation) + "\n"
		}
		return s + "\n## Reproduce\n"
	}
	cases := []struct {
		name, md string
		want     []string // substrings, one per expected problem
	}{
		{"clean", "Limits after Tracy, Young & Mason (1992) and Box (1954).\n\n" + list("tracy1992", "box1954"), nil},
		{"cited but not listed", "Screened with Hotelling's T² (Hotelling 1931) and Box (1954).\n\n" + list("box1954"), []string{"“Hotelling 1931)” is cited but not in the reference list"}},
		{"not in the bibliography", "As in Smith & Jones (1999).\n\n" + list(), []string{"missing from the bibliography"}},
		{"listed but not cited", "Box (1954).\n\n" + list("box1954", "gorsuch1983"), []string{"listed but cited nowhere: gorsuch1983"}},
		{"wrong co-author", "After Tracy & Young (1992).\n\n" + list("tracy1992"), []string{"names other authors"}},
		{"et al. for two authors", "After Jackson et al. (1979).\n\n" + list("jackson1979"), []string{"“et al.” for a work of 2 authors"}},
		{"no list at all", "Principal component analysis (Jolliffe & Cadima 2016).", []string{"not in the reference list"}},
	}
	for _, c := range cases {
		got := citationProblems(c.md)
		if len(got) != len(c.want) {
			t.Errorf("%s: problems %q, want %d", c.name, got, len(c.want))
			continue
		}
		for i, w := range c.want {
			if !strings.Contains(got[i], w) {
				t.Errorf("%s: problem %q does not say %q", c.name, got[i], w)
			}
		}
	}
}

// Every bibliography entry is consistent: its key is its first author's
// folded surname and its year, its formatted citation and its BibTeX
// agree on authors and year, and its BibTeX braces balance.
func TestBibliographyEntries(t *testing.T) {
	yearField := regexp.MustCompile(`year = \{(\d{4})\}`)
	for k, r := range bibliography {
		if !strings.HasPrefix(r.BibTeX, "@") || !strings.Contains(r.BibTeX, "{"+k+", ") {
			t.Errorf("%s: BibTeX entry not keyed %s", k, k)
		}
		if strings.Count(r.BibTeX, "{") != strings.Count(r.BibTeX, "}") {
			t.Errorf("%s: unbalanced braces in BibTeX", k)
		}
		m := yearField.FindStringSubmatch(r.BibTeX)
		if m == nil {
			t.Errorf("%s: no year in BibTeX", k)
			continue
		}
		authors := bibAuthors(r.BibTeX)
		if len(authors) == 0 || k != authors[0]+m[1] {
			t.Errorf("%s: key is not first author + year (%v, %s)", k, authors, m[1])
		}
		if !strings.Contains(r.Citation, "("+m[1]+")") {
			t.Errorf("%s: citation %q lacks the year (%s)", k, r.Citation, m[1])
		}
		// The formatted citation names the same surnames, in order.
		head, _, _ := strings.Cut(r.Citation, " ("+m[1]+")")
		at := 0
		folded := foldName(head)
		for _, a := range authors {
			i := strings.Index(folded[at:], a)
			if i < 0 {
				t.Errorf("%s: citation %q does not name %s where the BibTeX does", k, r.Citation, a)
				break
			}
			at += i + len(a)
		}
	}
}

// Every citation written in pcqc's code that can reach a report — check
// sources and messages, captions, methods, review notes, analysis text —
// names a work of the bibliography with the right authors. The rendered
// reports below cover the common paths; this covers the rare ones (Box's
// approximation, a borderline component, a review's failure message).
func TestEveryCitationInCodeIsInBibliography(t *testing.T) {
	skip := map[string]bool{}
	for _, r := range bibliography {
		skip[r.Citation], skip[r.BibTeX] = true, true
	}
	fset := token.NewFileSet()
	found := 0
	for _, dir := range []string{"../analysis", "../checks", "."} {
		files, err := filepath.Glob(filepath.Join(dir, "*.go"))
		if err != nil {
			t.Fatal(err)
		}
		for _, path := range files {
			if strings.HasSuffix(path, "_test.go") {
				continue
			}
			src, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			f, err := parser.ParseFile(fset, path, src, 0)
			if err != nil {
				t.Fatal(err)
			}
			ast.Inspect(f, func(n ast.Node) bool {
				lit, ok := n.(*ast.BasicLit)
				if !ok || lit.Kind != token.STRING {
					return true
				}
				s, err := strconv.Unquote(lit.Value)
				if err != nil || skip[s] {
					return true
				}
				for _, c := range findCitations(s) {
					for _, k := range c.Keys() {
						found++
						if p := citationProblem(c, k); p != "" {
							t.Errorf("%s: “%s” %s", fset.Position(lit.Pos()), c.Text, p)
						}
					}
				}
				return true
			})
		}
	}
	if found < 40 {
		t.Errorf("only %d citations found in the code: is the pattern still matching?", found)
	}
}
