//go:build unix

package intake

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// within runs f and fails the test if it has not returned after a few
// seconds, so that a read that blocks (a FIFO without a writer, an endless
// device) fails the test instead of hanging CI.
func within(t *testing.T, what string, f func() error) error {
	t.Helper()
	done := make(chan error, 1)
	go func() { done <- f() }()
	select {
	case err := <-done:
		return err
	case <-time.After(5 * time.Second):
		t.Fatalf("%s: still blocked after 5 s", what)
		return nil
	}
}

// Only regular files are read: a folder, a FIFO, a socket, a character
// device and links to them are refused at once with a reason that says
// what the path is; a missing file says so; a file beyond the cap is
// refused with the cap; a regular file and a link to one are read.
func TestOpenRegularRefusesWhatIsNotAFile(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "model.json")
	if err := os.WriteFile(file, []byte("0123456789"), 0o644); err != nil {
		t.Fatal(err)
	}
	fifo := filepath.Join(dir, "fifo")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skipf("cannot make a FIFO here: %v", err)
	}
	sock := filepath.Join(dir, "sock")
	if fd, err := syscall.Socket(syscall.AF_UNIX, syscall.SOCK_STREAM, 0); err == nil {
		if err := syscall.Bind(fd, &syscall.SockaddrUnix{Name: sock}); err != nil {
			sock = ""
		}
		defer syscall.Close(fd)
	} else {
		sock = ""
	}
	link := func(name, target string) string {
		p := filepath.Join(dir, name)
		if err := os.Symlink(target, p); err != nil {
			t.Fatal(err)
		}
		return p
	}
	cases := []struct {
		name, path string
		kind       FileKind
		want       string // "" for success
	}{
		{"regular", file, ModelFile, ""},
		{"link to regular", link("good", file), ModelFile, ""},
		{"folder", dir, ModelFile, "it is a folder"},
		{"fifo", fifo, TheirTable, "named pipe (FIFO)"},
		{"link to fifo", link("lfifo", fifo), TheirTable, "named pipe (FIFO)"},
		{"dev zero", "/dev/zero", ModelFile, "character device"},
		{"link to dev zero", link("zero", "/dev/zero"), ModelFile, "character device"},
		{"dangling link", link("dangling", filepath.Join(dir, "absent")), ModelFile, "no such file"},
		{"missing", filepath.Join(dir, "absent"), TheirTable, "cannot read the table: no such file"},
		{"beyond the cap", file, FileKind{What: "the test file", Max: 9}, "holds 10 bytes, more than the 9 bytes"},
		{"at the cap", file, FileKind{What: "the test file", Max: 10}, ""},
	}
	if sock != "" {
		cases = append(cases, struct {
			name, path string
			kind       FileKind
			want       string
		}{"socket", sock, TheirTable, "it is a socket"})
	}
	for _, c := range cases {
		var b []byte
		err := within(t, c.name, func() error {
			var err error
			b, err = ReadRegular(c.path, c.kind)
			return err
		})
		if c.want == "" {
			if err != nil || string(b) != "0123456789" {
				t.Errorf("%s: %q, %v", c.name, b, err)
			}
			continue
		}
		var ie *InputError
		if !errors.As(err, &ie) || ie.File != c.path || !strings.Contains(ie.Reason, c.want) ||
			!strings.HasPrefix(ie.Reason, "cannot read "+c.kind.What+": ") {
			t.Errorf("%s: got %v, want an input error naming the file and %q", c.name, err, c.want)
		}
	}
}

// A file that grows past the cap after it was opened fails when read, and
// keeps failing: a buffered reader that drops an error on Peek must not see
// a short file instead.
func TestCappedFileFailsWhenTheFileGrows(t *testing.T) {
	path := filepath.Join(t.TempDir(), "t.csv")
	os.WriteFile(path, []byte("a,b\n1,2\n"), 0o644)
	r, err := OpenRegular(path, FileKind{What: "the table", Max: 10})
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	f, _ := os.OpenFile(path, os.O_APPEND|os.O_WRONLY, 0)
	f.WriteString("3,4\n5,6\n")
	f.Close()
	b, err := io.ReadAll(r)
	if !errors.Is(err, errGrewBeyondCap) || len(b) > 10 {
		t.Fatalf("read %q, %v; want at most 10 bytes and the cap error", b, err)
	}
	if n, err := r.Read(make([]byte, 4)); n != 0 || !errors.Is(err, errGrewBeyondCap) {
		t.Errorf("second read: %d, %v; the error must stick", n, err)
	}
}
