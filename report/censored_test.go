package report

import (
	"fmt"
	"reflect"
	"strings"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
)

// Every substituted cell is named by sample and variable in summary.json,
// censored.csv and the report, with the text as written and the number
// used; the methods say what was done and cite it. USArrests (testdata
// /datasets) with Arizona's Murder written <8.1 (read as 4.05 = 8.1/2),
// Delaware's Rape <15.8 (7.9) and Alabama's Assault >236 (kept at 236).
func TestCensoredCellsListed(t *testing.T) {
	text := withLimits(withLimits(usarrestsCSV(t), "<", [2]int{2, 0}, [2]int{7, 3}), ">", [2]int{0, 1})
	tab := readCSV(t, "usarrests.csv", text, intake.ReadOptions{IDColumn: "state", Censored: intake.CensorHalf})
	a := auditOf(analyze(t, tab, analysis.Options{Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}}))

	want := &CensoredInfo{Policy: "half", Below: 2, Above: 1, Cells: []CensoredCellInfo{
		{Sample: "Alabama", Variable: "Assault", Line: 2, Column: 3, AsWritten: ">236", ValueUsed: 236, Side: "above"},
		{Sample: "Arizona", Variable: "Murder", Line: 4, Column: 2, AsWritten: "<8.1", ValueUsed: 4.05, Side: "below"},
		{Sample: "Delaware", Variable: "Rape", Line: 9, Column: 5, AsWritten: "<15.8", ValueUsed: 7.9, Side: "below"},
	}}
	if got := BuildSummary(a, testMeta).Input.Censored; !reflect.DeepEqual(got, want) {
		t.Errorf("summary: %+v, want %+v", got, want)
	}
	rows := CensoredRows(a.Result.Table)
	if len(rows) != 4 || strings.Join(rows[2], ",") != "Arizona,Murder,4,2,<8.1,4.05,below" {
		t.Errorf("censored.csv rows %q", rows)
	}
	md := renderAudit(t, a)
	for _, frag := range []string{
		"2 cells below a limit, replaced by half the limit; 1 cell above a limit, kept at the limit (--censored half), before any transform",
		"| Murder | 1 | 0 | 2.0 % |",
		"| Arizona | Murder |",
		"| 4.05 |",
		"Of the cells written as a limit, 2 reported below a detection limit were replaced by half the limit (Hornung & Reed 1990; Croghan & Egeghy 2003), and 1 reported above a limit was kept at the limit, before any transform.",
	} {
		if !strings.Contains(md, frag) {
			t.Errorf("report lacks %q", frag)
		}
	}
	if strings.Contains(md, "censored.csv and summary.json hold all") {
		t.Error("three cells are all listed, yet the report points elsewhere")
	}

	// Without limits the report says nothing of them.
	plain := renderAudit(t, auditOf(analyze(t, readCSV(t, "usarrests.csv", usarrestsCSV(t), intake.ReadOptions{IDColumn: "state"}),
		analysis.Options{Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}})))
	if strings.Contains(plain, "Cells written as a limit") || strings.Contains(plain, "Hornung") {
		t.Error("a report without limits mentions them")
	}
}

// Past maxCensoredRows cells the report lists the first ones and points to
// the files that hold all of them.
func TestCensoredListTruncated(t *testing.T) {
	var cells [][2]int
	for i := 0; i < 25; i++ {
		cells = append(cells, [2]int{2 * i, i % 4})
	}
	text := withLimits(usarrestsCSV(t), "<", cells...)
	tab := readCSV(t, "usarrests.csv", text, intake.ReadOptions{IDColumn: "state", Censored: intake.CensorSqrt2})
	b := censoredBlock(tab)
	if len(b.Cells) != maxCensoredRows || b.Note != fmt.Sprintf("The first %d of 25 cells written as a limit are listed; censored.csv and summary.json hold all of them.", maxCensoredRows) {
		t.Errorf("%d cells listed, note %q", len(b.Cells), b.Note)
	}
	if len(b.Counts) != 4 || b.Counts[0][1] != "7" {
		t.Errorf("counts %q", b.Counts)
	}
}
