package trend

import (
	"context"
	"math"
	"path/filepath"
	"testing"
	"time"

	"lotproof/lots"
	"lotproof/lots/store"
)

// recordDemo records the invented demo receipts into a fresh SQLite
// database with the steel specification's minimums (tensile 930 MPa,
// proof 800 MPa; lots/demo/data/spec-steel-bar.yaml).
func recordDemo(t testing.TB) *store.Store {
	t.Helper()
	d, err := lots.ReadFile("../demo/data/receipts.csv", lots.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	st, err := store.Open(context.Background(), filepath.Join(t.TempDir(), "demo.db"))
	if err != nil {
		t.Fatal(err)
	}
	limits := []store.SpecLimit{
		{Spec: "OHP-MS-101 rev C", Material: "QT bar OH-S42", Property: "tensile", Minimum: 930, Maximum: math.NaN(), Unit: "MPa"},
		{Spec: "OHP-MS-101 rev C", Material: "QT bar OH-S42", Property: "proof", Minimum: 800, Maximum: math.NaN(), Unit: "MPa"},
	}
	if _, err := st.Record(context.Background(), d, nil, limits, store.Meta{Time: time.Date(2027, 1, 5, 0, 0, 0, 0, time.UTC), User: "demo"}); err != nil {
		t.Fatal(err)
	}
	return st
}

// The demo story (invented data, so this checks the demo, not the
// statistics): Coldmere Forge drifts down from 2026-Q2. The trend must flag
// it in 2026-Q2 in tensile strength and must not flag it in any property
// before 2026-Q2. Every signal is logged (go test -v) for tuning the demo.
func TestDemoScenario(t *testing.T) {
	st := recordDemo(t)
	defer st.Close()
	r, err := Compute(context.Background(), st, Options{})
	if err != nil {
		t.Fatal(err)
	}
	flagged := map[string]bool{}
	for _, s := range r.Signals {
		t.Logf("%-11s %-22s %-18s %s %-10s value %8.4g limit %8.4g  %s", s.Rule, s.Group, s.Property, s.Period, s.Lot, float64(s.Value), float64(s.Limit), s.Detail)
		if s.Group == "Coldmere Forge" {
			if s.Period < "2026-Q2" {
				t.Errorf("Coldmere Forge flagged before its drift: %+v", s)
			}
			flagged[s.Property+" "+s.Period] = true
		}
	}
	if !flagged["tensile 2026-Q2"] {
		t.Error("Coldmere Forge tensile not flagged in 2026-Q2")
	}
}

// RecordAndCompute (the demo's entry point) gives the same trend as
// recording and computing step by step.
func TestRecordAndCompute(t *testing.T) {
	d, err := lots.ReadFile("../demo/data/receipts.csv", lots.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	verdicts := []store.Verdict{{Lot: "SR-2503-2", Spec: "OHP-MS-101 rev C", Verdict: "nonconforming"}}
	rec, res, err := RecordAndCompute(context.Background(), filepath.Join(t.TempDir(), "d.db"), d, verdicts, nil,
		store.Meta{Time: time.Date(2027, 1, 5, 0, 0, 0, 0, time.UTC), User: "demo"}, Options{Property: "tensile"})
	if err != nil {
		t.Fatal(err)
	}
	if rec.SpecimensNew != len(d.Specimens) || rec.Verdicts != 1 {
		t.Fatalf("record %+v", rec)
	}
	rejected := 0
	for _, p := range res.Periods {
		rejected += p.LotsRejected
		if p.Group == "Sallow Ridge Mills" && p.Period == "2025-Q3" && (p.LotsRejected != 1 || p.LotsJudged != 1) {
			t.Errorf("row %+v", p)
		}
	}
	if rejected != 1 || len(res.Periods) != 5*8 {
		t.Errorf("%d rejected lots in %d rows", rejected, len(res.Periods))
	}
	for _, s := range res.Series {
		if s.Group == "Sallow Ridge Mills" && (len(s.Notes) == 0 || s.Notes[0] != "left out of the baseline as rejected lots: SR-2503-2") {
			t.Errorf("notes %v", s.Notes)
		}
	}
	if _, _, err := RecordAndCompute(context.Background(), "postgres://x@y/z", d, nil, nil, store.Meta{}, Options{}); err == nil {
		t.Error("PostgreSQL URL accepted")
	}
}
