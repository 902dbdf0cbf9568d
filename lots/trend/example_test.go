package trend_test

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"time"

	"lotproof/lots"
	"lotproof/lots/store"
	"lotproof/lots/trend"
)

// Record a lot history into a throw-away SQLite database and follow the
// tensile strength of each supplier per quarter: Ppk against the minimum,
// and the signals of the control charts. The history is
// testdata/trend/ref_history.csv (random numbers for the tests: two
// suppliers, seven quarters, a -25 MPa shift in one supplier from the
// sixth quarter, 2025-Q2, which the run rules and the EWMA flag); numpy
// and scipy recompute its trend in trend_ref.json.
func ExampleRecordAndCompute() {
	d, err := lots.ReadFile("../../testdata/trend/ref_history.csv", lots.ReadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	dir, err := os.MkdirTemp("", "trend-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	limits := []store.SpecLimit{{Spec: "REF", Material: "bar", Property: "tensile", Minimum: 930, Maximum: math.NaN(), Unit: "MPa"}}
	meta := store.Meta{Time: time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC), User: "example"}
	_, res, err := trend.RecordAndCompute(context.Background(), filepath.Join(dir, "history.db"), d, nil, limits, meta, trend.Options{Property: "tensile"})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range res.Periods {
		fmt.Printf("%s %s: %d lots, mean %.1f, Ppk %.2f\n", p.Group, p.Period, p.Lots, float64(p.Mean), float64(p.Ppk))
	}
	for _, s := range res.Signals {
		fmt.Printf("signal: %s, %s %s lot %q\n", s.Rule, s.Group, s.Period, s.Lot)
	}
	// Output:
	// Ondrake Works 2024-Q1: 2 lots, mean 996.1, Ppk 1.52
	// Ondrake Works 2024-Q2: 2 lots, mean 1001.0, Ppk 2.31
	// Ondrake Works 2024-Q3: 2 lots, mean 1006.7, Ppk 1.68
	// Ondrake Works 2024-Q4: 2 lots, mean 1006.1, Ppk 1.15
	// Ondrake Works 2025-Q1: 2 lots, mean 1004.2, Ppk 1.56
	// Ondrake Works 2025-Q2: 2 lots, mean 1004.2, Ppk 1.34
	// Ondrake Works 2025-Q3: 2 lots, mean 993.6, Ppk 1.35
	// Vellmark Foundry 2024-Q1: 3 lots, mean 1003.0, Ppk 1.42
	// Vellmark Foundry 2024-Q2: 3 lots, mean 1006.9, Ppk 1.73
	// Vellmark Foundry 2024-Q3: 3 lots, mean 1001.9, Ppk 1.35
	// Vellmark Foundry 2024-Q4: 3 lots, mean 1005.1, Ppk 1.46
	// Vellmark Foundry 2025-Q1: 3 lots, mean 1006.1, Ppk 1.42
	// Vellmark Foundry 2025-Q2: 3 lots, mean 979.9, Ppk 1.52
	// Vellmark Foundry 2025-Q3: 3 lots, mean 984.1, Ppk 1.23
	// signal: we2, Vellmark Foundry 2025-Q2 lot "BF-252-3"
	// signal: we3, Vellmark Foundry 2025-Q3 lot "BF-253-3"
	// signal: we3, Vellmark Foundry 2025-Q3 lot "BF-253-2"
	// signal: we3, Vellmark Foundry 2025-Q3 lot "BF-253-1"
	// signal: ewma, Vellmark Foundry 2025-Q3 lot "BF-253-3"
	// signal: ewma, Vellmark Foundry 2025-Q3 lot "BF-253-2"
	// signal: ewma, Vellmark Foundry 2025-Q3 lot "BF-253-1"
}
