// Package scale writes large, invented specimen results files for the
// speed and memory benchmarks (a year of receipts at a large buyer:
// 1,000,000 specimens in 20,000 lots). The numbers are random draws from a
// fixed seed; they mean nothing and are never a test reference.
package scale

import (
	"bufio"
	"io"
	"math"
	"math/rand/v2"
	"strconv"

	"lotproof/lots/internal/rss"
)

// Header is the first line of every generated file: three properties.
const Header = "specimen,lot,heat,supplier,material,tested,tensile [MPa],proof [MPa],elongation [%]\n"

// Material is the material of every generated lot; the specifications in
// testdata/bench name it.
const Material = "Bar GX-7"

var suppliers = []string{"Ashgrove", "Birchfold", "Cindervale", "Dunmere", "Eastlock"}

// Options choose the size and layout of a generated file.
type Options struct {
	Specimens int    // total rows (default 1,000,000)
	Lots      int    // number of lots (default 20,000); rows are spread evenly
	Seed      uint64 // random seed (default 1)
	// Interleave > 1 writes the rows of that many consecutive lots
	// round-robin, so that a lot's rows are not next to each other (a file
	// not grouped by lot). 0 or 1: each lot's rows together.
	Interleave int
}

func (o *Options) defaults() {
	if o.Specimens <= 0 {
		o.Specimens = 1_000_000
	}
	if o.Lots <= 0 {
		o.Lots = 20_000
	}
	if o.Lots > o.Specimens {
		o.Lots = o.Specimens
	}
	if o.Seed == 0 {
		o.Seed = 1
	}
	if o.Interleave < 1 {
		o.Interleave = 1
	}
}

// Write writes a generated results CSV to w and returns the bytes written.
// The same options give the same bytes.
func Write(w io.Writer, o Options) (int64, error) {
	o.defaults()
	bw := bufio.NewWriterSize(w, 1<<16)
	cw := &countWriter{w: bw}
	r := rand.New(rand.NewPCG(o.Seed, 0x6c6f7470726f6f66))
	io.WriteString(cw, Header)
	var b []byte
	type lot struct {
		id, n, done          int
		heat, supplier, date string
		mt, sdt, mp, sdp, me float64
	}

	newLot := func(i int) *lot {
		n := o.Specimens / o.Lots
		if i < o.Specimens%o.Lots {
			n++
		}
		l := &lot{id: i, n: n}
		l.supplier = suppliers[i%len(suppliers)]
		l.heat = "H" + strconv.Itoa(100000+i/4)
		day := i % 365
		m := 1
		for _, d := range []int{31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31} {
			if day < d {
				break
			}
			day -= d
			m++
		}
		l.date = "2026-" + pad2(m) + "-" + pad2(day+1)
		// Lot means vary; a few lots sit near or below the minimums.
		l.mt = 1000 + 25*r.NormFloat64()
		l.sdt = 8 + 4*r.Float64()
		l.mp = 890 + 20*r.NormFloat64()
		l.sdp = 7 + 3*r.Float64()
		l.me = 15 + 1.2*r.NormFloat64()

		return l
	}
	specimen := 0
	for first := 0; first < o.Lots; first += o.Interleave {
		var block []*lot
		for i := first; i < min(first+o.Interleave, o.Lots); i++ {
			block = append(block, newLot(i))
		}
		for left := true; left; {
			left = false
			for _, l := range block {
				if l.done == l.n {
					continue
				}
				left = true
				l.done++
				specimen++
				b = b[:0]
				b = append(b, 'S')
				b = strconv.AppendInt(b, int64(specimen), 10)
				b = append(b, ",L"...)
				b = strconv.AppendInt(b, int64(100000+l.id), 10)
				b = append(b, ',')
				b = append(b, l.heat...)
				b = append(b, ',')
				b = append(b, l.supplier...)
				b = append(b, ","+Material+","...)
				b = append(b, l.date...)
				b = append(b, ',')
				b = strconv.AppendFloat(b, round1(l.mt+l.sdt*r.NormFloat64()), 'f', 1, 64)
				b = append(b, ',')
				b = strconv.AppendFloat(b, round1(l.mp+l.sdp*r.NormFloat64()), 'f', 1, 64)
				b = append(b, ',')
				b = strconv.AppendFloat(b, round1(l.me+0.8*r.NormFloat64()), 'f', 1, 64)
				b = append(b, '\n')
				if _, err := cw.Write(b); err != nil {
					return cw.n, err
				}
			}
		}
	}
	return cw.n, bw.Flush()
}

func round1(v float64) float64 { return math.Round(v*10) / 10 }

func pad2(v int) string {
	if v < 10 {
		return "0" + strconv.Itoa(v)
	}
	return strconv.Itoa(v)
}

type countWriter struct {
	w io.Writer
	n int64
}

func (c *countWriter) Write(p []byte) (int, error) {
	n, err := c.w.Write(p)
	c.n += int64(n)
	return n, err
}

// PeakRSS is the peak resident set size of this process in MiB (-1 where
// it cannot be read), for benchmarks outside package lots.
func PeakRSS() float64 { return rss.PeakMB() }

// ResetPeakRSS starts the peak resident set size over, so that PeakRSS
// measures what follows; it reports whether that worked (Linux).
func ResetPeakRSS() bool { return rss.ResetPeak() }
