package intake

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"syscall"
)

// FileKind says what a file read by OpenRegular holds, for messages, and the
// most bytes it may have. The caps exist because these files are read whole
// (a model) or held as text (another person's tables): a link to /dev/zero,
// a FIFO or a runaway file must be refused, not read until memory runs out.
type FileKind struct {
	What string // "the model", "the table", …
	Max  int64  // bytes
}

var (
	// ModelFile is model.json. A model holds p·k loadings and a few p-long
	// lists; written indented, a number takes about 30 bytes, so 256 MiB
	// holds some 9 million loadings (90,000 variables × 100 components),
	// far beyond the widest data pcqc audits in memory.
	ModelFile = FileKind{What: "the model", Max: 256 << 20}
	// TheirTable is a loadings, scores or variance table given to review.
	// It is held as text, cell by cell, so it is capped at 1 GiB: scores
	// of 10 million samples on 5 components take about 1 GB written at
	// full precision, and loadings and variances are far smaller.
	TheirTable = FileKind{What: "the table", Max: 1 << 30}
	// TrainingScoresFile is an audit folder's scores.csv, read by apply for
	// the background of its score plot. Run writes about 20 bytes a score;
	// 4 GiB is 50 million samples on 4 components, more than run can hold
	// in memory, while only two of its columns are kept.
	TrainingScoresFile = FileKind{What: "the training scores", Max: 4 << 30}
)

// OpenRegular opens path for reading when it is a regular file (links are
// followed) of at most kind.Max bytes. Folders, devices, FIFOs and sockets
// are refused with an InputError that says what the path is. The file is
// opened without blocking, so that a FIFO put in its place between the check
// and the open cannot hang the program, and checked again once open. The
// reader returned fails, and keeps failing, if the file grows beyond the
// cap while it is read.
func OpenRegular(path string, kind FileKind) (io.ReadCloser, error) {
	refuse := func(reason string) error {
		return &InputError{File: path, Reason: "cannot read " + kind.What + ": " + reason}
	}
	st, err := os.Stat(path)
	if err != nil {
		return nil, refuse(unwrapPathError(err))
	}
	if what := notRegular(st.Mode()); what != "" {
		return nil, refuse(what)
	}
	if st.Size() > kind.Max {
		return nil, refuse(tooLarge(st.Size(), kind.Max))
	}
	f, err := os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	if err != nil {
		return nil, refuse(unwrapPathError(err))
	}
	st, err = f.Stat()
	if err != nil {
		f.Close()
		return nil, refuse(unwrapPathError(err))
	}
	if what := notRegular(st.Mode()); what != "" {
		f.Close()
		return nil, refuse(what + " (it was replaced while being opened)")
	}
	if st.Size() > kind.Max {
		f.Close()
		return nil, refuse(tooLarge(st.Size(), kind.Max))
	}
	return &cappedFile{f: f, r: io.LimitReader(f, kind.Max+1), max: kind.Max}, nil
}

// ReadRegular reads the whole of a regular file of at most kind.Max bytes
// (see OpenRegular).
func ReadRegular(path string, kind FileKind) ([]byte, error) {
	r, err := OpenRegular(path, kind)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	b, err := io.ReadAll(r)
	if err != nil {
		return nil, &InputError{File: path, Reason: "cannot read " + kind.What + ": " + unwrapPathError(err)}
	}
	return b, nil
}

// notRegular describes a file mode that is not a regular file, or returns ""
// for a regular one.
func notRegular(m fs.FileMode) string {
	switch {
	case m.IsRegular():
		return ""
	case m.IsDir():
		return "it is a folder, not a file"
	case m&fs.ModeNamedPipe != 0:
		return "it is a named pipe (FIFO), not a regular file"
	case m&fs.ModeSocket != 0:
		return "it is a socket, not a regular file"
	case m&fs.ModeCharDevice != 0:
		return "it is a character device, not a regular file"
	case m&fs.ModeDevice != 0:
		return "it is a block device, not a regular file"
	}
	return "it is not a regular file"
}

func tooLarge(size, max int64) string {
	return fmt.Sprintf("it holds %s, more than the %s such a file may have", byteSize(size), byteSize(max))
}

// byteSize writes a size in the largest binary unit that keeps it ≥ 1.
func byteSize(n int64) string {
	switch {
	case n >= 1<<30:
		return fmt.Sprintf("%.3g GiB", float64(n)/(1<<30))
	case n >= 1<<20:
		return fmt.Sprintf("%.3g MiB", float64(n)/(1<<20))
	case n >= 1<<10:
		return fmt.Sprintf("%.3g KiB", float64(n)/(1<<10))
	}
	return fmt.Sprintf("%d bytes", n)
}

// errGrewBeyondCap is returned by a cappedFile read past its cap.
var errGrewBeyondCap = errors.New("the file grew beyond its size limit while being read")

// cappedFile reads at most max bytes of a file. Its error is sticky: buffered
// readers that drop an error on a Peek must still meet it on the next read,
// or a file that grew would be silently truncated.
type cappedFile struct {
	f   *os.File
	r   io.Reader
	n   int64
	max int64
	err error
}

func (c *cappedFile) Read(p []byte) (int, error) {
	if c.err != nil {
		return 0, c.err
	}
	n, err := c.r.Read(p)
	c.n += int64(n)
	if c.n > c.max {
		c.err = fmt.Errorf("%w (%s)", errGrewBeyondCap, byteSize(c.max))
		return 0, c.err
	}
	return n, err
}

func (c *cappedFile) Close() error { return c.f.Close() }
