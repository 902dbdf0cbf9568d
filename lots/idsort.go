package lots

import (
	"bufio"
	"encoding/binary"
	"io"
	"os"
	"slices"
)

// idRuns tells whether any specimen id of a stream repeats, from the
// 64-bit hashes of the ids alone: it is the check that runs on another
// core while a file is read on the assumption that nothing repeats (a
// repeat sends the caller back to read the file with idIndex, which names
// the places). Hashes are collected in runs of idRunLen, each sorted
// (radixSort: one radix pass on the top bits, then small buckets sorted in
// the cache) and checked for equal neighbours; a run is written to an
// unlinked temporary file when another follows, and at the end the runs
// are merged (external sort-merge, Knuth, TAOCP vol. 3, 5.4.1) and
// checked the same way. Sorting a run costs two sequential passes over
// 8 MB and cache-local sorts, where the table of idIndex takes a cache
// miss per id; memory is two run buffers (16 MB) whatever the input, disk
// 8 bytes per specimen beyond the first run.
type idRuns struct {
	run, scratch []uint64
	files        []*os.File
	dup          bool
	err          error
}

// idRunLen is the number of hashes in a run (2^20: 8 MB). Tests lower it.
var idRunLen = 1 << 20

// add takes the hash of one more id. It is kept multiplied by 2^64/phi
// (one to one, so repeats stay repeats), whose top bits are well mixed
// even for FNV hashes of ids that differ only in their last characters
// (Knuth, TAOCP vol. 3, 6.4, as in idIndex).
func (r *idRuns) add(h uint64) {
	if r.run == nil {
		r.run = newWords(idRunLen)[:0]
	}
	r.run = append(r.run, h*fibonacci)
	if len(r.run) == cap(r.run) {
		r.flush(true)
	}
}

// flush sorts and checks the run; with more to come it writes it to a
// file and starts a new one.
func (r *idRuns) flush(more bool) {
	if len(r.scratch) < len(r.run) {
		r.scratch = newWords(cap(r.run))
	}
	radixSort(r.run, r.scratch[:len(r.run)])
	for i := 1; i < len(r.run); i++ {
		if r.run[i] == r.run[i-1] {
			r.dup = true
		}
	}
	if !more && len(r.files) == 0 {
		return // one run: checked
	}
	if r.dup || r.err != nil {
		r.run = r.run[:0]
		return
	}
	f, err := os.CreateTemp("", "lotproof-ids-*")
	if err != nil {
		r.err = err
		return
	}
	os.Remove(f.Name()) // unlinked: the space is freed when the file is closed
	r.files = append(r.files, f)
	w := bufio.NewWriterSize(f, 1<<16)
	var b [8]byte
	for _, h := range r.run {
		binary.LittleEndian.PutUint64(b[:], h)
		w.Write(b[:])
	}
	if err := w.Flush(); err == nil {
		_, err = f.Seek(0, io.SeekStart)
		r.err = err
	} else {
		r.err = err
	}
	r.run = r.run[:0]
}

// finish checks the last run and the runs against each other, and closes
// the files. It reports whether an id repeats; err is set when the files
// could not be written or read (the check is then incomplete).
func (r *idRuns) finish() (dup bool, err error) {
	defer r.close()
	if len(r.run) > 0 || len(r.files) == 0 {
		r.flush(false)
	}
	if r.dup || r.err != nil || len(r.files) < 2 {
		return r.dup, r.err
	}
	// Merge: the smallest head of the runs in turn (few runs: a linear
	// scan of the heads).
	rd := make([]*bufio.Reader, len(r.files))
	head := make([]uint64, len(r.files))
	live := make([]bool, len(r.files))
	var b [8]byte
	next := func(i int) error {
		if _, err := io.ReadFull(rd[i], b[:]); err != nil {
			live[i] = false
			if err == io.EOF {
				return nil
			}
			return err
		}
		head[i], live[i] = binary.LittleEndian.Uint64(b[:]), true
		return nil
	}
	for i, f := range r.files {
		rd[i] = bufio.NewReaderSize(f, 1<<16)
		if err := next(i); err != nil {
			return false, err
		}
	}
	last, started := uint64(0), false
	for {
		m := -1
		for i := range head {
			if live[i] && (m < 0 || head[i] < head[m]) {
				m = i
			}
		}
		if m < 0 {
			return false, nil
		}
		if started && head[m] == last {
			return true, nil
		}
		last, started = head[m], true
		if err := next(m); err != nil {
			return false, err
		}
	}
}

func (r *idRuns) close() {
	for _, f := range r.files {
		f.Close()
	}
	r.files = nil
	if r.run != nil {
		releaseWords(r.run)
		r.run = nil
	}
	if r.scratch != nil {
		releaseWords(r.scratch)
		r.scratch = nil
	}
}

// radixSort sorts a in place, using tmp (as long as a) as the second
// buffer: one counting pass distributes the values by their top 12 bits
// (a most-significant-digit radix pass, Knuth, TAOCP vol. 3, 5.2.5), then
// each of the 4,096 buckets, a few hundred values that fit in the cache
// for a run of 2^20 well-mixed hashes, is sorted on its own
// (slices.Sort). The buckets come in order, so the whole is sorted.
func radixSort(a, tmp []uint64) {
	if len(a) < 2 {
		return
	}
	const bits = 12
	var start [1<<bits + 1]int
	for _, v := range a {
		start[v>>(64-bits)+1]++
	}
	for i := 1; i < len(start); i++ {
		start[i] += start[i-1]
	}
	next := start
	for _, v := range a {
		k := v >> (64 - bits)
		tmp[next[k]] = v
		next[k]++
	}
	for k := range 1 << bits {
		slices.Sort(tmp[start[k]:start[k+1]])
	}
	copy(a, tmp)
}
