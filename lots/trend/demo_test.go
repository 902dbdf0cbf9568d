package trend

import (
	"context"
	"path/filepath"
	"testing"
	"time"

	"lotproof/lots"
	"lotproof/lots/store"
)

// The demo story itself (Coldmere Forge flagged in 2026-Q2 and not before)
// is checked where the demo is wired: cmd/lotproof TestDemo.

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
	if rec.SpecimensNew != d.Len() || rec.Verdicts != 1 {
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
