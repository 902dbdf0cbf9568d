package progress

import (
	"bytes"
	"sync"
	"testing"
)

// lockedBuffer lets the test read what the bar wrote while goroutines add.
type lockedBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (l *lockedBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *lockedBuffer) Len() int {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Len()
}

func TestDisabledWritesNothing(t *testing.T) {
	var buf bytes.Buffer
	b := New(&buf, false, 100, "judging lots")
	if b.Enabled() {
		t.Fatal("bar enabled although enabled=false")
	}
	for range 100 {
		b.Add(1)
	}
	b.Finish()
	if buf.Len() != 0 {
		t.Fatalf("disabled bar wrote %d bytes: %q", buf.Len(), buf.String())
	}
}

func TestNilAndEmptyBarsAreSilent(t *testing.T) {
	var nb *Bar
	nb.Add(3)
	nb.Finish()
	var buf bytes.Buffer
	b := New(&buf, true, 0, "nothing to do")
	b.Add(1)
	b.Finish()
	if buf.Len() != 0 {
		t.Fatalf("bar with total 0 wrote %q", buf.String())
	}
}

func TestEnabledConcurrentAdd(t *testing.T) {
	var buf lockedBuffer
	const workers, each = 8, 250
	b := New(&buf, true, workers*each, "reducing")
	if !b.Enabled() {
		t.Fatal("bar not enabled")
	}
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			for range each {
				b.Add(1)
			}
		})
	}
	wg.Wait()
	if got := b.bar.State().CurrentNum; got != workers*each {
		t.Errorf("count after concurrent Add = %d, want %d", got, workers*each)
	}
	b.Finish()
	b.Finish()
	b.Add(1) // after Finish: ignored, no panic
	if buf.Len() == 0 {
		t.Error("enabled bar wrote nothing")
	}
}
