package trend

import (
	"context"
	"fmt"

	"lotproof/lots"
	"lotproof/lots/store"
)

// RecordAndCompute records a dataset, with its lot verdicts and the
// specification limits used, into the SQLite database file dbPath (created
// if needed; give a path in a temporary folder for a throw-away history)
// and computes the trend of everything recorded there. It is the one call
// the demo needs; the database is closed before it returns.
func RecordAndCompute(ctx context.Context, dbPath string, d *lots.Dataset, verdicts []store.Verdict, limits []store.SpecLimit, meta store.Meta, o Options) (*store.RecordResult, *Result, error) {
	if store.IsPostgres(dbPath) {
		return nil, nil, fmt.Errorf("trend: RecordAndCompute takes a SQLite file path, not %q", dbPath)
	}
	st, err := store.Open(ctx, dbPath)
	if err != nil {
		return nil, nil, err
	}
	defer st.Close()
	rec, err := st.Record(ctx, d, verdicts, limits, meta)
	if err != nil {
		return nil, nil, err
	}
	res, err := Compute(ctx, st, o)
	if err != nil {
		return rec, nil, err
	}
	return rec, res, nil
}
