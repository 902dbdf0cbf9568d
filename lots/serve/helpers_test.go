package serve

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
	"time"

	"lotproof/lots"
	"lotproof/lots/store"
	"lotproof/lots/units"

	"lotproof/lots/store/pgtest"
)

// hostile is the report's escaping-test string (lots/report/fixture_test.go),
// used here as lot, heat, specimen and supplier names.
const hostile = `<script>alert(1)</script> "q" 'a' & ]]> </svg><p>`

// backend is a database kind the tests run on; fresh gives the location
// of a new, empty database. PostgreSQL needs LOTPROOF_TEST_PG (as in
// lots/store/store_test.go; .ci/start-postgres prints a URL).
type backend struct {
	name  string
	fresh func(t testing.TB) string
}

func backends(t testing.TB) []backend {
	bs := []backend{{"sqlite", func(t testing.TB) string { return filepath.Join(t.TempDir(), "lotproof.db") }}}
	pg := os.Getenv("LOTPROOF_TEST_PG")
	bs = append(bs, backend{"postgres", func(t testing.TB) string {
		if pg == "" {
			t.Skip("LOTPROOF_TEST_PG is not set: skipping the PostgreSQL half (run .ci/start-postgres and export LOTPROOF_TEST_PG)")
		}
		return pgtest.Fresh(t, pg)
	}})
	return bs
}

// lotSpec is one synthetic lot: five specimens of tensile and proof
// strength (MPa) around the given means.
type lotSpec struct {
	lot, heat, supplier, tested string
	tensile, proof              float64
}

// dataset makes a dataset of lots as lots.ReadFile would, with a SHA-256
// over a canonical text of it.
func dataset(t testing.TB, source string, ls []lotSpec, seed uint64) *lots.Dataset {
	t.Helper()
	mpa, err := units.Parse("MPa")
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(seed, 7))
	d := &lots.Dataset{Source: source, Properties: []lots.Property{{Name: "tensile", Unit: mpa}, {Name: "proof", Unit: mpa}}}
	h := sha256.New()
	fmt.Fprintln(h, source)
	for _, l := range ls {
		for s := 1; s <= 5; s++ {
			sp := lots.Specimen{ID: fmt.Sprintf("%s/%d", l.lot, s), Lot: l.lot, Heat: l.heat, Supplier: l.supplier, Material: "bar 42",
				Tested: l.tested, Condition: "RT", Values: []float64{l.tensile + 8*rng.NormFloat64(), l.proof + 8*rng.NormFloat64()}, Line: d.Len() + 2}
			d.Add(sp)
			fmt.Fprintf(h, "%q %q %q %q %v\n", sp.ID, sp.Lot, sp.Supplier, sp.Tested, sp.Values)
		}
	}
	d.Digest = hex.EncodeToString(h.Sum(nil))
	return d
}

// history writes a small history into a fresh database at loc: two
// suppliers (one named with the hostile string) over six quarters, a lot
// rejected in the last one, the limits of one specification.
func history(t testing.TB, loc string) []lotSpec {
	t.Helper()
	var ls []lotSpec
	for q := 0; q < 6; q++ {
		for i, sup := range []string{"Brindle Works", hostile} {
			for k := 0; k < 2; k++ {
				lot := fmt.Sprintf("L%d-%d%d", q, i, k)
				if i == 1 && k == 1 {
					lot = hostile + fmt.Sprint(q)
				}
				ls = append(ls, lotSpec{lot: lot, heat: fmt.Sprintf("H%d%d", q, i), supplier: sup,
					tested: fmt.Sprintf("%d-%02d-1%d", 2025+3*q/12, 3*q%12+1, k), tensile: 1000, proof: 880})
			}
		}
	}
	if len(ls) > 0 {
		ls[len(ls)-1].tensile = 930 // below the minimum 950: rejected
	}
	d := dataset(t, "receipts "+hostile+".csv", ls, 1)
	var verdicts []store.Verdict
	for _, l := range ls {
		v := "conforming"
		if l.tensile < 950 {
			v = "nonconforming"
		}
		verdicts = append(verdicts, store.Verdict{Lot: l.lot, Spec: "SPEC-9 rev A", Verdict: v})
	}
	record(t, loc, d, verdicts, []store.SpecLimit{{Spec: "SPEC-9 rev A", Material: "bar 42", Property: "tensile", Minimum: 950, Maximum: nanv(), Unit: "MPa"}},
		time.Date(2026, 11, 2, 9, 0, 0, 0, time.UTC))
	return ls
}

func nanv() float64 { return math.NaN() }

func record(t testing.TB, loc string, d *lots.Dataset, v []store.Verdict, l []store.SpecLimit, at time.Time) {
	t.Helper()
	ctx := context.Background()
	st, err := store.Open(ctx, loc)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	if _, err := st.Record(ctx, d, v, l, store.Meta{Time: at, User: "tester", Version: "test"}); err != nil {
		t.Fatal(err)
	}
}

// newServer opens loc read-only and makes a server over it.
func newServer(t testing.TB, loc string, opt Options) (*Server, *DB) {
	t.Helper()
	db, err := OpenReadOnly(context.Background(), loc)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	s, err := New(db, nil, opt)
	if err != nil {
		t.Fatal(err)
	}
	return s, db
}
