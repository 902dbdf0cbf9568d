package reduce

import (
	"syscall"
	"testing"
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
