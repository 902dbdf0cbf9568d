package serve

import (
	"context"
	"fmt"
	"io"
	"math/rand/v2"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"sync"
	"testing"
	"time"

	"lotproof/lots/internal/rss"
	"lotproof/lots/store"
)

// big is a SQLite history of 20,000 lots (10 suppliers, 5 specimens of two
// properties per lot, 40 quarters, every 25th lot rejected), made once for
// the benchmarks of this package.
var big struct {
	once sync.Once
	dir  string
	loc  string
	lots []lotSpec
	err  error
}

func TestMain(m *testing.M) {
	code := m.Run()
	if big.dir != "" {
		os.RemoveAll(big.dir)
	}
	os.Exit(code)
}

func bigHistory(b *testing.B) string {
	big.once.Do(func() {
		big.dir, big.err = os.MkdirTemp("", "lotproof-serve-bench-")
		if big.err != nil {
			return
		}
		big.loc = filepath.Join(big.dir, "big.db")
		rng := rand.New(rand.NewPCG(3, 4))
		for l := 0; l < 20000; l++ {
			q := l / 500
			big.lots = append(big.lots, lotSpec{lot: fmt.Sprintf("L%05d", l), heat: fmt.Sprintf("H%04d", l/3), supplier: fmt.Sprintf("Supplier %02d", l%10),
				tested: fmt.Sprintf("%04d-%02d-15", 2000+q/4, 3*(q%4)+1), tensile: 1000 + 6*rng.NormFloat64(), proof: 880 + 6*rng.NormFloat64()})
		}
		d := dataset(b, "big.csv", big.lots, 5)
		var vs []store.Verdict
		for i, l := range big.lots {
			v := "conforming"
			if i%25 == 0 {
				v = "nonconforming"
			}
			vs = append(vs, store.Verdict{Lot: l.lot, Spec: "SPEC-9 rev A", Verdict: v})
		}
		record(b, big.loc, d, vs, []store.SpecLimit{{Spec: "SPEC-9 rev A", Material: "bar 42", Property: "tensile", Minimum: 950, Maximum: nanv(), Unit: "MPa"}},
			time.Date(2026, 11, 2, 9, 0, 0, 0, time.UTC))
	})
	if big.err != nil {
		b.Fatal(big.err)
	}
	return big.loc
}

// percentile returns the p-quantile (nearest rank) of sorted durations, in
// milliseconds.
func percentile(d []time.Duration, p float64) float64 {
	if len(d) == 0 {
		return 0
	}
	i := int(float64(len(d))*p+0.5) - 1
	i = max(0, min(len(d)-1, i))
	return float64(d[i]) / 1e6
}

// BenchmarkOverview20000Lots serves the overview page of a 20,000-lot
// SQLite history, reading the database's fingerprint on every request (the
// trend itself is computed once, when the history changes; cold-ms is that
// computation). Target: p99 under 200 ms. Run:
// go test -run '^$' -bench Overview20000 -benchtime 200x ./lots/serve/
func BenchmarkOverview20000Lots(b *testing.B) {
	loc := bigHistory(b)
	s, _ := newServer(b, loc, Options{})
	s.cache.every = 0
	start := time.Now()
	if _, err := s.Warm(context.Background()); err != nil {
		b.Fatal(err)
	}
	cold := time.Since(start)
	var ds []time.Duration
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		t0 := time.Now()
		r := httptest.NewRequest("GET", "/", nil)
		w := httptest.NewRecorder()
		s.ServeHTTP(w, r)
		if w.Code != 200 {
			b.Fatalf("overview: %d", w.Code)
		}
		ds = append(ds, time.Since(t0))
	}
	b.StopTimer()
	slices.Sort(ds)
	b.ReportMetric(float64(cold)/1e6, "cold-ms")
	b.ReportMetric(percentile(ds, 0.5), "p50-ms")
	b.ReportMetric(percentile(ds, 0.99), "p99-ms")
	b.ReportMetric(rss.PeakMB(), "peak-RSS-MB")
}

// BenchmarkLoad8x500 runs 8 clients of 500 requests each over loopback
// TCP against the 20,000-lot history (overview, supplier pages, lot pages,
// searches, JSON and US units in turn), fails on any error or status other
// than 200, and reports the latency percentiles and the heap growth over
// the run (after a GC, once every page was served once; flat memory is
// near 0). Run:
// go test -run '^$' -bench Load8x500 -benchtime 1x ./lots/serve/
func BenchmarkLoad8x500(b *testing.B) {
	loc := bigHistory(b)
	s, _ := newServer(b, loc, Options{MaxInFlight: 16})
	if _, err := s.Warm(context.Background()); err != nil {
		b.Fatal(err)
	}
	srv := httptest.NewServer(s)
	defer srv.Close()
	targets := []string{"/", "/?format=json", "/search?q=H00", "/?units=us"}
	for i := 0; i < 10; i++ {
		sup := "/supplier/" + url.PathEscape(fmt.Sprintf("Supplier %02d", i))
		targets = append(targets, sup, sup+"?period=2009-Q3", sup+"?format=json&units=us")
	}
	for i := 0; i < 40; i++ {
		targets = append(targets, "/lot/"+big.lots[i*497].lot, "/lot/"+big.lots[i*311].lot+"?format=json&units=us")
	}
	const clients, each = 8, 500
	// One request per target first: what the server caches per state of
	// the database (figures, supplier JSON) is then in place, and the heap
	// growth measured below is what serving itself leaves behind.
	for _, target := range targets {
		resp, err := http.Get(srv.URL + target)
		if err != nil {
			b.Fatal(err)
		}
		io.Copy(io.Discard, resp.Body)
		resp.Body.Close()
	}
	heap := func() uint64 {
		runtime.GC()
		var m runtime.MemStats
		runtime.ReadMemStats(&m)
		return m.HeapInuse
	}
	var all []time.Duration
	var growth float64
	b.ResetTimer()
	for n := 0; n < b.N; n++ {
		before := heap()
		var mu sync.Mutex
		var wg sync.WaitGroup
		errs := make(chan error, clients)
		for c := 0; c < clients; c++ {
			wg.Add(1)
			go func(c int) {
				defer wg.Done()
				client := &http.Client{Timeout: 30 * time.Second}
				var ds []time.Duration
				for i := 0; i < each; i++ {
					target := targets[(c*each+i*7)%len(targets)]
					t0 := time.Now()
					resp, err := client.Get(srv.URL + target)
					if err != nil {
						errs <- err
						return
					}
					_, err = io.Copy(io.Discard, resp.Body)
					resp.Body.Close()
					if err != nil || resp.StatusCode != 200 {
						errs <- fmt.Errorf("%s: %d %v", target, resp.StatusCode, err)
						return
					}
					ds = append(ds, time.Since(t0))
				}
				mu.Lock()
				all = append(all, ds...)
				mu.Unlock()
			}(c)
		}
		wg.Wait()
		close(errs)
		for err := range errs {
			b.Fatal(err)
		}
		growth = float64(int64(heap())-int64(before)) / (1 << 20)
	}
	b.StopTimer()
	slices.Sort(all)
	if len(all) != b.N*clients*each {
		b.Fatalf("%d answers of %d requests", len(all), b.N*clients*each)
	}
	b.ReportMetric(percentile(all, 0.5), "p50-ms")
	b.ReportMetric(percentile(all, 0.99), "p99-ms")
	b.ReportMetric(percentile(all, 1), "max-ms")
	b.ReportMetric(growth, "heap-growth-MB")
	b.ReportMetric(rss.PeakMB(), "peak-RSS-MB")
}

// BenchmarkPages20000Lots serves each kind of page of the 20,000-lot
// history in turn (no network), to show where the time of the load test
// goes. Run:
// go test -run '^$' -bench Pages20000 ./lots/serve/
func BenchmarkPages20000Lots(b *testing.B) {
	loc := bigHistory(b)
	s, _ := newServer(b, loc, Options{})
	if _, err := s.Warm(context.Background()); err != nil {
		b.Fatal(err)
	}
	for _, c := range []struct{ name, target string }{
		{"overview", "/"},
		{"overview-json", "/?format=json"},
		{"supplier", "/supplier/Supplier%2003"},
		{"supplier-period", "/supplier/Supplier%2003?period=2009-Q3"},
		{"supplier-json", "/supplier/Supplier%2003?format=json"},
		{"lot", "/lot/L12345"},
		{"lot-json", "/lot/L12345?format=json"},
		{"search-lot", "/search?q=L1234"},
		{"search-heat", "/search?q=H0412"},
	} {
		b.Run(c.name, func(b *testing.B) {
			var bytes int
			for i := 0; i < b.N; i++ {
				r := httptest.NewRequest("GET", c.target, nil)
				w := httptest.NewRecorder()
				s.ServeHTTP(w, r)
				if w.Code != 200 {
					b.Fatalf("%s: %d", c.target, w.Code)
				}
				bytes = w.Body.Len()
			}
			b.ReportMetric(float64(bytes)/1024, "page-KiB")
		})
	}
}
