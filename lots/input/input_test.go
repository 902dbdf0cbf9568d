package input

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

func TestOpenRefusesWhatIsNotAFile(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "p.csv")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skipf("mkfifo: %v", err)
	}
	cases := map[string]string{
		fifo:                          "is a named pipe (FIFO)",
		dir:                           "is a folder",
		"/dev/zero":                   "is a character device",
		filepath.Join(dir, "missing"): "cannot open the results file: no such file or directory",
	}
	for name, want := range cases {
		start := time.Now()
		r, err := Open(name, Results, nil)
		if err == nil {
			r.Close()
			t.Fatalf("%s: opened", name)
		}
		var ie *Error
		if !errors.As(err, &ie) || ie.Where != name || !strings.Contains(ie.What, want) {
			t.Errorf("%s: %v, want %q", name, err, want)
		}
		if time.Since(start) > 2*time.Second {
			t.Errorf("%s: took %v", name, time.Since(start))
		}
	}
	// Only kinds read from standard input suggest "-".
	_, err := Open("/dev/zero", Spec, nil)
	if err == nil || strings.Contains(err.Error(), "standard input") {
		t.Errorf("spec: %v", err)
	}
	_, err = Open("/dev/zero", Records, nil)
	if err == nil || !strings.Contains(err.Error(), "give - to read standard input") {
		t.Errorf("records: %v", err)
	}
}

// A file at the cap is read; one byte more is refused, both by its size
// and, for standard input, while reading.
func TestCaps(t *testing.T) {
	k := Kind{What: "thing", MaxBytes: 1000, Fix: "make it smaller"}
	dir := t.TempDir()
	at := filepath.Join(dir, "at")
	over := filepath.Join(dir, "over")
	os.WriteFile(at, make([]byte, 1000), 0o644)
	os.WriteFile(over, make([]byte, 1001), 0o644)
	if b, err := ReadAll(at, k, nil); err != nil || len(b) != 1000 {
		t.Fatalf("at the cap: %d bytes, %v", len(b), err)
	}
	want := over + ": the thing is larger than the limit of 1000 bytes; make it smaller"
	if _, err := ReadAll(over, k, nil); err == nil || err.Error() != want {
		t.Fatalf("over the cap: %v\nwant %s", err, want)
	}
	if b, err := ReadAll("-", k, strings.NewReader(strings.Repeat("x", 1000))); err != nil || len(b) != 1000 {
		t.Fatalf("stdin at the cap: %d, %v", len(b), err)
	}
	_, err := ReadAll("-", k, strings.NewReader(strings.Repeat("x", 1001)))
	if err == nil || err.Error() != "-: the thing is larger than the limit of 1000 bytes; make it smaller" {
		t.Fatalf("stdin over the cap: %v", err)
	}
	// An endless stream stops at the cap.
	zero, err := os.Open("/dev/zero")
	if err != nil {
		t.Skip(err)
	}
	defer zero.Close()
	if _, err := io.Copy(io.Discard, Limit(zero, "-", Spec)); err == nil || !strings.Contains(err.Error(), "limit of 1 MiB") {
		t.Fatalf("endless stdin: %v", err)
	}
}

func TestSize(t *testing.T) {
	for n, want := range map[int64]string{1 << 20: "1 MiB", 64 << 20: "64 MiB", 1 << 30: "1 GiB", 4096: "4 KiB", 1000: "1000 bytes", 1<<20 + 1: "1048577 bytes"} {
		if got := Size(n); got != want {
			t.Errorf("Size(%d) = %q, want %q", n, got, want)
		}
	}
}

func TestTempDirRemoved(t *testing.T) {
	t.Setenv("TMPDIR", t.TempDir())
	a, doneA, err := TempDir("x-*")
	if err != nil {
		t.Fatal(err)
	}
	b, _, err := TempDir("x-*")
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(b, "f"), []byte("data"), 0o644)
	doneA()
	if _, err := os.Stat(a); !os.IsNotExist(err) {
		t.Errorf("%s still there after done", a)
	}
	RemoveTemps()
	if _, err := os.Stat(b); !os.IsNotExist(err) {
		t.Errorf("%s still there after RemoveTemps", b)
	}
}
