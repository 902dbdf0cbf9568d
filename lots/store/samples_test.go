package store

import (
	"context"
	"database/sql/driver"
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"
)

// samplesRows is a history that exercises what LotSamples must get right:
// specimen ids whose byte order differs from their insertion order and
// from numeric order ("-10" before "-9", upper case before lower case,
// multi-byte UTF-8), missing values (a lot without proof values, a
// specimen without any value whose early test date still counts), empty
// and mixed test dates, one-specimen lots, values at full binary64
// precision, and two imports.
func samplesRows(seed uint64) []specRow {
	rng := rand.New(rand.NewPCG(seed, 7))
	suffixes := []string{"9", "10", "b", "B", "a", "ä", "Z", "1", "01", "é-2", "_", "~"}
	var rows []specRow
	for l := 0; l < 40; l++ {
		lot := fmt.Sprintf("Lot%c-%d", 'a'+rune(l%3), 40-l) // lots out of order too
		n := []int{1, 2, 3, 5, 12}[l%5]
		perm := rng.Perm(len(suffixes))
		for k := 0; k < n; k++ {
			tested := fmt.Sprintf("2025-%02d-%02d", 1+l%12, 10+k)
			if l%7 == 0 {
				tested = ""
			} else if l%5 == 1 && k == 0 {
				tested = ""
			}
			r := specRow{id: lot + "-" + suffixes[perm[k]], lot: lot, supplier: []string{"Mill A", "Mill B"}[l%2], material: "bar",
				tested: tested, tensile: 1000 + 15*rng.NormFloat64() + rng.Float64()*1e-9, proof: 880 + 15*rng.NormFloat64()}
			if l%6 == 2 {
				r.proof = math.NaN()
			}
			rows = append(rows, r)
		}
	}
	// A specimen without any value, tested before the rest of its lot.
	rows = append(rows, specRow{id: "Lotb-39-000", lot: "Lotb-39", supplier: "Mill B", material: "bar", tested: "2024-12-31",
		tensile: math.NaN(), proof: math.NaN()})
	return rows
}

// LotSamples returns exactly what LotData returns, less the ids: the same
// lots, properties, units, suppliers, materials and test dates, and the
// values bit for bit in the same order, on both backends, with and without
// a property filter.
func TestLotSamplesMatchesLotData(t *testing.T) {
	ctx := context.Background()
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			s := open(t, b.fresh(t))
			for _, f := range []Filter{{}, {Property: "proof"}} {
				if got, err := s.LotSamples(ctx, f); err != nil || len(got) != 0 {
					t.Fatalf("empty history: %d groups, %v", len(got), err)
				}
			}
			rows := samplesRows(1)
			if _, err := s.Record(ctx, dataset(t, "a.csv", rows[:len(rows)/2]), nil, nil, Meta{Time: t0, User: "t"}); err != nil {
				t.Fatal(err)
			}
			if _, err := s.Record(ctx, dataset(t, "b.csv", rows[len(rows)/2:]), nil, nil, Meta{Time: t0, User: "t"}); err != nil {
				t.Fatal(err)
			}
			for _, f := range []Filter{{}, {Property: "tensile"}, {Property: "proof"}, {Property: "none such"}} {
				want, err := s.LotData(ctx, f)
				if err != nil {
					t.Fatal(err)
				}
				got, err := s.LotSamples(ctx, f)
				if err != nil {
					t.Fatal(err)
				}
				if f.Property != "none such" && len(want) < 30 {
					t.Fatalf("filter %+v: only %d groups recorded", f, len(want))
				}
				sameSamples(t, fmt.Sprintf("filter %+v", f), want, got)
			}
			// The specimen without values moved its lot's test date.
			got, _ := s.LotSamples(ctx, Filter{Property: "tensile"})
			for _, v := range got {
				if v.Lot == "Lotb-39" && v.Tested != "2024-12-31" {
					t.Errorf("Lotb-39 tested %q, want 2024-12-31", v.Tested)
				}
			}
		})
	}
}

func sameSamples(t *testing.T, what string, want, got []LotValues) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d groups, want %d", what, len(got), len(want))
	}
	for i := range want {
		w, g := want[i], got[i]
		if g.Lot != w.Lot || g.Supplier != w.Supplier || g.Material != w.Material || g.Tested != w.Tested ||
			g.Property != w.Property || g.Unit != w.Unit || g.IDs != nil {
			t.Fatalf("%s: group %d is %+v, want %+v", what, i, g, w)
		}
		// Every other field too (a field added to LotValues must be
		// filled by LotSamples as well).
		wc, gc := w, g
		wc.IDs, wc.Values, gc.Values = nil, nil, nil
		if !reflect.DeepEqual(wc, gc) {
			t.Fatalf("%s: group %d is %+v, want %+v", what, i, gc, wc)
		}
		if len(g.Values) != len(w.Values) {
			t.Fatalf("%s: %s %s has %d values, want %d", what, w.Lot, w.Property, len(g.Values), len(w.Values))
		}
		for k := range w.Values {
			if math.Float64bits(g.Values[k]) != math.Float64bits(w.Values[k]) {
				t.Fatalf("%s: %s %s value %d (specimen %s) is %v, want %v", what, w.Lot, w.Property, k, w.IDs[k], g.Values[k], w.Values[k])
			}
		}
	}
}

// The packed forms read back what was packed, and a damaged one is an
// error, not a panic.
func TestLotValuesPacking(t *testing.T) {
	a := &lotValues{}
	in := []struct {
		id, prop string
		v        float64
	}{{"s-9", "tensile", 1.5}, {"s-10", "tensile", -2.25}, {"s-9", "proof", 1e-300}, {"s-1", "proof", math.MaxFloat64}, {"s-10", "proof", 0.1}}
	for _, r := range in {
		if err := a.Step(nil, []driver.Value{r.id, r.prop, r.v}); err != nil {
			t.Fatal(err)
		}
	}
	if err := a.Step(nil, []driver.Value{"s-0", nil, nil}); err != nil { // specimen without measurements
		t.Fatal(err)
	}
	blob, err := a.WindowValue(nil)
	if err != nil {
		t.Fatal(err)
	}
	got := map[string][]float64{}
	var order []string
	if err := decodeLotValues(blob.([]byte), func(p string, v []float64) error {
		got[p] = v
		order = append(order, p)
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	// Byte order of the ids: "s-1" < "s-10" < "s-9".
	want := map[string][]float64{"proof": {math.MaxFloat64, 0.1, 1e-300}, "tensile": {-2.25, 1.5}}
	if fmt.Sprint(order) != "[proof tensile]" || fmt.Sprint(got) != fmt.Sprint(want) {
		t.Fatalf("got %v in order %v, want %v", got, order, want)
	}
	b := blob.([]byte)
	for _, cut := range []int{1, 3, len(b) - 1} {
		if err := decodeLotValues(b[:cut], func(string, []float64) error { return nil }); err == nil {
			t.Errorf("cut at %d of %d bytes: no error", cut, len(b))
		}
	}
	if err := a.Step(nil, []driver.Value{"s-2", "tensile", "x"}); err == nil {
		t.Error("a text value: no error")
	}
}

// TestLotSamplesAfterAdditions: values added to specimens already stored
// (a later file gives a property they lacked) carry the stored lot, so
// LotSamples (grouping by the measurements' lot on PostgreSQL) still
// agrees with LotData (which joins the specimens), on both backends.
func TestLotSamplesAfterAdditions(t *testing.T) {
	ctx := context.Background()
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			s := open(t, b.fresh(t))
			full := synth("AD", 4, 5, 3)
			first := slices.Clone(full)
			for i := range first {
				first[i].proof = math.NaN() // proof comes later
			}
			if _, err := s.Record(ctx, dataset(t, "tensile.csv", first), nil, nil, Meta{Time: t0, User: "t"}); err != nil {
				t.Fatal(err)
			}
			r, err := s.Record(ctx, dataset(t, "both.csv", full), nil, nil, Meta{Time: t0, User: "t"})
			if err != nil || r.ValuesAdded != len(full) {
				t.Fatalf("second file: %+v, %v; want %d values added", r, err, len(full))
			}
			want, err := s.LotData(ctx, Filter{Property: "proof"})
			if err != nil || len(want) != 4 {
				t.Fatalf("proof groups %d (%v), want 4", len(want), err)
			}
			got, err := s.LotSamples(ctx, Filter{Property: "proof"})
			if err != nil {
				t.Fatal(err)
			}
			sameSamples(t, "proof added later", want, got)
		})
	}
}

// On SQLite the per-lot values and the test dates are read from the
// covering indexes of schema version 5 (no row lookups, no sort): the
// query plans say so.
func TestLotSamplesSQLitePlans(t *testing.T) {
	ctx := context.Background()
	s := open(t, filepath.Join(t.TempDir(), "plans.db"))
	for q, want := range map[string]string{
		`SELECT lot, ` + lotValuesFunc + `(specimen, property, value) FROM measurements GROUP BY lot`:                      "USING COVERING INDEX measurements_lot_values",
		`SELECT lot, ` + lotValuesFunc + `(specimen, property, value) FROM measurements WHERE property = 'x' GROUP BY lot`: "USING COVERING INDEX measurements_lot_values",
		`SELECT lot, MIN(NULLIF(tested, '')) FROM specimens GROUP BY lot`:                                                  "USING COVERING INDEX specimens_lot_tested",
	} {
		rows, err := s.db.QueryContext(ctx, `EXPLAIN QUERY PLAN `+q)
		if err != nil {
			t.Fatal(err)
		}
		var plan []string
		for rows.Next() {
			var id, parent, unused int
			var detail string
			if err := rows.Scan(&id, &parent, &unused, &detail); err != nil {
				t.Fatal(err)
			}
			plan = append(plan, detail)
		}
		rows.Close()
		if got := strings.Join(plan, "; "); !strings.Contains(got, want) || strings.Contains(got, "TEMP B-TREE") {
			t.Errorf("%s\nplan: %s\nwant %s without a temporary B-tree", q, got, want)
		}
	}
}
