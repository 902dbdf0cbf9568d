package input

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
)

// Error is a problem with a named input, located at the file: where, what
// is wrong, what to do. It prints as "where: what; fix", like the located
// problems of package lots.
type Error struct {
	Where, What, Fix string
}

func (e *Error) Error() string {
	s := e.Where + ": " + e.What
	if e.Fix != "" {
		s += "; " + e.Fix
	}
	return s
}

func errorf(where, fix, format string, args ...any) *Error {
	return &Error{Where: where, What: fmt.Sprintf(format, args...), Fix: fix}
}

// Kind is a kind of input with its cap.
type Kind struct {
	What     string // in messages: "specification", "workbook", ...
	MaxBytes int64  // largest accepted size in bytes; 0: no cap (the reader streams)
	Fix      string // what to do when the cap is reached
	Stdin    bool   // the command reads this kind from standard input as "-"
}

// The kinds of input and their caps (README "Limits on inputs").
var (
	// Results is a specimen results CSV: read as a stream in bounded
	// memory (lines at most 1 MiB, see package lots), so no size cap.
	Results = Kind{What: "results file", Stdin: true}
	// Workbook is an .xlsx results workbook; its parts are checked
	// against the workbook limits before they are read (see package lots).
	Workbook = Kind{What: "workbook", MaxBytes: 256 << 20,
		Fix: "save the results as CSV, which is read as a stream, or split the workbook"}
	// Spec is a purchase-specification YAML file.
	Spec = Kind{What: "specification", MaxBytes: 1 << 20,
		Fix: "a specification is a short YAML file (see spec/SCHEMA.md); check that the right file was named"}
	// Records is one raw tensile record file (a folder is read file by file).
	Records = Kind{What: "raw record file", MaxBytes: 256 << 20, Stdin: true, // the parser streams and holds at most 10,000,000 points (about 210 MiB peak)
		Fix: "split the records over several .rec files in a folder"}
	// AllowablesJSON is the JSON written by lotproof allowables --format json.
	AllowablesJSON = Kind{What: "allowables result", MaxBytes: 16 << 20,
		Fix: "give the JSON written by lotproof allowables --format json"}
)

// Size formats a byte count for messages: "1 MiB", "64 MiB", "1.5 GiB".
func Size(n int64) string {
	switch {
	case n >= 1<<30 && n%(1<<30) == 0:
		return fmt.Sprintf("%d GiB", n>>30)
	case n >= 1<<20 && n%(1<<20) == 0:
		return fmt.Sprintf("%d MiB", n>>20)
	case n >= 1<<10 && n%(1<<10) == 0:
		return fmt.Sprintf("%d KiB", n>>10)
	}
	return fmt.Sprintf("%d bytes", n)
}

// Check reports whether name is a regular file lotproof may read as kind
// k, without opening it: FIFOs, devices, sockets and directories are
// refused. It follows symbolic links.
func Check(name string, k Kind) (fs.FileInfo, error) {
	fi, err := os.Stat(name)
	if err != nil {
		return nil, notFound(name, k, err)
	}
	if err := regular(name, k, fi); err != nil {
		return nil, err
	}
	if k.MaxBytes > 0 && fi.Size() > k.MaxBytes {
		return nil, tooBig(name, k)
	}
	return fi, nil
}

func notFound(name string, k Kind, err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		err = pe.Err
	}
	fix := "check the path"
	if errors.Is(err, fs.ErrPermission) {
		fix = "check the file's permissions"
	}
	return errorf(name, fix, "cannot open the %s: %v", k.What, err)
}

func tooBig(name string, k Kind) error {
	return errorf(name, k.Fix, "the %s is larger than the limit of %s", k.What, Size(k.MaxBytes))
}

// regular refuses anything but a regular file.
func regular(name string, k Kind, fi fs.FileInfo) error {
	m := fi.Mode()
	if m.IsRegular() {
		return nil
	}
	what := "not a regular file"
	switch {
	case m.IsDir():
		what = "a folder"
	case m&fs.ModeNamedPipe != 0:
		what = "a named pipe (FIFO)"
	case m&fs.ModeSocket != 0:
		what = "a socket"
	case m&fs.ModeCharDevice != 0:
		what = "a character device"
	case m&fs.ModeDevice != 0:
		what = "a device"
	}
	fix := "name a regular file"
	if k.Stdin {
		fix += ", or give - to read standard input"
	}
	return errorf(name, fix, "the %s is %s, not a file lotproof can read", k.What, what)
}

// Open opens name for reading as kind k: "-" is stdin (os.Stdin when stdin
// is nil), anything else must be a regular file within the cap. The
// reader refuses to read past the cap (an *Error naming the file and the
// limit), which matters for standard input, whose size is not known in
// advance. The file is opened without blocking, so a FIFO put in place
// after the check cannot hang the open either.
func Open(name string, k Kind, stdin io.Reader) (io.ReadCloser, error) {
	if name == "-" {
		if stdin == nil {
			stdin = os.Stdin
		}
		return io.NopCloser(Limit(stdin, "-", k)), nil
	}
	f, _, err := OpenFile(name, k)
	if err != nil {
		return nil, err
	}
	return &limitedFile{f: f, r: Limit(f, name, k)}, nil
}

// limitedFile has only Read and Close, so that io.Copy cannot go around
// the cap through *os.File's WriteTo.
type limitedFile struct {
	f *os.File
	r io.Reader
}

func (l *limitedFile) Read(p []byte) (int, error) { return l.r.Read(p) }
func (l *limitedFile) Close() error               { return l.f.Close() }

// ReadAll reads the whole of name (or stdin for "-") as kind k, within
// its cap.
func ReadAll(name string, k Kind, stdin io.Reader) ([]byte, error) {
	r, err := Open(name, k, stdin)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	b, err := io.ReadAll(r)
	if err != nil {
		var ie *Error
		if errors.As(err, &ie) {
			return nil, ie
		}
		return nil, errorf(name, "check that the file can be read", "cannot read the %s: %v", k.What, err)
	}
	return b, nil
}

// Limit returns a reader of r that fails with an *Error naming name and
// the limit once more than k.MaxBytes bytes have been read (no cap when
// MaxBytes is 0).
func Limit(r io.Reader, name string, k Kind) io.Reader {
	if k.MaxBytes <= 0 {
		return r
	}
	return &capped{r: r, left: k.MaxBytes, name: name, k: k}
}

type capped struct {
	r    io.Reader
	left int64
	name string
	k    Kind
}

func (c *capped) Read(p []byte) (int, error) {
	if c.left < 0 {
		return 0, tooBig(c.name, c.k)
	}
	// Read one byte beyond the cap to tell "exactly at the cap" from
	// "beyond it".
	if int64(len(p)) > c.left+1 {
		p = p[:c.left+1]
	}
	n, err := c.r.Read(p)
	c.left -= int64(n)
	if c.left < 0 {
		return 0, tooBig(c.name, c.k)
	}
	return n, err
}

// OpenFile opens the regular file name as kind k for random access (a
// workbook is a zip archive, read through its directory). "-" is refused:
// such an input cannot be read from standard input.
func OpenFile(name string, k Kind) (*os.File, int64, error) {
	if name == "-" {
		return nil, 0, errorf(name, "save it to a file and name the file", "a %s cannot be read from standard input", k.What)
	}
	fi, err := Check(name, k)
	if err != nil {
		return nil, 0, err
	}
	f, err := os.OpenFile(name, os.O_RDONLY|nonBlock, 0)
	if err != nil {
		return nil, 0, notFound(name, k, err)
	}
	fi2, err := f.Stat()
	if err == nil && !os.SameFile(fi, fi2) {
		err = errorf(name, "try again", "the %s changed while it was being opened", k.What)
	}
	if err != nil {
		f.Close()
		return nil, 0, err
	}
	return f, fi2.Size(), nil
}
