// Package progress shows a progress bar on a terminal. It draws only when
// the caller says the stream is a terminal (cmd/lotproof passes
// streams.ErrTerminal); otherwise every method is a no-op, so piped or
// redirected output and test buffers never receive control characters.
package progress
