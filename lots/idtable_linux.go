package lots

import (
	"syscall"
	"unsafe"
)

// newSlots returns a zeroed table of n slots. Large tables are mapped
// directly and advised to use transparent huge pages (madvise
// MADV_HUGEPAGE, Linux), so that filling a 32 MB table at random takes
// sixteen page faults instead of eight thousand; release unmaps them.
func newSlots(n int) []idSlot { return mapped[idSlot](n) }

// releaseSlots unmaps a table newSlots mapped (a smaller one is left to
// the garbage collector).
func releaseSlots(s []idSlot) { unmap(s) }

// newWords returns n zeroed words, mapped like newSlots when large: the
// sorted runs of the duplicate-id check (idRuns) live outside the
// garbage-collected heap, so they do not raise its target (a streaming
// command lets the heap grow to three times what is live).
func newWords(n int) []uint64 { return mapped[uint64](n) }

// releaseWords unmaps what newWords mapped.
func releaseWords(w []uint64) { unmap(w) }

func mapped[T any](n int) []T {
	var zero T
	size := n * int(unsafe.Sizeof(zero))
	if size < 4<<20 {
		return make([]T, n)
	}
	b, err := syscall.Mmap(-1, 0, size, syscall.PROT_READ|syscall.PROT_WRITE, syscall.MAP_PRIVATE|syscall.MAP_ANON)
	if err != nil {
		return make([]T, n)
	}
	_ = syscall.Madvise(b, 14) // MADV_HUGEPAGE; advice only
	return unsafe.Slice((*T)(unsafe.Pointer(&b[0])), n)
}

func unmap[T any](s []T) {
	var zero T
	size := cap(s) * int(unsafe.Sizeof(zero))
	if size < 4<<20 {
		return
	}
	_ = syscall.Munmap(unsafe.Slice((*byte)(unsafe.Pointer(unsafe.SliceData(s))), size))
}
