package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"testing"
)

// summaryChecks is the part of every summary.json that the command tests
// read; embed it in a struct that adds the command's own section.
type summaryChecks struct {
	Verdict string `json:"verdict"`
	Checks  []struct {
		ID, Status, Message string
	} `json:"checks"`
}

// status returns the status of check id, or "absent".
func (s summaryChecks) status(id string) string {
	for _, c := range s.Checks {
		if c.ID == id {
			return c.Status
		}
	}
	return "absent"
}

// message returns the message of check id, or "".
func (s summaryChecks) message(id string) string {
	for _, c := range s.Checks {
		if c.ID == id {
			return c.Message
		}
	}
	return ""
}

// readSummaryFile decodes dir/summary.json into a T.
func readSummaryFile[T any](t *testing.T, dir string) T {
	t.Helper()
	var s T
	b, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	return s
}
