package main

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"strconv"
	"syscall"
	"testing"
	"time"

	"lotproof/lots/allowables"
	"lotproof/lots/equivalence"
	"lotproof/lots/render"
	"lotproof/lots/scale"
	"lotproof/lots/units"
)

// The scale benchmarks run whole commands on a generated, invented file of
// a year of receipts: 1,000,000 specimens in 20,000 lots with three
// properties (LOTPROOF_SCALE_SPECIMENS and LOTPROOF_SCALE_LOTS change the
// size; LOTPROOF_SCALE_INTERLEAVE > 1 writes lots interleaved, a file not
// grouped by lot). They report MB/s of input, ns per specimen, CPU seconds
// per run and the peak resident set size of the run in MiB. Targets (issue
// 12): accept with three minimums at least 5x faster than the pandas +
// scipy script (testdata/bench/compare.sh) and peak RSS at most 250 MiB at
// 1M and 5M specimens; summary at least 100 MB/s with RSS independent of
// the file size; equivalence, like accept, flat in the number of lots
// beyond its results; allowables holds the whole file compactly (see
// lots.BenchmarkDatasetBytes).
//
//	go test ./cmd/lotproof -run XXX -bench Scale -benchtime 1x

func scaleFile(b *testing.B) (name string, specimens int) {
	b.Helper()
	o := scale.Options{Specimens: envInt("LOTPROOF_SCALE_SPECIMENS", 1_000_000), Lots: envInt("LOTPROOF_SCALE_LOTS", 20_000),
		Interleave: envInt("LOTPROOF_SCALE_INTERLEAVE", 1)}
	name = filepath.Join(b.TempDir(), "receipts.csv")
	f, err := os.Create(name)
	if err != nil {
		b.Fatal(err)
	}
	n, err := scale.Write(f, o)
	if err == nil {
		err = f.Close()
	}
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(n)
	return name, o.Specimens
}

func envInt(name string, def int) int {
	if v, err := strconv.Atoi(os.Getenv(name)); err == nil && v > 0 {
		return v
	}
	return def
}

// measure runs fn b.N times and reports the metrics.
func measure(b *testing.B, specimens int, fn func() error) {
	b.Helper()
	runtime.GC()
	debug.FreeOSMemory()
	if !scale.ResetPeakRSS() {
		b.Log("cannot reset the peak RSS: it includes the set-up")
	}
	cpu0 := cpuSeconds()
	start := time.Now()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := fn(); err != nil {
			var v verdictError
			if !errors.As(err, &v) {
				b.Fatal(err)
			}
		}
	}
	b.StopTimer()
	el := time.Since(start)
	b.ReportMetric(float64(el.Nanoseconds())/float64(b.N)/float64(specimens), "ns/specimen")
	b.ReportMetric((cpuSeconds()-cpu0)/float64(b.N), "cpu-s/op")
	b.ReportMetric(scale.PeakRSS(), "peak-RSS-MiB")
}

func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	tv := func(t syscall.Timeval) float64 { return float64(t.Sec) + float64(t.Usec)/1e6 }
	return tv(ru.Utime) + tv(ru.Stime)
}

var discard = streams{In: nil, Out: io.Discard, Err: io.Discard}

func benchAccept(b *testing.B, spec string) {
	name, n := scaleFile(b)
	o := acceptOptions{Data: name, Specs: []string{"../../testdata/bench/" + spec}, Input: inputOptions{GroupBy: "lot"},
		Out: output{Format: render.CSV, System: units.SI}}
	measure(b, n, func() error { return runAccept(o, discard) })
}

// BenchmarkScaleAcceptOne: accept, one minimum (tensile).
func BenchmarkScaleAcceptOne(b *testing.B) { benchAccept(b, "spec-one.yaml") }

// BenchmarkScaleAcceptThree: accept, three minimums.
func BenchmarkScaleAcceptThree(b *testing.B) { benchAccept(b, "spec-three.yaml") }

// BenchmarkScaleSummary: summary, whole command (CSV output).
func BenchmarkScaleSummary(b *testing.B) {
	name, n := scaleFile(b)
	o := summaryOptions{Data: name, Input: inputOptions{GroupBy: "lot"}, Out: output{Format: render.CSV, System: units.SI}}
	measure(b, n, func() error { return runSummary(o, discard) })
}

// BenchmarkScaleRecord: record into a new SQLite database with three
// minimums (verdicts stored), whole command.
func BenchmarkScaleRecord(b *testing.B) {
	name, n := scaleFile(b)
	dir := b.TempDir()
	i := 0
	measure(b, n, func() error {
		i++
		o := recordOptions{Data: name, Specs: []string{"../../testdata/bench/spec-three.yaml"}, Input: inputOptions{GroupBy: "lot"},
			DB: filepath.Join(dir, "h"+strconv.Itoa(i)+".db"), Out: output{Format: render.CSV, System: units.SI}, User: "bench"}
		return runRecord(o, discard)
	})
}

// BenchmarkScaleEquivalence: equivalence of every lot's tensile strength
// to a baseline, JSON output (one lot at a time; the results are kept).
func BenchmarkScaleEquivalence(b *testing.B) {
	name, n := scaleFile(b)
	o := equivalenceOptions{Data: name, Test: equivalence.Options{Mean: 1000, SD: 20, Alpha: 0.05, Property: "tensile"},
		Input: inputOptions{GroupBy: "lot"}, Out: output{Format: render.JSON, System: units.SI}}
	measure(b, n, func() error { return runEquivalence(o, discard) })
}

// BenchmarkScaleAllowables: design values of the three properties over
// every lot, JSON output (the whole file held in the dataset's columns).
func BenchmarkScaleAllowables(b *testing.B) {
	name, n := scaleFile(b)
	def := allowables.DefaultOptions()
	o := allowablesOptions{Data: name, AContent: def.A.Content, BContent: def.B.Content, Confidence: def.A.Confidence, Seed: def.Seed, Sims: def.Sims,
		Method: "auto", Date: "2026-01-01", Input: inputOptions{GroupBy: "lot"}, Out: output{Format: render.JSON, System: units.SI}}
	measure(b, n, func() error { return runAllowables(o, discard) })
}
