package intake

import (
	"bytes"
	"fmt"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"
)

// ExcludeFile is a list of sample ids to leave out (--exclude-file). It is
// read whole, so it is capped: 64 MiB holds millions of ids.
var ExcludeFile = FileKind{What: "the exclusion list", Max: 64 << 20}

// ExcludeEntry is one sample id the user asked to leave out, with where it
// was written so that an unknown id can be named by its position.
type ExcludeEntry struct {
	ID   string
	File string // "" for the --exclude flag
	Line int    // 1-based line in File
}

// ExcludeFlagEntries reads the value of --exclude: ids separated by commas.
func ExcludeFlagEntries(value string) []ExcludeEntry {
	var out []ExcludeEntry
	for _, p := range strings.Split(value, ",") {
		if p = strings.TrimSpace(p); p != "" {
			out = append(out, ExcludeEntry{ID: p})
		}
	}
	return out
}

// ReadExcludeFile reads an exclusion list: one sample id per line, with
// surrounding spaces trimmed; blank lines and lines whose first non-space
// character is # are ignored. A # later in a line is part of the id, since
// ids may hold one. The text must be UTF-8 (a byte-order mark is skipped).
func ReadExcludeFile(path string) ([]ExcludeEntry, error) {
	b, err := ReadRegular(path, ExcludeFile)
	if err != nil {
		return nil, err
	}
	b = bytes.TrimPrefix(b, []byte("\xef\xbb\xbf"))
	var out []ExcludeEntry
	for i, line := range strings.Split(string(b), "\n") {
		if !utf8.ValidString(line) {
			return nil, &InputError{File: path, Line: i + 1, Text: line, Reason: "the exclusion list is not UTF-8 text:"}
		}
		id := strings.TrimSpace(line)
		if id == "" || strings.HasPrefix(id, "#") {
			continue
		}
		out = append(out, ExcludeEntry{ID: id, File: path, Line: i + 1})
	}
	return out, nil
}

// ResolveExclusions returns the rows of t whose ids the entries name,
// ascending. An id held by several rows excludes them all. Ids that no row
// holds are an input error listing them all, placed at the first one's
// line when they come from a file; so is an exclusion that leaves fewer
// than three samples, the fewest a PCA needs.
func ResolveExclusions(t *Table, entries []ExcludeEntry) ([]int, error) {
	rows := map[string][]int{}
	for i, id := range t.IDs {
		rows[id] = append(rows[id], i)
	}
	var unknown []ExcludeEntry
	seen := map[string]bool{}
	var out []int
	for _, e := range entries {
		if seen[e.ID] {
			continue
		}
		seen[e.ID] = true
		r, ok := rows[e.ID]
		if !ok {
			unknown = append(unknown, e)
			continue
		}
		out = append(out, r...)
	}
	column := "the row numbers used as sample ids"
	if t.IDColumn != "" {
		column = "the id column " + strconv.Quote(t.IDColumn)
	}
	if len(unknown) > 0 {
		quoted := make([]string, len(unknown))
		for i, e := range unknown {
			quoted[i] = strconv.Quote(e.ID)
		}
		file, what := t.File, "--exclude names"
		if unknown[0].File != "" {
			file, what = unknown[0].File, "the exclusion list names"
			column += " of " + t.File
		}
		noun := "a sample id"
		if len(unknown) > 1 {
			noun = fmt.Sprintf("%d sample ids", len(unknown))
		}
		return nil, &InputError{File: file, Line: unknown[0].Line,
			Reason: fmt.Sprintf("%s %s not in %s: %s", what, noun, column, strings.Join(quoted, ", "))}
	}
	slices.Sort(out)
	if left := t.Rows() - len(out); left < 3 {
		return nil, &InputError{File: t.File, Reason: fmt.Sprintf("excluding %d samples leaves %d, and a PCA needs at least 3", len(out), left)}
	}
	return out, nil
}
