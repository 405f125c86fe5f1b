package report

import (
	"regexp"
	"slices"
	"strings"
	"unicode"
	"unicode/utf8"

	"golang.org/x/text/unicode/norm"
)

// A report's reference list is read from its own text: every author–year
// citation the rendered Markdown holds (in check sources, messages, figure
// captions, review findings and the methods) is looked up in the
// bibliography. A list kept by hand beside the text drifts from it, which
// is how works came to be cited but missing from the list.

// citation is one author–year citation found in a text.
type citation struct {
	Text    string   // as written, e.g. "Tracy, Young & Mason (1992)"
	Authors []string // surnames as written, e.g. Tracy, Young, Mason
	EtAl    bool     // written "First et al."
	Years   []string // "Bartlett 1950, 1951" cites two works
}

// Pieces of the citation pattern. A surname is capitalised, may be
// hyphenated (Lorenzo-Seva, Peres-Neto) and may follow particles (van den
// Berg, ten Berge, Vanden Branden). Authors are joined by ", " and a final
// "&" or "and", or abbreviated "et al."; a possessive may follow (Box's
// (1954)); the year stands after a space, in parentheses or not, and
// further years of the same authors follow after ", ".
const (
	citeParticle = `(?:\b(?:van|von|de|den|der|del|ten|ter|du|da|Van|Vanden|Von|De|Del|Du|Da) )*`
	citeSurname  = citeParticle + `\p{Lu}\p{Ll}\p{L}*(?:-\p{Lu}\p{Ll}\p{L}*)?`
	citeYear     = `(?:1[5-9]\d\d|20\d\d)`
	citeAuthors  = `(` + citeSurname + `)( et al\.|(?:, ` + citeSurname + `)*,? (?:&|and) ` + citeSurname + `)?`
)

var (
	citationRE = regexp.MustCompile(citeAuthors + `(?:'s|’s)? \(?(` + citeYear + `(?:, ` + citeYear + `)*)\)?`)
	surnameRE  = regexp.MustCompile(citeSurname)
	yearRE     = regexp.MustCompile(citeYear)
)

// findCitations returns every author–year citation in text, in order.
func findCitations(text string) []citation {
	var out []citation
	for pos := 0; pos < len(text); {
		m := citationRE.FindStringSubmatchIndex(text[pos:])
		if m == nil {
			break
		}
		for i := range m {
			if m[i] >= 0 {
				m[i] += pos
			}
		}
		start, end := m[0], m[1]
		// RE2 has no look-behind: a match must not start or end inside
		// a word ("McBox 1954", "19545"). When it does, look again from
		// the next character, so that a citation inside the rejected
		// match is still found.
		before, _ := utf8.DecodeLastRuneInString(text[:start])
		after, _ := utf8.DecodeRuneInString(text[end:])
		if start > 0 && (unicode.IsLetter(before) || unicode.IsDigit(before)) || end < len(text) && (unicode.IsLetter(after) || unicode.IsDigit(after)) {
			_, size := utf8.DecodeRuneInString(text[start:])
			pos = start + size
			continue
		}
		pos = end
		c := citation{Text: text[start:end], Authors: []string{text[m[2]:m[3]]}}
		if m[4] >= 0 {
			rest := text[m[4]:m[5]]
			if rest == " et al." {
				c.EtAl = true
			} else {
				c.Authors = append(c.Authors, surnameRE.FindAllString(rest, -1)...)
			}
		}
		c.Years = yearRE.FindAllString(text[m[6]:m[7]], -1)
		out = append(out, c)
	}
	return out
}

// Keys returns the bibliography keys the citation names: the folded
// surname of its first author and each year, as the keys are written
// ("van den Berg et al. 2006" is vandenberg2006).
func (c citation) Keys() []string {
	keys := make([]string, len(c.Years))
	for i, y := range c.Years {
		keys[i] = foldName(c.Authors[0]) + y
	}
	return keys
}

// foldName lowercases a name and keeps only its letters, without accents:
// "Šidák" is "sidak", "Lorenzo-Seva" "lorenzoseva".
func foldName(s string) string {
	var b strings.Builder
	for _, r := range norm.NFD.String(s) {
		if unicode.IsLetter(r) && !unicode.Is(unicode.Mn, r) {
			b.WriteRune(unicode.ToLower(r))
		}
	}
	return b.String()
}

// referencesIn returns the bibliography's entries for the works text
// cites, sorted by author and year as an author–year list is. Citations
// of works not in the bibliography are left out here; the tests require
// there are none.
func referencesIn(text string) []Reference {
	seen := map[string]bool{}
	var out []Reference
	for _, c := range findCitations(text) {
		for _, k := range c.Keys() {
			r, ok := bibliography[k]
			if !ok || seen[k] {
				continue
			}
			seen[k] = true
			r.Key = k
			out = append(out, r)
		}
	}
	slices.SortFunc(out, func(a, b Reference) int { return strings.Compare(sortKey(a), sortKey(b)) })
	return out
}

// sortKey orders references by their formatted citation, accents and
// particles aside ("Šidák" among the S, "van den Berg" among the V).
func sortKey(r Reference) string {
	var b strings.Builder
	for _, r := range norm.NFD.String(r.Citation) {
		if !unicode.Is(unicode.Mn, r) {
			b.WriteRune(unicode.ToLower(r))
		}
	}
	return b.String()
}

// renderCiting renders a report twice: once without its reference list,
// to read what the text cites, then with the list of those works.
func renderCiting(render func() ([]byte, error), refs *[]Reference) ([]byte, error) {
	*refs = nil
	md, err := render()
	if err != nil {
		return nil, err
	}
	*refs = referencesIn(string(md))
	if len(*refs) == 0 {
		return md, nil
	}
	return render()
}

// bibAuthors returns the folded surnames of a BibTeX entry's authors, in
// order: "Bj{\"o}rck, {\AA}ke and Golub, Gene H." gives bjorck, golub.
func bibAuthors(bibtex string) []string {
	i := strings.Index(bibtex, "author = {")
	if i < 0 {
		return nil
	}
	s := bibtex[i+len("author = {"):]
	depth := 1
	for j, r := range s {
		switch r {
		case '{':
			depth++
		case '}':
			depth--
		}
		if depth == 0 {
			s = s[:j]
			break
		}
	}
	var out []string
	for _, a := range strings.Split(s, " and ") {
		surname, _, found := strings.Cut(a, ",")
		if !found {
			f := strings.Fields(a)
			surname = f[len(f)-1]
		}
		out = append(out, foldName(latexCommand.ReplaceAllString(surname, "")))
	}
	return out
}

// latexCommand matches the accent commands of BibTeX names (\" \' \v …);
// the letters they accent stay.
var latexCommand = regexp.MustCompile(`\\(?:[a-zA-Z]+|.)`)
