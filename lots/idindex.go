package lots

// idIndex remembers the specimen ids seen so far as 64-bit hashes with the
// line each was first seen on: an open-addressing table with linear
// probing (Knuth, TAOCP vol. 3, 6.4, algorithm L), 12 bytes a slot, kept at
// most three-quarters full, so about 16 bytes per specimen. Two different
// ids share a hash with probability about n^2/2^65 (below 1e-5 for 20
// million specimens); the message then names both lines, so the user can
// see it.
type idIndex struct {
	keys  []uint64 // 0 marks an empty slot
	lines []uint32
	n     int
}

// seen returns the line on which hash h was first seen, or records line
// for it and returns 0.
func (x *idIndex) seen(h uint64, line int) int {
	h |= 1 // 0 marks an empty slot
	if 4*(x.n+1) > 3*len(x.keys) {
		x.grow()
	}
	mask := uint64(len(x.keys) - 1)
	for i := h & mask; ; i = (i + 1) & mask {
		switch x.keys[i] {
		case 0:
			x.keys[i] = h
			x.lines[i] = uint32(line)
			x.n++
			return 0
		case h:
			return int(x.lines[i])
		}
	}
}

func (x *idIndex) grow() {
	size := 2 * len(x.keys)
	if size == 0 {
		size = 1024
	}
	old, oldLines := x.keys, x.lines
	x.keys, x.lines, x.n = make([]uint64, size), make([]uint32, size), 0
	for i, k := range old {
		if k != 0 {
			x.seen(k, int(oldLines[i]))
		}
	}
}
