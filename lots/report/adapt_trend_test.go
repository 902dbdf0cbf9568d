package report

import (
	"bytes"
	"fmt"
	"math"
	"strings"
	"testing"

	"lotproof/lots/store"
	"lotproof/lots/trend"
)

// layoutTrend computes a trend over made-up lots of two groups (layout
// input only: normal quantiles in a fixed order, one group drifting down
// in the last periods, one rejected lot).
func layoutTrend(t *testing.T) *trend.Result {
	t.Helper()
	var data []store.LotValues
	verdicts := map[string][]store.Verdict{}
	months := []string{"01", "04", "07", "10"}
	for gi, g := range []string{"Group A", hostile} {
		for q := range 8 {
			for l := range 3 {
				lot := fmt.Sprintf("G%d-%d-%d", gi, q, l)
				mu := 612.0
				if gi == 1 && q >= 6 {
					mu -= 12 * float64(q-5)
				}
				vals := spread(5, mu+3*math.Sin(float64(q*3+l)), 6)
				ids := make([]string, 5)
				for i := range ids {
					ids[i] = fmt.Sprintf("%s-%d", lot, i+1)
				}
				data = append(data, store.LotValues{Lot: lot, Supplier: g, Material: "bar", Tested: fmt.Sprintf("%d-%s-%02d", 2025+q/4, months[q%4], 10+l),
					Property: "tensile", Unit: "MPa", IDs: ids, Values: vals})
				v := "conforming"
				if gi == 1 && q == 7 && l == 2 {
					v = "nonconforming"
				}
				verdicts[lot] = []store.Verdict{{Lot: lot, Spec: "S", Verdict: v}}
			}
		}
	}
	limits := []store.SpecLimit{{Spec: "S", Material: "bar", Property: "tensile", Minimum: 570, Maximum: math.NaN(), Unit: "MPa"}}
	r, err := trend.ComputeFrom(data, verdicts, limits, trend.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestTrendSection: every series gets its two charts, every property its
// mean and Ppk plots, signals are marked on the charts, and the Ppk cells
// carry the marks of PpkTarget.
func TestTrendSection(t *testing.T) {
	r := layoutTrend(t)
	sec, err := TrendSection(r, true, nil)
	if err != nil {
		t.Fatal(err)
	}
	figs, signalled := 0, 0
	for _, b := range sec.Blocks {
		if f, ok := b.(*Figure); ok {
			figs++
			if bytes.Contains(f.SVG, []byte("signal (")) {
				signalled++
			}
		}
	}
	nanEWMA := 0
	for _, s := range r.Series {
		for _, p := range s.Points {
			if math.IsNaN(float64(p.EWMA)) {
				nanEWMA++
			}
		}
	}
	leftOut := 0
	for _, b := range sec.Blocks {
		if f, ok := b.(*Figure); ok && strings.Contains(f.Caption, "left out") {
			leftOut++
		}
	}
	if (nanEWMA > 0) != (leftOut > 0) {
		t.Errorf("%d points without an EWMA value, %d captions saying lots are left out", nanEWMA, leftOut)
	}
	if want := 2*len(r.Series) + sCharts(r, false) + 2; figs != want {
		t.Errorf("%d figures, want %d (individuals and EWMA per series, S charts, mean and Ppk trend)", figs, want)
	}
	if sCharts(r, false) == 0 {
		t.Error("no series has an S chart")
	}
	if len(r.Signals) > 0 && signalled == 0 {
		t.Errorf("%d signals but no chart marks any", len(r.Signals))
	}
	periods := sec.Blocks[0].(*Table)
	if len(periods.Rows) != len(r.Periods) {
		t.Fatalf("%d period rows, want %d", len(periods.Rows), len(r.Periods))
	}
	for i, p := range r.Periods {
		c := periods.Rows[i][8]
		v := float64(p.Ppk)
		want := None
		switch {
		case math.IsNaN(v):
		case v < 1:
			want = Fail
		case v < PpkTarget:
			want = Warn
		default:
			want = OK
		}
		if c.Status != want {
			t.Errorf("period %s %s: Ppk %g marked %q, want %q", p.Group, p.Period, v, c.Status, want)
		}
	}
	signalled = 0
	for _, s := range r.Series {
		if hasSignal(r, s) {
			signalled++
		}
	}
	few, err := TrendSection(r, false, nil)
	if err != nil {
		t.Fatal(err)
	}
	figs = 0
	for _, b := range few.Blocks {
		if _, ok := b.(*Figure); ok {
			figs++
		}
	}
	if want := 2*signalled + sCharts(r, true) + 2; figs != want {
		t.Errorf("signalled series only: %d figures, want %d", figs, want)
	}
	doc := &Document{Title: "trend", Sections: []Section{sec}}
	var b bytes.Buffer
	if err := doc.WriteHTML(&b); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(b.String(), "<script>") {
		t.Error("group name not escaped")
	}
	dumpIfAsked(t, "trend.html", b.Bytes())
}

// sCharts counts the series that get an S chart: a baseline mean SD and
// more than one lot with an SD (only signalled series when signalledOnly).
func sCharts(r *trend.Result, signalledOnly bool) int {
	n := 0
	for _, s := range r.Series {
		if signalledOnly && !hasSignal(r, s) {
			continue
		}
		if math.IsNaN(float64(s.SBar)) {
			continue
		}
		sds := 0
		for _, p := range s.Points {
			if !math.IsNaN(float64(p.SD)) {
				sds++
			}
		}
		if sds > 1 {
			n++
		}
	}
	return n
}
