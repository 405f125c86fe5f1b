package main

import (
	"crypto/sha256"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestMain lets the tests run pcqc as a separate process: with PCQC_ARGS set
// (a JSON array), the test binary is pcqc.
func TestMain(m *testing.M) {
	if args := os.Getenv("PCQC_ARGS"); args != "" {
		var list []string
		if err := json.Unmarshal([]byte(args), &list); err != nil {
			os.Exit(99)
		}
		os.Exit(runProcess(list))
	}
	os.Exit(m.Run())
}

// startPCQC starts pcqc as a child process that holds still once its tables
// are written, and waits until it does.
func startPCQC(t *testing.T, hold string, args ...string) *exec.Cmd {
	t.Helper()
	js, _ := json.Marshal(args)
	cmd := exec.Command(os.Args[0])
	cmd.Env = append(os.Environ(), "PCQC_ARGS="+string(js), "PCQC_TEST_HOLD_WRITING="+hold)
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	deadline := time.Now().Add(60 * time.Second)
	for {
		if _, err := os.Stat(hold); err == nil {
			return cmd
		}
		if time.Now().After(deadline) {
			cmd.Process.Kill()
			t.Fatal("pcqc never reached the writing stage")
		}
		time.Sleep(20 * time.Millisecond)
	}
}

func tempFolders(t *testing.T, dir string) []string {
	t.Helper()
	found, _ := filepath.Glob(filepath.Join(dir, ".*.pcqc-tmp-*"))
	return found
}

func fileHash(t *testing.T, path string) [32]byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return sha256.Sum256(b)
}

// An interrupted run leaves no partial output folder and no temporary
// folder, and never touches its input.
func TestInterruptLeavesNothing(t *testing.T) {
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM, syscall.SIGHUP} {
		t.Run(sig.String(), func(t *testing.T) {
			dir := t.TempDir()
			data := filepath.Join(dir, "input.csv")
			src, _ := os.ReadFile(usarrestsPath)
			os.WriteFile(data, src, 0o644)
			before := fileHash(t, data)
			out := filepath.Join(dir, "result")
			cmd := startPCQC(t, filepath.Join(dir, "hold"), "run", data, "--out", out, "--bootstrap", "20", "--format", "none")
			cmd.Process.Signal(sig)
			err := cmd.Wait()
			ee, ok := err.(*exec.ExitError)
			if !ok || ee.ExitCode() != 128+int(sig) {
				t.Errorf("exit %v, want status %d", err, 128+int(sig))
			}
			if _, err := os.Stat(out); !os.IsNotExist(err) {
				t.Errorf("output folder exists after the interrupt")
			}
			if left := tempFolders(t, dir); len(left) > 0 {
				t.Errorf("temporary folders left: %v", left)
			}
			if fileHash(t, data) != before {
				t.Error("the input file changed")
			}
		})
	}
}

// A run killed outright cannot clean up: its target never appears half
// written, and the next run removes its temporary folder.
func TestKilledRunIsCleanedUpByTheNext(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "result")
	cmd := startPCQC(t, filepath.Join(dir, "hold"), "run", usarrestsPath, "--out", out, "--bootstrap", "20", "--format", "none")
	cmd.Process.Kill()
	cmd.Wait()
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Fatal("a killed run left an output folder")
	}
	if left := tempFolders(t, dir); len(left) != 1 {
		t.Fatalf("expected the killed run's temporary folder, found %v", left)
	}
	if status, _, stderr := runPCQC(t, "run", usarrestsPath, "--out", out, "--bootstrap", "20", "--format", "none"); status != exitOK {
		t.Fatalf("next run: %d %s", status, stderr)
	}
	if left := tempFolders(t, dir); len(left) > 0 {
		t.Errorf("stale temporary folders survive the next run: %v", left)
	}
	if _, err := os.Stat(filepath.Join(out, "summary.json")); err != nil {
		t.Errorf("next run's output: %v", err)
	}
}

// --force replaces the folder in one step: a reader never finds the target
// missing or mixed, and the old files are gone.
func TestForceReplacesAtomically(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "result")
	if status, _, stderr := runPCQC(t, "run", usarrestsPath, "--out", out, "--bootstrap", "0", "--format", "md"); status != exitOK {
		t.Fatal(stderr)
	}
	stop := make(chan struct{})
	missing := make(chan string, 1)
	go func() {
		for {
			select {
			case <-stop:
				return
			default:
			}
			if _, err := os.Stat(filepath.Join(out, "summary.json")); err != nil {
				select {
				case missing <- err.Error():
				default:
				}
			}
		}
	}()
	for i := 0; i < 5; i++ {
		if status, _, stderr := runPCQC(t, "run", usarrestsPath, "--out", out, "--force", "--bootstrap", "0", "--format", "none", "--scale", []string{"none", "unit"}[i%2]); status != exitOK {
			t.Fatal(stderr)
		}
	}
	close(stop)
	select {
	case m := <-missing:
		t.Errorf("the output folder was missing during a --force replace: %s", m)
	default:
	}
	for _, old := range []string{"report.md", "figures"} { // written by the first run only
		if _, err := os.Stat(filepath.Join(out, old)); !os.IsNotExist(err) {
			t.Errorf("%s of the old folder survives --force", old)
		}
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		var names []string
		for _, e := range entries {
			names = append(names, e.Name())
		}
		t.Errorf("stray entries beside the output: %s", strings.Join(names, " "))
	}
}
