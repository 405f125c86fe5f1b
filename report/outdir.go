package report

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
)

// ErrTargetExists is returned when the output folder exists, is not empty,
// and replacing it was not asked for.
var ErrTargetExists = errors.New("output folder exists and is not empty")

// ErrAborted is returned by Commit after Abort.
var ErrAborted = errors.New("output aborted")

// Output is an output folder being written. Files go into a temporary folder
// beside the target (same parent, so the final rename stays on one file
// system); Commit renames it into place, so a failed or interrupted run never
// leaves a partial report where the user expects a complete one.
//
// The temporary folder is named ".<target>.pcqc-tmp-<pid>-<random>". A run
// killed outright (SIGKILL, power loss) cannot remove its own; the next run
// writing beside it removes every such folder whose process is gone.
type Output struct {
	target string
	tmp    string
	force  bool

	mu   sync.Mutex
	done bool // committed or aborted
}

// CheckTarget reports whether target may be written: it must not exist, be
// an empty folder, or force must be set (and then it must be a folder).
func CheckTarget(target string, force bool) error {
	st, err := os.Stat(target)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	if !st.IsDir() {
		return fmt.Errorf("%s: exists and is not a folder", target)
	}
	entries, err := os.ReadDir(target)
	if err != nil {
		return err
	}
	if len(entries) > 0 && !force {
		return fmt.Errorf("%s: %w (use --force to replace it)", target, ErrTargetExists)
	}
	return nil
}

func tmpPrefix(base string) string { return "." + base + ".pcqc-tmp-" }

// Begin creates the temporary folder for target, after removing the
// temporary folders that runs now dead left beside it.
func Begin(target string, force bool) (*Output, error) {
	if err := CheckTarget(target, force); err != nil {
		return nil, err
	}
	target = filepath.Clean(target)
	parent, base := filepath.Split(target)
	if parent == "" {
		parent = "."
	}
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return nil, err
	}
	removeStale(parent, base)
	tmp, err := os.MkdirTemp(parent, tmpPrefix(base)+strconv.Itoa(os.Getpid())+"-")
	if err != nil {
		return nil, err
	}
	// MkdirTemp makes the folder private; the finished folder should have
	// the permissions of any folder the user creates.
	if err := os.Chmod(tmp, 0o755); err != nil {
		os.RemoveAll(tmp)
		return nil, err
	}
	return &Output{target: target, tmp: tmp, force: force}, nil
}

// removeStale removes temporary folders of target whose writing process no
// longer runs.
func removeStale(parent, base string) {
	entries, err := os.ReadDir(parent)
	if err != nil {
		return
	}
	prefix := tmpPrefix(base)
	for _, e := range entries {
		rest, ok := strings.CutPrefix(e.Name(), prefix)
		if !ok || !e.IsDir() {
			continue
		}
		pidText, _, _ := strings.Cut(rest, "-")
		pid, err := strconv.Atoi(pidText)
		if err != nil || pid == os.Getpid() || processAlive(pid) {
			continue
		}
		os.RemoveAll(filepath.Join(parent, e.Name()))
	}
}

// Dir is the folder to write into until Commit.
func (o *Output) Dir() string { return o.tmp }

// Target is the final folder.
func (o *Output) Target() string { return o.target }

// Path returns the path of a file inside the folder being written.
func (o *Output) Path(name string) string { return filepath.Join(o.tmp, name) }

// Commit moves the finished folder into place. An existing target (allowed
// only with force) is swapped with the new folder in one atomic step where
// the system allows it (renameat2 with RENAME_EXCHANGE on Linux), and moved
// aside first otherwise; the old folder is then removed.
func (o *Output) Commit() error {
	o.mu.Lock()
	defer o.mu.Unlock()
	if o.done {
		return ErrAborted
	}
	if err := CheckTarget(o.target, o.force); err != nil {
		o.abortLocked()
		return err
	}
	if _, err := os.Stat(o.target); err == nil {
		if exchange(o.tmp, o.target) == nil {
			o.done = true
			return os.RemoveAll(o.tmp) // it now holds the old folder
		}
		aside := o.tmp + "-old"
		if err := os.Rename(o.target, aside); err != nil {
			o.abortLocked()
			return err
		}
		if err := os.Rename(o.tmp, o.target); err != nil {
			os.Rename(aside, o.target)
			o.abortLocked()
			return err
		}
		o.done = true
		return os.RemoveAll(aside)
	}
	if err := os.Rename(o.tmp, o.target); err != nil {
		o.abortLocked()
		return err
	}
	o.done = true
	return nil
}

// Abort removes the temporary folder; a later Commit fails. It is safe to
// call from a signal handler while another goroutine writes or commits: the
// commit either completed before (and Abort does nothing) or never happens.
func (o *Output) Abort() {
	o.mu.Lock()
	defer o.mu.Unlock()
	o.abortLocked()
}

func (o *Output) abortLocked() {
	if !o.done {
		os.RemoveAll(o.tmp)
		o.done = true
	}
}
