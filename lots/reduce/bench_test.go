package reduce

import (
	"bufio"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"syscall"
	"testing"

	"lotproof/lots/internal/rss"
)

// BenchmarkReduce1000x5000 parses and reduces 1,000 records of 5,000
// points each (one op), keeping every result as the reduce command does.
// It reports ns/op, B/op, allocs/op and the process's peak resident set
// size (getrusage ru_maxrss) in MiB.
func BenchmarkReduce1000x5000(b *testing.B) {
	const distinct, records = 20, 1000
	files := make([][]byte, distinct)
	for i := range files {
		sp := alu
		sp.Points, sp.Noise, sp.Toe, sp.Seed = 5000, 0.5, 0.0003, uint64(i+1)
		sp.Rp += float64(i % 7)
		var err error
		if files[i], err = Synthesize(sp); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportAllocs()
	b.ResetTimer()
	for n := 0; n < b.N; n++ {
		rs := make([]*Result, 0, records)
		for i := 0; i < records; i++ {
			recs, err := ParseBytes(files[i%distinct], "bench.rec")
			if err != nil {
				b.Fatal(err)
			}
			r, err := Reduce(recs[0], Options{})
			if err != nil {
				b.Fatal(err)
			}
			rs = append(rs, r)
		}
		if len(rs) != records {
			b.Fatal("lost results")
		}
	}
	b.StopTimer()
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err == nil {
		b.ReportMetric(float64(ru.Maxrss)/1024, "peak-RSS-MiB") // ru_maxrss is in KiB on Linux
	}
}

// writeDense writes a record of n points to path without holding it in
// memory: a Ramberg-Osgood curve (E 200 GPa, Rp 400 MPa, exponent 12)
// parametrised by stress up to Rm, a parabolic fall to 0.8 Rm, fracture,
// with normal force noise of 0.2 % of Rm; a 10 mm round bar, 50 mm gauge.
func writeDense(path string, n int) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := bufio.NewWriterSize(f, 1<<20)
	fmt.Fprintf(w, "@record\nspecimen: D\nlot: L\ndiameter: 10\ngauge length: 50\nforce unit: kN\nlength unit: mm\n@data\n")
	const E, rp, m, ag, a = 200000.0, 400.0, 12.0, 0.10, 0.18
	rm := rp * math.Pow(ag/0.002, 1/m)
	area := math.Pi * 25
	rng := rand.New(rand.NewPCG(1, 2))
	n1 := n * 6 / 10
	var buf []byte
	put := func(sig, e float64) {
		buf = strconv.AppendFloat(buf[:0], (sig+0.002*rm*rng.NormFloat64())*area/1000, 'f', 5, 64)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, e*50, 'f', 7, 64)
		buf = append(buf, '\n')
		w.Write(buf)
	}
	for i := 0; i < n1; i++ {
		sig := rm * float64(i) / float64(n1)
		put(sig, sig/E+0.002*math.Pow(sig/rp, m))
	}
	k := 0.2 * rm / ((a - ag) * (a - ag))
	for i := 1; i <= n-n1-3; i++ {
		ep := ag + (a-ag)*float64(i)/float64(n-n1-3)
		sig := rm - k*(ep-ag)*(ep-ag)
		put(sig, sig/E+ep)
	}
	for i := 1; i <= 3; i++ {
		put(5, a+0.8*rm/E+0.0005*float64(i))
	}
	w.WriteString("@end\n")
	if err := w.Flush(); err != nil {
		return err
	}
	return f.Close()
}

// BenchmarkReduce10M streams a 10,000,000-point record (about 200 MB of
// text) from a file, parses and reduces it (one op), and reports the
// process's peak resident set size; the target is below 300 MB (run it
// alone: go test -run XXX -bench Reduce10M -benchtime 1x ./lots/reduce).
func BenchmarkReduce10M(b *testing.B) {
	path := filepath.Join(b.TempDir(), "dense.rec")
	if err := writeDense(path, 10_000_000); err != nil {
		b.Fatal(err)
	}
	runtime.GC()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		f, err := os.Open(path)
		if err != nil {
			b.Fatal(err)
		}
		recs, err := Parse(f, path)
		f.Close()
		if err != nil {
			b.Fatal(err)
		}
		r, err := Reduce(recs[0], Options{})
		if err != nil {
			b.Fatal(err)
		}
		if math.IsNaN(r.Modulus) || math.IsNaN(r.Proof) || math.IsNaN(r.Tensile) {
			b.Fatalf("missing properties: %g %g %g %q", r.Modulus, r.Proof, r.Tensile, r.Warnings)
		}
		b.ReportMetric(r.Modulus/1000, "E-GPa")
		b.ReportMetric(r.Proof, "Rp-MPa")
	}
	b.StopTimer()
	b.ReportMetric(rss.PeakMB(), "peak-RSS-MiB")
}
