// Package outdir writes pcqc's output folders safely.
//
// Its guarantees:
//
//   - A folder appears complete or not at all. Files are written into a
//     temporary folder beside the target (same parent, so the final rename
//     stays on one file system), flushed to disk (every file and folder is
//     fsynced) and renamed into place by Commit.
//   - Nothing that pcqc did not write is ever replaced or deleted. Every
//     folder carries a stamp file (StampName) listing the files pcqc wrote
//     into it. An existing, non-empty target is replaced only when Force is
//     set and the stamp is there and lists every file the folder holds;
//     a folder written by pcqc 0.1.0, before stamps, is recognised by its
//     summary.json (tool.name "pcqc") and pcqc's own file names. Anything
//     else is refused, and the old folder's files are removed one by one
//     by name after the swap, never with a recursive delete.
//   - Some targets are refused whatever the options: the file system root,
//     the home folder and any folder holding it, the current folder and any
//     folder holding it, and any folder that is or holds a file being read
//     (Options.Reads). Links are resolved before comparing.
//   - The temporary folder is named ".<target>.pcqc-tmp-<pid>-<random>" and
//     carries a stamp from the start. A run killed outright (SIGKILL, power
//     loss) cannot remove its own; the next run writing beside it removes
//     those of processes that no longer run, and only those with a stamp.
//
// Check runs every rule before any work is done; Commit runs them again
// just before the swap, since the folder may have changed meanwhile.
package outdir

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"
	"syscall"
)

// StampName is the file, inside every output folder, that says pcqc wrote
// the folder and lists the files it wrote.
const StampName = ".pcqc-output.json"

// ErrAborted is returned by Commit after Abort.
var ErrAborted = errors.New("output aborted")

// RefusedError says why a target folder may not be written. It is a usage
// error: nothing has been done.
type RefusedError struct {
	Target string
	Reason string
}

func (e *RefusedError) Error() string { return e.Target + ": " + e.Reason }

// Options say how a target may be written.
type Options struct {
	// Force allows replacing an existing, non-empty folder that pcqc wrote.
	Force bool
	// Reads are the files and folders the run reads; the target may neither
	// be nor hold any of them.
	Reads []string
	// Version is the writing pcqc's version, recorded in the stamp.
	Version string
}

// stamp is the content of StampName.
type stamp struct {
	WrittenBy string   `json:"written_by"`
	Version   string   `json:"version"`
	Complete  bool     `json:"complete"`
	Files     []string `json:"files"` // slash-separated paths relative to the folder, sorted
}

const stampTool = "pcqc"

// Output is an output folder being written.
type Output struct {
	target   string
	tmp      string
	opt      Options
	leftover string // where old files pcqc did not list were kept, if anywhere

	mu   sync.Mutex
	done bool // committed or aborted
}

func refuse(target, format string, a ...any) error {
	return &RefusedError{Target: target, Reason: fmt.Sprintf(format, a...)}
}

// Check reports whether target may be written under opt, without changing
// anything. It returns a *RefusedError when it may not.
func Check(target string, opt Options) error {
	if target == "" {
		return refuse(target, "no output folder given")
	}
	abs, err := filepath.Abs(target)
	if err != nil {
		return refuse(target, "cannot resolve the path: %v", err)
	}
	if st, err := os.Lstat(abs); err == nil && st.Mode()&fs.ModeSymlink != 0 {
		return refuse(target, "is a symbolic link; give the folder it points to, or another --out")
	}
	if err := checkPlace(target, abs, opt.Reads); err != nil {
		return err
	}
	st, err := os.Stat(abs)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return refuse(target, "cannot look at it: %v", pathReason(err))
	}
	if !st.IsDir() {
		return refuse(target, "exists and is not a folder; choose another --out")
	}
	entries, err := os.ReadDir(abs)
	if err != nil {
		return refuse(target, "cannot list it: %v", pathReason(err))
	}
	if len(entries) == 0 {
		return nil
	}
	if !opt.Force {
		return refuse(target, "output folder exists and is not empty (use --force to replace a folder pcqc wrote)")
	}
	if _, err := ownedFiles(abs); err != nil {
		return refuse(target, "not replaced, even with --force: %v; choose another --out or clear it yourself", err)
	}
	return nil
}

// checkPlace refuses the targets that no option allows: the root, the
// home folder, the current folder, and folders that are or hold something
// being read, or any folder holding one of those.
func checkPlace(target, abs string, reads []string) error {
	resolved := resolve(abs)
	if filepath.Dir(resolved) == resolved {
		return refuse(target, "is the root of the file system; choose a folder of its own for --out")
	}
	holds := func(inner string) bool { return isSameOrInside(resolve(inner), resolved) }
	if home, err := os.UserHomeDir(); err == nil && home != "" && holds(home) {
		return refuse(target, "is or holds the home folder; choose a folder of its own for --out")
	}
	if cwd, err := os.Getwd(); err == nil && holds(cwd) {
		return refuse(target, "is or holds the current folder; choose a folder of its own for --out")
	}
	for _, r := range reads {
		if r == "" {
			continue
		}
		if a, err := filepath.Abs(r); err == nil && holds(a) {
			return refuse(target, "is or holds %s, which this run reads; choose another --out", r)
		}
	}
	return nil
}

// resolve returns the path with every link in its existing part resolved,
// so that two names of one folder compare equal.
func resolve(abs string) string {
	abs = filepath.Clean(abs)
	if r, err := filepath.EvalSymlinks(abs); err == nil {
		return r
	}
	parent := filepath.Dir(abs)
	if parent == abs {
		return abs
	}
	return filepath.Join(resolve(parent), filepath.Base(abs))
}

// isSameOrInside reports whether inner is outer or lies below it, by path
// and, where both exist, by identity (bind mounts, case-folding systems).
func isSameOrInside(inner, outer string) bool {
	outerInfo, outerErr := os.Stat(outer)
	for p := inner; ; p = filepath.Dir(p) {
		if p == outer {
			return true
		}
		if outerErr == nil {
			if st, err := os.Stat(p); err == nil && os.SameFile(st, outerInfo) {
				return true
			}
		}
		if filepath.Dir(p) == p {
			return false
		}
	}
}

// knownLegacy are the entries a folder written by pcqc 0.1.0 (before
// stamps) may hold at its top level; figures/ held only figures, and
// later-batch/ an apply folder.
var knownLegacy = map[string]bool{
	"variance.csv": true, "loadings.csv": true, "scores.csv": true, "samples.csv": true,
	"stability.csv": true, "summary.json": true, "model.json": true, "references.bib": true,
	"report.md": true, "report.pdf": true, "report.html": true, "figures": true,
	"demo-data.csv": true, "later-batch": true, "contributions.csv": true,
	"review-variants.csv": true, "demo-later-batch.csv": true,
}

// ownedFiles returns the files of dir that pcqc wrote, every one of them,
// or an error saying why the folder is not wholly pcqc's.
func ownedFiles(dir string) ([]string, error) {
	present, err := listFiles(dir)
	if err != nil {
		return nil, err
	}
	listed, err := readStamp(dir)
	if err != nil {
		return nil, err
	}
	if listed == nil {
		if listed, err = legacyFiles(dir, present); err != nil {
			return nil, err
		}
	}
	known := map[string]bool{StampName: true}
	for _, f := range listed {
		known[f] = true
	}
	for _, f := range present {
		if !known[f] {
			return nil, fmt.Errorf("it holds %s, which pcqc did not write", f)
		}
	}
	return present, nil
}

// readStamp returns the files listed by dir's stamp, nil when there is no
// stamp, or an error when the stamp is not a complete one of pcqc's.
func readStamp(dir string) ([]string, error) {
	b, err := readSmallFile(filepath.Join(dir, StampName))
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, fmt.Errorf("its %s cannot be read (%v)", StampName, err)
	}
	var s stamp
	if json.Unmarshal(b, &s) != nil || s.WrittenBy != stampTool || !s.Complete {
		return nil, fmt.Errorf("its %s is not a complete stamp of pcqc's", StampName)
	}
	if s.Files == nil {
		s.Files = []string{}
	}
	return s.Files, nil
}

// legacyFiles recognises a folder that pcqc 0.1.0 wrote: its summary.json
// names pcqc, and it holds only names pcqc gives its outputs.
func legacyFiles(dir string, present []string) ([]string, error) {
	b, err := readSmallFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		return nil, fmt.Errorf("it has no %s stamp and no summary.json of pcqc's, so pcqc did not write it", StampName)
	}
	var s struct {
		Tool struct {
			Name string `json:"name"`
		} `json:"tool"`
	}
	if json.Unmarshal(b, &s) != nil || s.Tool.Name != stampTool {
		return nil, fmt.Errorf("it has no %s stamp and its summary.json was not written by pcqc", StampName)
	}
	for _, f := range present {
		top, rest, nested := strings.Cut(f, "/")
		ok := knownLegacy[top]
		if nested {
			switch top {
			case "figures":
				ok = !strings.Contains(rest, "/") && (strings.HasSuffix(rest, ".png") || strings.HasSuffix(rest, ".svg"))
			case "later-batch":
				inner, _, _ := strings.Cut(rest, "/")
				ok = knownLegacy[inner]
			default:
				ok = false
			}
		}
		if !ok {
			return nil, fmt.Errorf("it holds %s, which pcqc did not write", f)
		}
	}
	return present, nil
}

// readSmallFile reads a regular file of at most 16 MiB; a stamp or summary
// that is anything else is not pcqc's.
func readSmallFile(path string) ([]byte, error) {
	st, err := os.Lstat(path)
	if err != nil {
		return nil, err
	}
	if !st.Mode().IsRegular() {
		return nil, errors.New("not a regular file")
	}
	if st.Size() > 16<<20 {
		return nil, errors.New("too large")
	}
	return os.ReadFile(path)
}

// listFiles returns every non-folder entry below dir, slash-separated and
// relative to dir, sorted. Links are listed, never followed.
func listFiles(dir string) ([]string, error) {
	var files []string
	err := filepath.WalkDir(dir, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() {
			return nil
		}
		rel, err := filepath.Rel(dir, path)
		if err != nil {
			return err
		}
		files = append(files, filepath.ToSlash(rel))
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("cannot list it (%v)", pathReason(err))
	}
	slices.Sort(files)
	return files, nil
}

func tmpPrefix(base string) string { return "." + base + ".pcqc-tmp-" }

// Begin checks target (see Check) and creates its temporary folder, after
// removing the temporary folders that runs now dead left beside it.
func Begin(target string, opt Options) (*Output, error) {
	if err := Check(target, opt); err != nil {
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
	o := &Output{target: target, tmp: tmp, opt: opt}
	// MkdirTemp makes the folder private; the finished folder should have
	// the permissions of any folder the user creates.
	if err := os.Chmod(tmp, 0o755); err != nil {
		o.Abort()
		return nil, err
	}
	if err := writeStamp(tmp, stamp{WrittenBy: stampTool, Version: opt.Version, Files: []string{}}); err != nil {
		o.Abort()
		return nil, err
	}
	return o, nil
}

func writeStamp(dir string, s stamp) error {
	b, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return err
	}
	return os.WriteFile(filepath.Join(dir, StampName), append(b, '\n'), 0o644)
}

// removeStale removes temporary folders of target whose writing process no
// longer runs and that carry pcqc's stamp.
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
		dir := filepath.Join(parent, e.Name())
		var s stamp
		if b, err := readSmallFile(filepath.Join(dir, StampName)); err != nil || json.Unmarshal(b, &s) != nil || s.WrittenBy != stampTool {
			continue
		}
		if files, err := listFiles(dir); err == nil {
			removeListed(dir, files)
		}
	}
}

// Dir is the folder to write into until Commit.
func (o *Output) Dir() string { return o.tmp }

// Target is the final folder.
func (o *Output) Target() string { return o.target }

// Path returns the path of a file inside the folder being written.
func (o *Output) Path(name string) string { return filepath.Join(o.tmp, name) }

// Leftover names the folder where files of the replaced folder that pcqc
// had not listed were kept (possible only when someone added files while
// pcqc ran), or "" when there were none.
func (o *Output) Leftover() string { return o.leftover }

// Commit finishes the folder: it writes the stamp listing every file,
// flushes files and folders to disk, checks the target again and moves the
// folder into place. An existing target (allowed only with Force, and only
// when pcqc wrote it) is swapped with the new folder in one atomic step
// where the system allows it (renameat2 with RENAME_EXCHANGE on Linux), and
// moved aside first otherwise; the old folder's files are then removed by
// name.
func (o *Output) Commit() error {
	o.mu.Lock()
	defer o.mu.Unlock()
	if o.done {
		return ErrAborted
	}
	if err := o.seal(); err != nil {
		o.abortLocked()
		return err
	}
	if err := Check(o.target, o.opt); err != nil {
		o.abortLocked()
		return err
	}
	parent := filepath.Dir(o.target)
	if _, err := os.Lstat(o.target); err != nil {
		if err := os.Rename(o.tmp, o.target); err != nil {
			o.abortLocked()
			return err
		}
		o.done = true
		return syncPath(parent)
	}
	old := o.tmp // after the swap it holds the old folder
	if exchange(o.tmp, o.target) != nil {
		old = o.tmp + "-old"
		if err := os.Rename(o.target, old); err != nil {
			o.abortLocked()
			return err
		}
		if err := os.Rename(o.tmp, o.target); err != nil {
			os.Rename(old, o.target)
			o.abortLocked()
			return err
		}
	}
	o.done = true
	if err := syncPath(parent); err != nil {
		return err
	}
	return o.removeOld(old)
}

// seal writes the complete stamp and flushes every file and folder.
func (o *Output) seal() error {
	files, err := listFiles(o.tmp)
	if err != nil {
		return err
	}
	files = slices.DeleteFunc(files, func(f string) bool { return f == StampName })
	if err := writeStamp(o.tmp, stamp{WrittenBy: stampTool, Version: o.opt.Version, Complete: true, Files: files}); err != nil {
		return err
	}
	return filepath.WalkDir(o.tmp, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.Type()&fs.ModeSymlink != 0 {
			return nil
		}
		return syncPath(path)
	})
}

// removeOld removes the replaced folder's files by name. Files it does
// not recognise as pcqc's (added while pcqc ran) are kept, and the folder
// holding them is renamed beside the target for the user to look at.
func (o *Output) removeOld(old string) error {
	if os.Remove(old) == nil { // it was an empty folder
		return nil
	}
	if files, err := ownedFiles(old); err == nil {
		removeListed(old, files) // removes old too, once it is empty
	}
	if _, err := os.Lstat(old); errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	keep := o.target + ".replaced-" + strconv.Itoa(os.Getpid())
	if err := os.Rename(old, keep); err != nil {
		return err
	}
	o.leftover = keep
	return nil
}

// removeListed removes the listed files of dir, then every folder that is
// left empty, deepest first. It never removes anything it was not given.
func removeListed(dir string, files []string) {
	folders := map[string]bool{}
	for _, f := range files {
		os.Remove(filepath.Join(dir, filepath.FromSlash(f)))
		for d := filepath.Dir(filepath.FromSlash(f)); d != "."; d = filepath.Dir(d) {
			folders[d] = true
		}
	}
	ordered := make([]string, 0, len(folders))
	for d := range folders {
		ordered = append(ordered, d)
	}
	slices.SortFunc(ordered, func(a, b string) int { return len(b) - len(a) })
	for _, d := range ordered {
		os.Remove(filepath.Join(dir, d))
	}
	os.Remove(dir)
}

// errSyncUnsupported is what fsync of a folder returns on file systems
// that cannot flush folders; their entries are then as durable as the
// system makes them.
var errSyncUnsupported error = syscall.EINVAL

// syncPath flushes a file or folder to disk.
func syncPath(path string) error {
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	defer f.Close()
	if err := f.Sync(); err != nil && !errors.Is(err, errSyncUnsupported) {
		return &fs.PathError{Op: "fsync", Path: path, Err: err}
	}
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
		if files, err := listFiles(o.tmp); err == nil {
			removeListed(o.tmp, files)
		}
		os.RemoveAll(o.tmp) // pcqc's own temporary folder: nobody else writes there
		o.done = true
	}
}

func pathReason(err error) string {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	return err.Error()
}
