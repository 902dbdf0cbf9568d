//go:build !linux

package lots

// newSlots returns a zeroed table of n slots.
func newSlots(n int) []idSlot { return make([]idSlot, n) }

// releaseSlots does nothing here: the table belongs to the garbage
// collector.
func releaseSlots([]idSlot) {}

// newWords returns n zeroed words.
func newWords(n int) []uint64 { return make([]uint64, n) }

// releaseWords does nothing here.
func releaseWords([]uint64) {}
