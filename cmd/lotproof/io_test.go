package main

import (
	"bytes"
	"errors"
	"io"
	"testing"
)

// TestEmitSpillsAndWritesNothingPartial: output beyond the in-memory part
// (8 MiB) goes through a temporary file and arrives whole and unchanged;
// a render that fails after writing 20 MB writes nothing.
func TestEmitSpillsAndWritesNothingPartial(t *testing.T) {
	chunk := bytes.Repeat([]byte("0123456789abcdef"), 1<<12) // 64 KiB
	var want bytes.Buffer
	var out bytes.Buffer
	err := emit(&out, func(w io.Writer) error {
		for i := range 320 { // 20 MiB
			c := append([]byte{byte(i)}, chunk...)
			want.Write(c)
			if _, err := w.Write(c); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil || !bytes.Equal(out.Bytes(), want.Bytes()) {
		t.Fatalf("spilled output: %d bytes, want %d (%v)", out.Len(), want.Len(), err)
	}
	out.Reset()
	err = emit(&out, func(w io.Writer) error {
		for range 320 {
			w.Write(chunk)
		}
		return errors.New("late failure")
	})
	if err == nil || out.Len() != 0 {
		t.Fatalf("failed render: %d bytes written, error %v", out.Len(), err)
	}
}
