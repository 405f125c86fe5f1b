package main

import (
	"bytes"
	"strings"
	"testing"
)

func TestProgressBarDrawsAndFinishesLines(t *testing.T) {
	var b bytes.Buffer
	p := &progressBar{w: &b}
	p.update("bootstrap", 1, 4)
	p.update("bootstrap", 2, 4) // within 100 ms of the last draw: skipped
	p.update("bootstrap", 4, 4) // the last one is always drawn
	out := b.String()
	if !strings.Contains(out, "bootstrap") || !strings.Contains(out, "1/4") || !strings.HasSuffix(out, "4/4\n") || strings.Contains(out, "2/4") {
		t.Errorf("progress output %q", out)
	}
	// Not a terminal: no progress at all.
	if newProgress(&b, false) != nil {
		t.Error("progress bar on a non-terminal writer")
	}
}
