package analysis

import (
	"strings"
	"testing"

	"pcqc/analysis/intake"
)

// read reads a table given as text, failing the test on an error.
func read(t *testing.T, text string, opt intake.ReadOptions) *intake.Table {
	t.Helper()
	tab, err := intake.ReadTableFrom("t.csv", strings.NewReader(text), opt)
	if err != nil {
		t.Fatalf("read: %v", err)
	}
	return tab
}
