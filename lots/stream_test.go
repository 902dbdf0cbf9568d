package lots

import (
	"bytes"
	"io"
	"runtime"
	"strconv"
	"testing"
)

// rowsReader yields a specimen results CSV of about size bytes, row by row,
// without ever holding it whole.
type rowsReader struct {
	size, done int64
	row        int
	buf        []byte
	header     bool
}

const streamHeader = "specimen,lot,heat,supplier,material,tested,condition,tensile [MPa],proof [MPa],elongation [%],reduction of area [%],hardness [HBW],modulus [GPa]\n"

func (r *rowsReader) Read(p []byte) (int, error) {
	for len(r.buf) == 0 {
		if r.done >= r.size {
			return 0, io.EOF
		}
		if !r.header {
			r.header = true
			r.buf = append(r.buf, streamHeader...)
			break
		}
		r.row++
		b := r.buf[:0]
		b = append(b, 'S')
		b = strconv.AppendInt(b, int64(r.row), 10)
		b = append(b, ",L"...)
		b = strconv.AppendInt(b, int64(r.row/5), 10)
		b = append(b, ",H"...)
		b = strconv.AppendInt(b, int64(r.row/50), 10)
		b = append(b, ",Mill A,Bar X,2026-03-31,RT,"...)
		b = strconv.AppendFloat(b, 1000+float64(r.row%97)/10, 'f', 1, 64)
		b = append(b, ',')
		b = strconv.AppendFloat(b, 880+float64(r.row%89)/10, 'f', 1, 64)
		b = append(b, ",16.5,55.0,"...)
		b = strconv.AppendInt(b, int64(290+r.row%20), 10)
		b = append(b, ",205.5\n"...)
		r.buf = b
	}
	n := copy(p, r.buf)
	r.buf = r.buf[n:]
	r.done += int64(n)
	return n, nil
}

// A 1 GB results stream (12.6 million specimens) is read without holding
// it: the heap stays below a bound that does not depend on the input size.
func TestScanCSVStreamsOneGigabyte(t *testing.T) {
	if testing.Short() {
		t.Skip("1 GB stream: skipped with -short")
	}
	const size = 1 << 30
	src := &rowsReader{size: size}
	var peak uint64
	var ms runtime.MemStats
	n := 0
	_, err := ScanCSV(src, "big.csv", func(h *Header, s *Specimen) error {
		n++
		if n%500000 == 0 {
			runtime.ReadMemStats(&ms)
			if ms.HeapAlloc > peak {
				peak = ms.HeapAlloc
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if n != src.row {
		t.Fatalf("read %d specimens, the stream had %d", n, src.row)
	}
	t.Logf("%d specimens from %d bytes; peak heap %.1f MB", n, src.done, float64(peak)/1e6)
	// The duplicate-id index holds at most 2^21 ids (64 MB) and spills the
	// rest to disk; with the garbage collector's headroom (GOGC 100) the
	// heap stays below 256 MB whatever the size of the input.
	if peak > 256<<20 {
		t.Errorf("peak heap %d bytes exceeds 256 MB: memory grows with the input", peak)
	}
}

// BenchmarkIngest measures how fast a 100 MB results file is read and
// validated (MB/s via SetBytes) and the heap it needs.
func BenchmarkIngest(b *testing.B) {
	data, err := io.ReadAll(&rowsReader{size: 100 << 20})
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := ScanCSV(bytes.NewReader(data), "bench.csv", func(*Header, *Specimen) error { return nil }); err != nil {
			b.Fatal(err)
		}
	}
}
