package lots

import (
	"syscall"
	"unsafe"
)

// newSlots returns a zeroed table of n slots. Large tables are mapped
// directly and advised to use transparent huge pages (madvise
// MADV_HUGEPAGE, Linux), so that filling a 32 MB table at random takes
// sixteen page faults instead of eight thousand; release unmaps them.
func newSlots(n int) []idSlot {
	size := n * int(unsafe.Sizeof(idSlot{}))
	if size < 4<<20 {
		return make([]idSlot, n)
	}
	b, err := syscall.Mmap(-1, 0, size, syscall.PROT_READ|syscall.PROT_WRITE, syscall.MAP_PRIVATE|syscall.MAP_ANON)
	if err != nil {
		return make([]idSlot, n)
	}
	_ = syscall.Madvise(b, 14) // MADV_HUGEPAGE; advice only
	return unsafe.Slice((*idSlot)(unsafe.Pointer(&b[0])), n)
}

// releaseSlots unmaps a table newSlots mapped (a smaller one is left to
// the garbage collector).
func releaseSlots(s []idSlot) {
	size := len(s) * int(unsafe.Sizeof(idSlot{}))
	if size < 4<<20 {
		return
	}
	_ = syscall.Munmap(unsafe.Slice((*byte)(unsafe.Pointer(&s[0])), size))
}
