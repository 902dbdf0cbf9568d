package store

import (
	"context"
	"lotproof/lots/internal/rss"
	"path/filepath"
	"runtime"
	"testing"
)

// BenchmarkRecordMillion records 1,000,000 specimens (200,000 lots of 5,
// two properties each) into a fresh SQLite database in one import. It
// reports the heap held by the dataset itself, the peak RSS before the
// import and the peak RSS at the end (process-wide, VmHWM).
// Run: go test -run '^$' -bench RecordMillion -benchtime 1x ./lots/store/
func BenchmarkRecordMillion(b *testing.B) {
	d := dataset(b, "million.csv", synth("M", 200000, 5, 1))
	ctx := context.Background()
	runtime.GC()
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	heap, before := float64(ms.HeapInuse)/(1<<20), rss.PeakMB()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		b.StopTimer()
		s, err := Open(ctx, filepath.Join(b.TempDir(), "m.db"))
		if err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
		r, err := s.Record(ctx, d, nil, nil, Meta{Time: t0, User: "bench"})
		if err != nil {
			b.Fatal(err)
		}
		if r.SpecimensNew != 1000000 {
			b.Fatalf("%d specimens", r.SpecimensNew)
		}
		b.StopTimer()
		s.Close()
	}
	b.ReportMetric(heap, "dataset-heap-MB")
	b.ReportMetric(before, "RSS-before-MB")
	b.ReportMetric(rss.PeakMB(), "peak-RSS-MB")
}
