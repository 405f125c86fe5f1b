package report

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"os"
	"path/filepath"
)

// ErrTargetExists is returned when the output folder exists, is not empty,
// and replacing it was not asked for.
var ErrTargetExists = errors.New("output folder exists and is not empty")

// Output is an output folder being written. Files go into a temporary folder
// beside the target (same parent, so the final rename stays on one file
// system); Commit renames it into place, so a failed or interrupted run never
// leaves a partial report where the user expects a complete one.
type Output struct {
	target string
	tmp    string
	force  bool
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

// Begin creates the temporary folder for target.
func Begin(target string, force bool) (*Output, error) {
	if err := CheckTarget(target, force); err != nil {
		return nil, err
	}
	parent, base := filepath.Split(filepath.Clean(target))
	if parent == "" {
		parent = "."
	}
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return nil, err
	}
	tmp, err := os.MkdirTemp(parent, "."+base+".pcqc-tmp-")
	if err != nil {
		return nil, err
	}
	// MkdirTemp makes the folder private; the finished folder should have
	// the permissions of any folder the user creates.
	if err := os.Chmod(tmp, 0o755); err != nil {
		os.RemoveAll(tmp)
		return nil, err
	}
	return &Output{target: filepath.Clean(target), tmp: tmp, force: force}, nil
}

// Dir is the folder to write into until Commit.
func (o *Output) Dir() string { return o.tmp }

// Target is the final folder.
func (o *Output) Target() string { return o.target }

// Path returns the path of a file inside the folder being written.
func (o *Output) Path(name string) string { return filepath.Join(o.tmp, name) }

// Commit moves the finished folder into place. An existing target (allowed
// only with force) is first moved aside and removed after the new folder is
// in place.
func (o *Output) Commit() error {
	if err := CheckTarget(o.target, o.force); err != nil {
		o.Abort()
		return err
	}
	var aside string
	if _, err := os.Stat(o.target); err == nil {
		aside = o.tmp + ".old-" + randomSuffix()
		if err := os.Rename(o.target, aside); err != nil {
			o.Abort()
			return err
		}
	}
	if err := os.Rename(o.tmp, o.target); err != nil {
		if aside != "" {
			os.Rename(aside, o.target)
		}
		o.Abort()
		return err
	}
	if aside != "" {
		return os.RemoveAll(aside)
	}
	return nil
}

// Abort removes the temporary folder.
func (o *Output) Abort() { os.RemoveAll(o.tmp) }

func randomSuffix() string {
	var b [4]byte
	rand.Read(b[:])
	return hex.EncodeToString(b[:])
}
