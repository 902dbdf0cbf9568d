package trend

import (
	"bytes"
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/hex"
	"fmt"
	"lotproof/lots/internal/rss"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"lotproof/lots"
	"lotproof/lots/store"
	"lotproof/lots/units"
)

// BenchmarkTrend20000Lots computes the quarterly trend of 20,000 lots (10
// suppliers, 5 specimens per lot, tensile and proof, 40 quarters) read
// from a SQLite history. Run:
// go test -run '^$' -bench Trend20000 -benchtime 3x ./lots/trend/
func BenchmarkTrend20000Lots(b *testing.B) {
	mpa, _ := units.Parse("MPa")
	d := &lots.Dataset{Source: "bench.csv", Properties: []lots.Property{{Name: "tensile", Unit: mpa}, {Name: "proof", Unit: mpa}}}
	rng := rand.New(rand.NewPCG(1, 2))
	h := sha256.New()
	for l := 0; l < 20000; l++ {
		sup := fmt.Sprintf("Supplier %02d", l%10)
		q := l / 500 // 40 quarters
		tested := fmt.Sprintf("%04d-%02d-15", 2000+q/4, 3*(q%4)+1)
		lot := fmt.Sprintf("L%05d", l)
		mt, mp := 1000+6*rng.NormFloat64(), 880+6*rng.NormFloat64()
		for s := 0; s < 5; s++ {
			d.Add(lots.Specimen{ID: fmt.Sprintf("%s-%d", lot, s), Lot: lot, Supplier: sup, Material: "bar", Tested: tested,
				Values: []float64{mt + 14*rng.NormFloat64(), mp + 14*rng.NormFloat64()}})
		}
		fmt.Fprint(h, lot)
	}
	d.Digest = hex.EncodeToString(h.Sum(nil))
	ctx := context.Background()
	st, err := store.Open(ctx, filepath.Join(b.TempDir(), "t.db"))
	if err != nil {
		b.Fatal(err)
	}
	defer st.Close()
	if _, err := st.Record(ctx, d, nil, []store.SpecLimit{{Spec: "S", Material: "bar", Property: "tensile", Minimum: 930, Unit: "MPa"}}, store.Meta{Time: time.Unix(0, 0), User: "b"}); err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		r, err := Compute(ctx, st, Options{})
		if err != nil {
			b.Fatal(err)
		}
		if len(r.Periods) != 10*2*40 {
			b.Fatalf("%d periods", len(r.Periods))
		}
	}
	b.ReportMetric(rss.PeakMB(), "peak-RSS-MB")
}

// millionHistory is the history of a year of receipts at a large buyer:
// 1,000,000 specimens in 20,000 lots of 50 (10 suppliers, 40 quarters),
// tensile, proof and elongation, values to 0.1 as test reports give them.
func millionHistory() *lots.Dataset {
	mpa, _ := units.Parse("MPa")
	pct, _ := units.Parse("%")
	d := &lots.Dataset{Source: "million.csv", Properties: []lots.Property{{Name: "tensile", Unit: mpa}, {Name: "proof", Unit: mpa}, {Name: "elongation", Unit: pct}}}
	rng := rand.New(rand.NewPCG(7, 12))
	h := sha256.New()
	r1 := func(v float64) float64 { return math.Round(10*v) / 10 }
	for l := 0; l < 20000; l++ {
		sup := fmt.Sprintf("Supplier %02d", l%10)
		q := l / 500
		tested := fmt.Sprintf("%04d-%02d-15", 2000+q/4, 3*(q%4)+1)
		lot := fmt.Sprintf("L%05d", l)
		mt, mp, me := 1000+6*rng.NormFloat64(), 880+6*rng.NormFloat64(), 15+0.5*rng.NormFloat64()
		for s := 0; s < 50; s++ {
			d.Add(lots.Specimen{ID: fmt.Sprintf("%s-%02d", lot, s), Lot: lot, Supplier: sup, Material: "bar", Tested: tested,
				Values: []float64{r1(mt + 14*rng.NormFloat64()), r1(mp + 14*rng.NormFloat64()), r1(me + rng.NormFloat64())}})
		}
		fmt.Fprint(h, lot)
	}
	d.Digest = hex.EncodeToString(h.Sum(nil))
	return d
}

// BenchmarkTrendMillion computes the quarterly trend (all suppliers and
// properties, a tensile minimum) of 1,000,000 specimens in 20,000 lots
// with three properties, read from SQLite and from PostgreSQL (when
// LOTPROOF_TEST_PG names a server; a fresh database is made and dropped).
// "grouped" is the trend as lotproof runs it (store.LotSamples: the
// database groups the values by lot); "rows" computes the same trend from
// store.LotData (one row per measurement, the way before), for a ratio
// measured side by side. The history is recorded once, untimed (minutes on
// PostgreSQL). It reports ns per lot, this process's CPU seconds per
// trend, for PostgreSQL the CPU seconds of the server processes serving
// this database (read from /proc: the server must run on this machine),
// and the peak RSS while computing (high-water mark reset after
// recording). Run:
// go test -run '^$' -bench TrendMillion -benchtime 1x -timeout 60m ./lots/trend/
func BenchmarkTrendMillion(b *testing.B) {
	dbs := map[string]string{"sqlite": filepath.Join(b.TempDir(), "million.db")}
	if pg := os.Getenv("LOTPROOF_TEST_PG"); pg != "" {
		dbs["postgres"] = pg // replaced by a fresh database below
	}
	limits := []store.SpecLimit{{Spec: "S", Material: "bar", Property: "tensile", Minimum: 930, Unit: "MPa"}}
	for _, backend := range []string{"sqlite", "postgres"} {
		b.Run(backend, func(b *testing.B) {
			if dbs[backend] == "" {
				b.Skip("LOTPROOF_TEST_PG is not set")
			}
			url := dbs[backend]
			if backend == "postgres" {
				url = testDBs(b)["postgres"]
			}
			st, err := store.Open(context.Background(), url)
			if err != nil {
				b.Fatal(err)
			}
			defer st.Close()
			if _, err := st.Record(context.Background(), millionHistory(), nil, nil, store.Meta{Time: time.Unix(0, 0), User: "bench"}); err != nil {
				b.Fatal(err)
			}
			for _, path := range []string{"grouped", "rows"} {
				b.Run(path, func(b *testing.B) {
					benchTrend(b, st, url, path == "rows", limits)
				})
			}
		})
	}
}

func benchTrend(b *testing.B, st *store.Store, url string, rows bool, limits []store.SpecLimit) {
	ctx := context.Background()
	runtime.GC()
	debug.FreeOSMemory()
	resetPeakRSS()
	server := serverCPU(st, url)
	cpu0, srv0 := processCPU(), server()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var r *Result
		var err error
		if rows {
			var data []store.LotValues
			data, err = st.LotData(ctx, store.Filter{})
			if err == nil {
				vs, _ := st.LotVerdicts(ctx)
				ls, _ := st.SpecLimits(ctx)
				r, err = ComputeFrom(data, vs, append(append([]store.SpecLimit(nil), limits...), ls...), Options{})
			}
		} else {
			r, err = Compute(ctx, st, Options{Limits: limits})
		}
		if err != nil {
			b.Fatal(err)
		}
		if len(r.Periods) != 10*3*40 {
			b.Fatalf("%d periods", len(r.Periods))
		}
	}
	b.StopTimer()
	n := float64(b.N)
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/n/20000, "ns/lot")
	b.ReportMetric((processCPU()-cpu0)/n, "CPU-s/op")
	if s := server(); s >= 0 {
		b.ReportMetric((s-srv0)/n, "server-CPU-s/op")
	}
	b.ReportMetric(rss.PeakMB(), "peak-RSS-MB")
}

// processCPU is this process's user + system CPU time in seconds.
func processCPU() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return float64(ru.Utime.Nano()+ru.Stime.Nano()) / 1e9
}

// resetPeakRSS resets the peak RSS (VmHWM) of this process (Linux).
func resetPeakRSS() { os.WriteFile("/proc/self/clear_refs", []byte("5"), 0) }

// serverCPU returns a function giving the CPU seconds used so far by the
// PostgreSQL processes connected to st's database (not counting
// connections opened and closed in between, nor parallel workers, which
// the plans of the trend queries do not use), or -1 for SQLite or when
// /proc does not show them.
func serverCPU(st *store.Store, url string) func() float64 {
	if st.Backend() != store.Postgres {
		return func() float64 { return -1 }
	}
	base, _, _ := strings.Cut(url, "?")
	name := base[strings.LastIndex(base, "/")+1:]
	return func() float64 {
		// The store's connections stay open between queries (the pool
		// keeps idle connections), so their pids are stable.
		db, err := sql.Open("pgx", url)
		if err != nil {
			return -1
		}
		defer db.Close()
		rows, err := db.Query(`SELECT pid FROM pg_stat_activity WHERE datname = $1 AND pid <> pg_backend_pid()`, name)
		if err != nil {
			return -1
		}
		defer rows.Close()
		total := 0.0
		for rows.Next() {
			var pid int
			rows.Scan(&pid)
			stat, err := os.ReadFile(fmt.Sprintf("/proc/%d/stat", pid))
			if err != nil {
				return -1
			}
			f := strings.Fields(string(stat[bytes.LastIndexByte(stat, ')')+2:]))
			ut, _ := strconv.ParseFloat(f[11], 64)
			stt, _ := strconv.ParseFloat(f[12], 64)
			total += (ut + stt) / 100 // clock ticks (USER_HZ = 100 on Linux)
		}
		return total
	}
}
