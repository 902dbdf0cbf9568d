package trend

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"testing"
	"time"

	"lotproof/lots"
	"lotproof/lots/store"

	"lotproof/lots/store/pgtest"
)

// testDBs gives the URL of a fresh SQLite database and, when
// LOTPROOF_TEST_PG names a server, of a fresh PostgreSQL database
// (dropped when the test ends).
func testDBs(t testing.TB) map[string]string {
	t.Helper()
	dbs := map[string]string{"sqlite": filepath.Join(t.TempDir(), "t.db")}
	pg := os.Getenv("LOTPROOF_TEST_PG")
	if pg == "" {
		t.Log("LOTPROOF_TEST_PG is not set: PostgreSQL half skipped")
		return dbs
	}
	dbs["postgres"] = pgtest.Fresh(t, pg)
	return dbs
}

// Compute reads the history through store.LotSamples (values grouped by
// the database); its result must be byte for byte the one computed from
// store.LotData (one row per measurement, as before), on both backends,
// for the demo receipts (with verdicts and limits) and the trend reference
// history, under several options.
func TestComputeSameAsFromLotData(t *testing.T) {
	ctx := context.Background()
	receipts, err := lots.ReadFile("../demo/data/receipts.csv", lots.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	hist, err := lots.ReadFile("../../testdata/trend/ref_history.csv", lots.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	verdicts := []store.Verdict{{Lot: "SR-2503-2", Spec: "OHP-MS-101 rev C", Verdict: "nonconforming"},
		{Lot: "BW-2501-1", Spec: "OHP-MS-101 rev C", Verdict: "conforming"}}
	limits := []store.SpecLimit{{Spec: "OHP-MS-101 rev C", Material: "QT bar OH-S42", Property: "tensile", Minimum: 930, Unit: "MPa"}}
	opts := []Options{{}, {By: "material", Every: "month"}, {Property: "proof", Since: "2025-01-01", Until: "2026-06-30"},
		{Baseline: "2024-Q1..2024-Q4", Limits: []store.SpecLimit{{Spec: "X", Material: "bar", Property: "tensile", Minimum: 950, Unit: "MPa"}}}}
	for name, url := range testDBs(t) {
		t.Run(name, func(t *testing.T) {
			st, err := store.Open(ctx, url)
			if err != nil {
				t.Fatal(err)
			}
			defer st.Close()
			if _, err := st.Record(ctx, receipts, verdicts, limits, store.Meta{Time: time.Unix(1e9, 0), User: "t"}); err != nil {
				t.Fatal(err)
			}
			if _, err := st.Record(ctx, hist, nil, nil, store.Meta{Time: time.Unix(1e9+1, 0), User: "t"}); err != nil {
				t.Fatal(err)
			}
			for _, o := range opts {
				got, err := Compute(ctx, st, o)
				if err != nil {
					t.Fatal(err)
				}
				data, err := st.LotData(ctx, store.Filter{Property: o.Property})
				if err != nil {
					t.Fatal(err)
				}
				vs, _ := st.LotVerdicts(ctx)
				ls, _ := st.SpecLimits(ctx)
				want, err := ComputeFrom(data, vs, append(append([]store.SpecLimit(nil), o.Limits...), ls...), o)
				if err != nil {
					t.Fatal(err)
				}
				if len(want.Periods) < 8 || len(want.Series) < 2 {
					t.Fatalf("options %+v: only %d periods, %d series", o, len(want.Periods), len(want.Series))
				}
				gj, _ := json.Marshal(got)
				wj, _ := json.Marshal(want)
				if !bytes.Equal(gj, wj) {
					t.Errorf("options %+v: the trend from LotSamples differs from the one from LotData", o)
				}
			}
		})
	}
}
