package trend

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"lotproof/lots/internal/rss"
	"math/rand/v2"
	"path/filepath"
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
			d.Specimens = append(d.Specimens, lots.Specimen{ID: fmt.Sprintf("%s-%d", lot, s), Lot: lot, Supplier: sup, Material: "bar", Tested: tested,
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
