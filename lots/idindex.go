package lots

import (
	"bufio"
	"cmp"
	"container/heap"
	"encoding/binary"
	"errors"
	"io"
	"math/bits"
	"os"
	"slices"
	"sync/atomic"
)

// idIndex finds duplicate specimen ids in a stream with bounded memory.
//
// Up to memCap ids are held in memory, as 64-bit hashes with their places
// in an open-addressing table with linear probing (Knuth, TAOCP vol. 3,
// 6.4, algorithm L); a repeat among them is found at once. When memCap is reached the entries are written to a temporary
// file sorted by hash (a run) and memory starts afresh; at the end the runs
// are merged (external sort-merge, Knuth, TAOCP vol. 3, 5.4.1) and a hash
// met in two runs is a duplicate found late (its message cannot quote the
// id, which is not kept, but names both places). Memory therefore stays
// below about 35 MB whatever the size of the input (the 32 MB table, and
// while it grows the old table of at most 1 MB; a spill sorts it in place); disk takes 16
// bytes per specimen, only for inputs of more than memCap specimens. When
// the first occurrence of an id was already spilled, a repeat met again in
// memory names the earlier in-memory occurrence as "first"; the merge still
// reports it against the spilled one.
//
// Two different ids share a 64-bit hash with probability about n^2/2^65
// (below 1e-5 for 20 million specimens); the message names both places, so
// the user can see it.
type idIndex struct {
	slots  []idSlot // open-addressing table
	n      int
	memCap int
	shift  uint // 64 - log2(len(slots))
	runs   []*os.File
	err    error
}

// idSlot is one slot: the hash (0: empty) and where the id was seen, in
// one 16-byte cell so that a probe touches one cache line.
type idSlot struct {
	hash      uint64
	line, col uint32
}

// idMemCap is how many ids are kept in memory before they are spilled:
// 2^20 ids take a table of 2^21 slots of 16 bytes, 32 MB. Tests lower it.
var idMemCap = 1 << 20

// seen records an id's hash at a place and returns the line on which the
// same id was seen before, or 0 (repeats across spilled runs are found by
// finish).
func (x *idIndex) seen(h uint64, line, col int) int {
	if h == 0 {
		h = 1 // 0 marks an empty slot
	}
	if x.slots == nil {
		if x.memCap == 0 {
			x.memCap = idMemCap
		}
		x.grow()
	}
	i, ok := x.find(h)
	if ok {
		return int(x.slots[i].line)
	}
	if x.n >= x.memCap {
		if x.err == nil {
			x.err = x.spill()
		}
		clear(x.slots)
		x.n = 0
		i, _ = x.find(h)
	} else if 4*(x.n+1) > 3*len(x.slots) {
		x.grow()
		i, _ = x.find(h)
	}
	x.slots[i] = idSlot{h, uint32(line), uint32(col)}
	x.n++
	return 0
}

// fibonacci is 2^64/phi, odd (so multiplying by it maps hashes one to one).
const fibonacci = 0x9E3779B97F4A7C15

// find returns the slot holding h, or the empty slot where it goes. The
// first slot probed is the top bits of h times 2^64/phi (Fibonacci hashing,
// Knuth, TAOCP vol. 3, 6.4): the low bits of FNV hashes of ids that differ
// only in their last characters (S1, S2, ...) cluster, and linear probing
// from them made long runs.
func (x *idIndex) find(h uint64) (int, bool) {
	mask := uint64(len(x.slots) - 1)
	for i := (h * fibonacci) >> x.shift; ; i = (i + 1) & mask {
		switch x.slots[i].hash {
		case 0:
			return int(i), false
		case h:
			return int(i), true
		}
	}
}

// grow enlarges the table fourfold, and from 2^16 slots (about 49,000
// ids) straight to the size that holds memCap ids at a load of at most
// 3/4 (32 MB), so that a large input rehashes its first ids only, not
// every id several times.
func (x *idIndex) grow() {
	size := 4 * len(x.slots)
	if size == 0 {
		size = 1024
	}
	top := 1024
	for 3*top < 4*x.memCap+4 {
		top *= 2
	}
	if len(x.slots) >= 1<<16 {
		size = top
	}
	size = max(min(size, top), 2*len(x.slots))
	old := x.slots
	x.slots = newSlots(size)
	x.shift = uint(64 - bits.TrailingZeros(uint(size)))
	for _, e := range old {
		if e.hash != 0 {
			i, _ := x.find(e.hash)
			x.slots[i] = e
		}
	}
	if old != nil {
		releaseSlots(old)
	}
}

// spill writes the in-memory entries to a temporary run sorted by key,
// 16 bytes each: key (the hash times 2^64/phi, a one-to-one map of the
// hash, see find), line, column (little-endian).
//
// The table is already in key order but for its clusters: an entry's home
// slot is the top bits of its key, and linear probing moves it forward
// only within the run of full slots (cluster) that holds its home, never
// across an empty slot. So walking the table once and sorting each
// cluster by key gives the whole run in key order, without sorting a
// million entries; only the cluster that wraps around the end of the
// table is split between the start and the end of the run.
func (x *idIndex) spill() error {
	f, err := os.CreateTemp("", "lotproof-ids-*")
	if err != nil {
		return err
	}
	os.Remove(f.Name()) // unlinked: the space is freed when the file is closed
	x.runs = append(x.runs, f)
	w := bufio.NewWriterSize(f, 1<<16)
	var b [16]byte
	put := func(e idSlot) {
		binary.LittleEndian.PutUint64(b[0:], e.hash*fibonacci)
		binary.LittleEndian.PutUint32(b[8:], e.line)
		binary.LittleEndian.PutUint32(b[12:], e.col)
		w.Write(b[:])
	}
	key := func(e idSlot) uint64 { return e.hash * fibonacci }
	byKey := func(a, b idSlot) int { return cmp.Compare(key(a), key(b)) }
	var cluster []idSlot
	// clusters writes the clusters of slots [from, to), each sorted.
	clusters := func(from, to int) {
		flush := func() {
			slices.SortFunc(cluster, byKey)
			for _, e := range cluster {
				put(e)
			}
			cluster = cluster[:0]
		}
		for _, e := range x.slots[from:to] {
			if e.hash == 0 {
				flush()
				continue
			}
			cluster = append(cluster, e)
		}
		flush()
	}
	n := len(x.slots)
	first := slices.IndexFunc(x.slots, func(e idSlot) bool { return e.hash == 0 })
	switch {
	case first < 0: // a full table (not below a load of 3/4): sort it all
		all := slices.Clone(x.slots)
		slices.SortFunc(all, byKey)
		for _, e := range all {
			put(e)
		}
	case x.slots[n-1].hash == 0: // no cluster wraps past the end
		clusters(0, n)
	default:
		// The cluster at the end wraps around to slots [0, first): its
		// entries whose home is below first come before everything, the
		// others (homes at the end) after everything.
		tail := n - 1
		for x.slots[tail-1].hash != 0 {
			tail--
		}
		wrap := append(slices.Clone(x.slots[tail:]), x.slots[:first]...)
		slices.SortFunc(wrap, byKey)
		low := 0
		for low < len(wrap) && key(wrap[low])>>x.shift < uint64(first) {
			low++
		}
		for _, e := range wrap[:low] {
			put(e)
		}
		clusters(first, tail)
		for _, e := range wrap[low:] {
			put(e)
		}
	}
	if err := w.Flush(); err != nil {
		return err
	}
	_, err = f.Seek(0, io.SeekStart)
	return err
}

// finish merges the runs (when memory was spilled) and calls dup for every
// id met in two runs, with the place of the later one and the line of the
// first. It releases the temporary files.
func (x *idIndex) finish(dup func(line, col, first int)) error {
	defer x.close()
	if x.err != nil {
		return x.err
	}
	if len(x.runs) == 0 {
		return nil
	}
	if err := x.spill(); err != nil {
		return err
	}
	releaseSlots(x.slots)
	x.slots = nil
	h := &runHeap{}
	for _, f := range x.runs {
		r := &runReader{r: bufio.NewReaderSize(f, 1<<16)}
		if ok, err := r.next(); err != nil {
			return err
		} else if ok {
			heap.Push(h, r)
		}
	}
	var last uint64
	var first uint32
	have := false
	for h.Len() > 0 {
		r := (*h)[0]
		if have && r.key == last {
			// The same hash in a later run: the heap yields the first
			// line of a hash first, so this one is the repeat.
			dup(int(r.line), int(r.col), int(first))
		} else {
			last, first, have = r.key, r.line, true
		}
		ok, err := r.next()
		if err != nil {
			return err
		}
		if ok {
			heap.Fix(h, 0)
		} else {
			heap.Pop(h)
		}
	}
	return nil
}

func (x *idIndex) close() {
	if x.slots != nil {
		releaseSlots(x.slots)
		x.slots = nil
	}
	for _, f := range x.runs {
		f.Close()
	}
	x.runs = nil
}

type runReader struct {
	r         *bufio.Reader
	key       uint64
	line, col uint32
}

func (r *runReader) next() (bool, error) {
	var b [16]byte
	if _, err := io.ReadFull(r.r, b[:]); err != nil {
		if errors.Is(err, io.EOF) {
			return false, nil
		}
		return false, err
	}
	r.key = binary.LittleEndian.Uint64(b[0:])
	r.line = binary.LittleEndian.Uint32(b[8:])
	r.col = binary.LittleEndian.Uint32(b[12:])
	return true, nil
}

type runHeap []*runReader

func (h runHeap) Len() int { return len(h) }
func (h runHeap) Less(i, j int) bool {
	if h[i].key != h[j].key {
		return h[i].key < h[j].key
	}
	return h[i].line < h[j].line
}
func (h runHeap) Swap(i, j int) { h[i], h[j] = h[j], h[i] }
func (h *runHeap) Push(v any)   { *h = append(*h, v.(*runReader)) }
func (h *runHeap) Pop() any {
	old := *h
	v := old[len(old)-1]
	*h = old[:len(old)-1]
	return v
}

// idQueue checks ids for repeats on its own goroutine (idRuns: sorted
// runs of their hashes), so that a large input's duplicate-id check runs
// on a second core while the first parses. It only says whether some id
// was repeated: the caller then reads the input again with the check in
// line (idIndex), for the messages.
type idQueue struct {
	r    idRuns
	cur  []uint64
	in   chan []uint64
	free chan []uint64
	done chan struct{}
	dup  atomic.Bool // a repeat (or a failed check) was found
	busy bool
}

const idBatch = 4096

func newIDQueue() *idQueue {
	q := &idQueue{in: make(chan []uint64, 4), free: make(chan []uint64, 6), done: make(chan struct{}), busy: true}
	go func() {
		defer close(q.done)
		for b := range q.in {
			for _, h := range b {
				q.r.add(h)
			}
			if q.r.dup || q.r.err != nil {
				q.dup.Store(true)
			}
			select {
			case q.free <- b[:0]:
			default:
			}
		}
		if dup, err := q.r.finish(); dup || err != nil {
			q.dup.Store(true)
		}
	}()
	return q
}

// add queues an id's hash.
func (q *idQueue) add(h uint64) {
	if q.cur == nil {
		select {
		case q.cur = <-q.free:
		default:
			q.cur = make([]uint64, 0, idBatch)
		}
	}
	q.cur = append(q.cur, h)
	if len(q.cur) == idBatch {
		q.in <- q.cur
		q.cur = nil
	}
}

// stop waits until every queued id has been checked and reports whether
// one was repeated, or the check could not be completed (the caller then
// reads the input again with idIndex, which says where). Calling it again
// does nothing.
func (q *idQueue) stop() bool {
	if q.busy {
		q.busy = false
		if len(q.cur) > 0 {
			q.in <- q.cur
			q.cur = nil
		}
		close(q.in)
		<-q.done
	}
	return q.dup.Load()
}
