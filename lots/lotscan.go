package lots

import (
	"crypto/sha256"
	"errors"
	"fmt"
	"hash"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"unsafe"

	"lotproof/lots/input"
)

// Lot is one lot (or heat) with its specimens held compactly: one column
// of values per property and the specimen ids and lines, in file order.
// It is what a per-lot computation needs, without a record per specimen.
type Lot struct {
	Key      string // the lot or heat label
	Supplier string // of the first specimen
	Material string // of the first specimen
	Mixed    bool   // supplier or material differs within the lot
	Index    int    // order of first appearance in the input, from 0
	// Values[p][i] is property p of the lot's specimen i, in the internal
	// unit; NaN marks a missing value.
	Values [][]float64
	Lines  []int // line (CSV) or row (xlsx) of each specimen
	ids    []byte
	idEnd  []int
}

// Len is the number of specimens in the lot.
func (l *Lot) Len() int { return len(l.Lines) }

// ID is the id of the lot's specimen i.
func (l *Lot) ID(i int) string { return string(l.AppendID(nil, i)) }

// AppendID appends the id of the lot's specimen i to b.
func (l *Lot) AppendID(b []byte, i int) []byte {
	from := 0
	if i > 0 {
		from = l.idEnd[i-1]
	}
	return append(b, l.ids[from:l.idEnd[i]]...)
}

// Present returns the non-missing values of property p in file order,
// with the positions (in the lot) of the specimens they belong to.
func (l *Lot) Present(p int) (vals []float64, at []int) {
	vals = make([]float64, 0, l.Len())
	at = make([]int, 0, l.Len())
	for i, v := range l.Values[p] {
		if !math.IsNaN(v) {
			vals = append(vals, v)
			at = append(at, i)
		}
	}
	return vals, at
}

// add appends one specimen: its id, line and values (one per property).
func (l *Lot) add(id string, line int, vals []float64) {
	l.ids = append(l.ids, id...)
	l.idEnd = append(l.idEnd, len(l.ids))
	l.Lines = append(l.Lines, line)
	for p, v := range vals[:len(l.Values)] {
		l.Values[p] = append(l.Values[p], v)
	}
}

// reserve makes room for n specimens with ids of about idLen bytes.
func (l *Lot) reserve(n, idLen int) {
	if n == 0 {
		return
	}
	for p := range l.Values {
		l.Values[p] = make([]float64, 0, n)
	}
	l.Lines = make([]int, 0, n)
	l.idEnd = make([]int, 0, n)
	l.ids = make([]byte, 0, n*(idLen+2))
}

func newLot(key, supplier, material string, index, np int) *Lot {
	return &Lot{Key: strings.Clone(key), Supplier: strings.Clone(supplier), Material: strings.Clone(material),
		Index: index, Values: make([][]float64, np)}
}

// Lot gathers the specimens of group g of d into a Lot.
func (d *Dataset) Lot(g Group, index int) *Lot {
	l := &Lot{Key: g.Key, Supplier: g.Supplier, Material: g.Material, Mixed: g.Mixed, Index: index,
		Values: make([][]float64, len(d.Properties))}
	for _, i := range g.Specimens {
		s := d.Specimen(i)
		l.add(s.ID, s.Line, s.Values)
	}
	return l
}

// LotScan says how ScanLots hands over the lots of an input.
type LotScan struct {
	By GroupBy
	// Begin, when set, is called before the first lot of every pass over
	// the input, with the dataset's source and properties. ScanLots
	// reads a file a second time when it turns out not to be grouped by
	// lot: whatever the caller collected from the first pass is void then.
	Begin func(d *Dataset)
	// Keep, when set, selects the specimens the lots are made of (as
	// Dataset.Group's keep does). It is called with every specimen in
	// file order, on every pass.
	Keep func(s *Specimen) bool
	// Lot is called with every complete lot, in order of first
	// appearance. The lot belongs to the callee. An error stops the scan
	// and is returned as is.
	Lot func(l *Lot) error
}

// errRegroup stops a pass that assumed the input grouped by lot.
var errRegroup = errors.New("the input is not grouped by lot")

// ScanLotsFile reads a results file like ReadFile and hands over its lots
// one at a time (see ScanLots). The Dataset it returns describes the
// input (source, digest, bytes, properties, missing counts) but holds no
// specimens.
func ScanLotsFile(name string, opt ReadOptions, scan LotScan) (*Dataset, error) {
	if name == "-" {
		in := opt.Stdin
		if in == nil {
			in = os.Stdin
		}
		return scanLots(in, name, opt.Progress, scan)
	}
	if strings.EqualFold(filepath.Ext(name), ".xlsx") {
		d, err := ReadXLSX(name, opt.Sheet)
		if err != nil {
			return nil, err
		}
		return d, d.ScanLots(scan)
	}
	// Opened as ReadFile opens it (package input: a regular file within
	// the cap), but seekable, for a second pass.
	f, _, err := input.OpenFile(name, input.Results)
	if err != nil {
		return nil, fromInput(err)
	}
	defer f.Close()
	return scanLots(&cappedFile{f: f, name: name, r: input.Limit(f, name, input.Results)}, name, opt.Progress, scan)
}

// cappedFile reads a file through input.Limit and can go back to the start.
type cappedFile struct {
	f    *os.File
	name string
	r    io.Reader
}

func (c *cappedFile) Read(p []byte) (int, error) { return c.r.Read(p) }

func (c *cappedFile) Seek(off int64, whence int) (int64, error) {
	n, err := c.f.Seek(off, whence)
	if err == nil && whence == io.SeekStart && n == 0 {
		c.r = input.Limit(c.f, c.name, input.Results) // the cap counts afresh
	}
	return n, err
}

// ScanLots hands over the lots of a dataset already in memory, in the
// order of Dataset.Group.
func (d *Dataset) ScanLots(scan LotScan) error {
	if scan.Begin != nil {
		scan.Begin(d) // before a grouping error, as for a CSV
	}
	groups, err := d.Group(scan.By, scan.Keep)
	if err != nil {
		return err
	}
	for i, g := range groups {
		if err := scan.Lot(d.Lot(g, i)); err != nil {
			return err
		}
	}
	return nil
}

// ScanLots reads a specimen results CSV from r and calls scan.Lot with
// every lot (or heat), complete, in order of first appearance: the same
// lots, in the same order, as ReadCSV followed by Dataset.Group. It checks
// everything ReadCSV checks, with the same messages, and returns the same
// errors; when it returns an error, whatever scan.Lot was given is void.
//
// Memory: when the rows of each lot are next to each other (a file grouped
// by lot, or by heat when grouping by heat), one lot is held at a time.
// Otherwise every specimen is held in a compact column store: 8 bytes per
// property, 12 bytes of lot index, line and id offset, and the id's bytes.
// A file that turns out not to be grouped is read a second time when r can
// seek (the first pass stops at the first lot met again); standard input
// from a pipe goes to the column store at once. Beside that, the
// duplicate-id check takes what ScanCSV says.
func ScanLots(r io.Reader, name string, scan LotScan) (*Dataset, error) {
	return scanLots(r, name, nil, scan)
}

func scanLots(r io.Reader, name string, progress func(int64), scan LotScan) (*Dataset, error) {
	seeker, ok := r.(io.Seeker)
	var start int64
	if ok {
		var err error
		if start, err = seeker.Seek(0, io.SeekCurrent); err != nil {
			ok = false
		}
	}
	var done int64 // progress already reported
	report := func(n int64) {
		if progress != nil && n > done {
			done = n
			progress(n)
		}
	}
	// A seekable input is first read assuming it is grouped by lot and
	// has no repeated id (checked on another core); when either turns out
	// wrong it is read again without that assumption.
	grouped, async := ok, ok
	for {
		d, err := scanPass(r, name, report, scan, grouped, async)
		switch {
		case errors.Is(err, errRegroup):
			grouped = false
		case errors.Is(err, errDuplicate):
			async = false
		default:
			return d, err
		}
		if _, err := seeker.Seek(start, io.SeekStart); err != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
	}
}

// scanPass reads the input once. With grouped set, it holds one lot at a
// time and returns errRegroup when a lot comes back after another;
// otherwise it fills the column store and hands the lots over at the end.
// With asyncIDs, ids are checked on another core and a repeated one
// returns errDuplicate.
func scanPass(r io.Reader, name string, progress func(int64), scan LotScan, grouped, asyncIDs bool) (*Dataset, error) {
	sum := newDigester()
	defer sum.close()
	cnt := &countingReader{r: io.TeeReader(r, sum), progress: progress}
	d := &Dataset{Source: name}
	var missing []int
	begun := false
	begin := func(h *Header) {
		if !begun {
			begun = true
			d.Properties = h.Properties
			missing = make([]int, len(h.Properties))
			if scan.Begin != nil {
				scan.Begin(d)
			}
		}
	}
	var noHeat error          // the first specimen without a heat, when grouping by heat
	index := map[string]int{} // not grouped: each lot's index
	// Grouped: the lots met, by a 64-bit hash of the key (8 bytes a lot,
	// where the keys would take tens). Two keys sharing a hash only make
	// a grouped file look ungrouped: it is then read a second time, with
	// the same result.
	met := map[uint64]struct{}{}
	var cur *Lot    // grouped: the lot being filled
	var cs colStore // not grouped
	var lotOf []*Lot
	h, err := scanCSV(cnt, name, func(h *Header, s *Specimen) error {
		begin(h)
		for p, v := range s.Values {
			if math.IsNaN(v) {
				missing[p]++
			}
		}
		if scan.Keep != nil && !scan.Keep(s) {
			return nil
		}
		key := s.Lot
		if scan.By == ByHeat {
			key = s.Heat
			if key == "" {
				if noHeat == nil {
					noHeat = noHeatError(name, s)
				}
				return nil
			}
		}
		if noHeat != nil {
			return nil // nothing is judged; the rest is only checked
		}
		if grouped {
			if cur == nil || key != cur.Key {
				size := 0 // the previous lot's size, a guess at this one's
				if cur != nil {
					size = cur.Len()
				}
				h := fnv64(key)
				if _, again := met[h]; again {
					return errRegroup
				}
				if cur != nil {
					if err := scan.Lot(cur); err != nil {
						return err
					}
				}
				cur = newLot(key, s.Supplier, s.Material, len(met), len(s.Values))
				cur.reserve(size, len(s.ID))
				met[h] = struct{}{}
			}
			if cur.Supplier != s.Supplier || cur.Material != s.Material {
				cur.Mixed = true
			}
			cur.add(s.ID, s.Line, s.Values)
			return nil
		}
		i, seen := index[key]
		if !seen {
			i = len(index)
			l := newLot(key, s.Supplier, s.Material, i, len(s.Values))
			index[l.Key] = i
			lotOf = append(lotOf, l)
		}
		if l := lotOf[i]; l.Supplier != s.Supplier || l.Material != s.Material {
			l.Mixed = true
		}
		cs.add(i, s)
		return nil
	}, asyncIDs)
	if err != nil {
		return nil, err
	}
	begin(h)
	if noHeat != nil {
		return nil, noHeat
	}
	io.Copy(io.Discard, cnt) // digest covers the whole input
	d.Digest = fmt.Sprintf("%x", sum.sum())
	d.Bytes = cnt.n
	d.Missing = missing
	if grouped {
		if cur != nil {
			if err := scan.Lot(cur); err != nil {
				return nil, err
			}
		}
		return d, nil
	}
	return d, cs.lots(lotOf, scan.Lot)
}

// GroupError says that the specimens cannot be grouped as asked (by heat,
// when a specimen has none).
type GroupError struct{ msg string }

func (e *GroupError) Error() string { return e.msg }

// GroupInputError words a grouping error (GroupError) as an input error
// of source; other errors are returned as they are.
func GroupInputError(source string, err error) error {
	var ge *GroupError
	if errors.As(err, &ge) {
		return Inputf(source, "group by lot, or fill the heat column", "%v", err)
	}
	return err
}

// noHeatError is the error of grouping by heat a specimen that has none.
func noHeatError(source string, s *Specimen) error {
	return &GroupError{fmt.Sprintf("%s:%d: specimen %q has no heat, so specimens cannot be grouped by heat; fill the heat column or group by lot", source, s.Line, s.ID)}
}

// colStore holds every specimen of an input not grouped by lot: one
// float64 column per property, and per specimen its lot's index, its line
// and the end of its id in one byte arena (uint32: inputs of up to 4 GiB
// of ids and 4 billion lines).
type colStore struct {
	vals  [][]float64
	lot   []uint32
	line  []uint32
	idEnd []uint32
	ids   []byte
}

func (c *colStore) add(lot int, s *Specimen) {
	if c.vals == nil {
		c.vals = make([][]float64, len(s.Values))
	}
	for p, v := range s.Values {
		c.vals[p] = append(c.vals[p], v)
	}
	c.lot = append(c.lot, uint32(lot))
	c.line = append(c.line, uint32(s.Line))
	c.ids = append(c.ids, s.ID...)
	c.idEnd = append(c.idEnd, uint32(len(c.ids)))
}

// lots gathers every lot in turn (a counting sort of the specimens by lot
// keeps file order within a lot) and hands it to fn.
func (c *colStore) lots(lotOf []*Lot, fn func(*Lot) error) error {
	first := make([]uint32, len(lotOf)+1) // first[i]: start of lot i in order
	for _, l := range c.lot {
		first[l+1]++
	}
	for i := 1; i < len(first); i++ {
		first[i] += first[i-1]
	}
	order := make([]uint32, len(c.lot))
	next := append([]uint32(nil), first[:len(lotOf)]...)
	for s, l := range c.lot {
		order[next[l]] = uint32(s)
		next[l]++
	}
	c.lot = nil
	vals := make([]float64, len(c.vals))
	for i, l := range lotOf {
		for _, s := range order[first[i]:first[i+1]] {
			from := uint32(0)
			if s > 0 {
				from = c.idEnd[s-1]
			}
			id := c.ids[from:c.idEnd[s]]
			for p := range vals {
				vals[p] = c.vals[p][s]
			}
			l.add(unsafe.String(unsafe.SliceData(id), len(id)), int(c.line[s]), vals)
		}
		lotOf[i] = nil // handed over
		if err := fn(l); err != nil {
			return err
		}
	}
	return nil
}

// digester computes the SHA-256 of what is written to it on another
// goroutine (a second core), so that hashing does not hold up reading.
type digester struct {
	in   chan []byte
	free chan []byte
	done chan []byte
	h    hash.Hash
}

func newDigester() *digester {
	d := &digester{in: make(chan []byte, 4), free: make(chan []byte, 8), done: make(chan []byte, 1), h: sha256.New()}
	go func() {
		for b := range d.in {
			d.h.Write(b)
			select {
			case d.free <- b[:0]:
			default:
			}
		}
		d.done <- d.h.Sum(nil)
	}()
	return d
}

// Write queues a copy of p.
func (d *digester) Write(p []byte) (int, error) {
	var b []byte
	select {
	case b = <-d.free:
	default:
	}
	d.in <- append(b, p...)
	return len(p), nil
}

// sum waits for everything written and returns the digest.
func (d *digester) sum() []byte {
	close(d.in)
	s := <-d.done
	d.in = nil
	return s
}

// close stops the goroutine when sum was not called (an error).
func (d *digester) close() {
	if d.in != nil {
		close(d.in)
		<-d.done
		d.in = nil
	}
}

// RescanFile reads again a results file that ScanLotsFile has read and
// checked, calling fn for every specimen in file order (fn may keep
// nothing of the specimen: its strings and values are reused), so that a
// caller can write a large file somewhere in bounded memory. The file must
// be unchanged: when its SHA-256 is no longer digest, RescanFile returns an
// error after the last specimen (the caller discards what it did).
func RescanFile(name, digest string, fn func(*Specimen) error) error {
	f, _, err := input.OpenFile(name, input.Results)
	if err != nil {
		return fromInput(err)
	}
	defer f.Close()
	h := sha256.New()
	if _, err := ScanCSV(io.TeeReader(input.Limit(f, name, input.Results), h), name, func(_ *Header, s *Specimen) error { return fn(s) }); err != nil {
		return err
	}
	if fmt.Sprintf("%x", h.Sum(nil)) != digest {
		return Inputf(name, "make sure nothing writes to the file while it is being recorded, and run the command again",
			"the file changed while it was being read (its SHA-256 is not that of the first reading)")
	}
	return nil
}
