package progress

import (
	"io"
	"sync"
	"time"

	"github.com/schollz/progressbar/v3"
)

// Bar is a progress bar over a known number of steps. Its methods are safe
// for concurrent use, and a nil *Bar is a valid, silent bar.
type Bar struct {
	mu   sync.Mutex
	bar  *progressbar.ProgressBar // nil when disabled
	done bool
}

// New returns a bar that writes to w when enabled is true and total > 0,
// and a silent bar otherwise. label is shown before the bar.
func New(w io.Writer, enabled bool, total int64, label string) *Bar {
	b := &Bar{}
	if !enabled || w == nil || total <= 0 {
		return b
	}
	b.bar = progressbar.NewOptions64(total,
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetDescription(label),
		progressbar.OptionSetWidth(30),
		progressbar.OptionShowCount(),
		progressbar.OptionSetElapsedTime(true),
		progressbar.OptionSetPredictTime(false),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionClearOnFinish(),
		progressbar.OptionSetRenderBlankState(true),
	)
	return b
}

// Enabled reports whether the bar draws anything.
func (b *Bar) Enabled() bool { return b != nil && b.bar != nil }

// Add advances the bar by n steps.
func (b *Bar) Add(n int64) {
	if !b.Enabled() {
		return
	}
	b.mu.Lock()
	defer b.mu.Unlock()
	if b.done {
		return
	}
	_ = b.bar.Add64(n) // a failed write to the terminal must not stop the work
}

// Finish completes the bar and clears it from the line. Calling it more
// than once is harmless.
func (b *Bar) Finish() {
	if !b.Enabled() {
		return
	}
	b.mu.Lock()
	defer b.mu.Unlock()
	if b.done {
		return
	}
	b.done = true
	_ = b.bar.Finish()
}
