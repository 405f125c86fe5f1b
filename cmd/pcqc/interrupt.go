package main

import (
	"fmt"
	"io"
	"os"
	"os/signal"
	"sync"
	"syscall"

	"pcqc/outdir"
)

// The output folder being written, so that an interrupt can remove it.
var (
	activeMu  sync.Mutex
	activeOut *outdir.Output
)

func setActiveOutput(o *outdir.Output) {
	activeMu.Lock()
	activeOut = o
	activeMu.Unlock()
}

// abortActiveOutput removes the output being written, if any.
func abortActiveOutput() {
	activeMu.Lock()
	defer activeMu.Unlock()
	if activeOut != nil {
		activeOut.Abort()
	}
}

// handleInterrupts makes SIGINT, SIGTERM and SIGHUP (a closed terminal) remove the output being written
// (its temporary folder; a folder already renamed into place is complete
// and stays) and exit with the conventional status 128 + signal number. It
// returns a function that stops the handling.
func handleInterrupts(stderr io.Writer) func() {
	sigs := make(chan os.Signal, 1)
	signal.Notify(sigs, syscall.SIGINT, syscall.SIGTERM, syscall.SIGHUP)
	done := make(chan struct{})
	go func() {
		select {
		case s := <-sigs:
			abortActiveOutput()
			fmt.Fprintf(stderr, "\npcqc: interrupted (%v); nothing was written\n", s)
			code := 128 + int(s.(syscall.Signal))
			os.Exit(code)
		case <-done:
		}
	}()
	return func() {
		signal.Stop(sigs)
		close(done)
	}
}

// holdWriting is a test hook: with PCQC_TEST_HOLD_WRITING=FILE set, pcqc
// creates FILE once the tables are in the temporary folder and then waits,
// so that a test can interrupt or kill it in the middle of writing.
func holdWriting() {
	path := os.Getenv("PCQC_TEST_HOLD_WRITING")
	if path == "" {
		return
	}
	os.WriteFile(path, []byte("writing\n"), 0o644)
	select {}
}
