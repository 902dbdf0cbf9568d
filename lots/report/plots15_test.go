package report

import (
	"fmt"
	"math"
	"regexp"
	"strings"
	"testing"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/store"
	"lotproof/lots/trend"
	"lotproof/lots/units"
	"lotproof/spec"
)

// TestTickLabels: at least three labelled ticks on a short axis, and labels
// without trailing zeros.
func TestTickLabels(t *testing.T) {
	for _, r := range [][2]float64{{0.5, 0.9}, {1000, 1010}, {0.0012, 0.0031}, {-3, 3}, {12, 12.4}} {
		ts := plainTicks{}.Ticks(r[0], r[1])
		n := 0
		for _, tk := range ts {
			if tk.Label == "" {
				continue
			}
			n++
			if strings.Contains(tk.Label, ".") && strings.HasSuffix(tk.Label, "0") {
				t.Errorf("%v: label %q has a trailing zero", r, tk.Label)
			}
			if tk.Value < r[0]-1e-9 || tk.Value > r[1]+1e-9 {
				t.Errorf("%v: tick %g outside the axis", r, tk.Value)
			}
		}
		if n < 3 {
			t.Errorf("%v: %d labelled ticks", r, n)
		}
	}
}

// TestOCPlotCoversThePlan: the OC figure's axis reaches from where both
// plans accept almost surely to where both reject, on a logarithmic axis
// that includes 1 - content. n = 5, content 0.90, confidence 0.95: the
// variables k is 3.4066 (the one-sided normal tolerance factor, as the
// acceptance tests check against tables), so a lot accepts with Pa near 1
// only for fractions far below 1 - content.
func TestOCPlotCoversThePlan(t *testing.T) {
	b, err := ocFigure(acceptance.SpecRef{ID: "S", Revision: "A", Content: 0.90, Confidence: 0.95, MinN: 5})
	if err != nil {
		t.Fatal(err)
	}
	f := b.(*Figure)
	svg := string(f.SVG)
	if !strings.Contains(f.Caption, "logarithmic axis") {
		t.Errorf("caption: %s", f.Caption)
	}
	// Tick labels of the percent axis include powers of ten below 1 %.
	if !regexp.MustCompile(`>0\.0+1<`).MatchString(svg) {
		t.Errorf("no tick below 1 %% on the fraction axis")
	}
}

// TestOCRange: the OC grid starts where both plans accept (Pa at least
// 0.95; with 4 degrees of freedom the variables curve nears 1 only very
// slowly) and ends where both reject (Pa below 0.02), and holds 1 - content.
func TestOCRange(t *testing.T) {
	for _, c := range []struct {
		n          int
		k, content float64
	}{{5, 3.4066, 0.90}, {10, 2.3, 0.99}, {30, 1.8, 0.90}} {
		ps, paV, paA, err := ocRange(c.n, c.k, c.content)
		if err != nil {
			t.Fatal(err)
		}
		last := len(ps) - 1
		if paV[0] < 0.95 || paA[0] < 0.95 || paV[last] > 0.02 || paA[last] > 0.02 {
			t.Errorf("%+v: Pa from %.3f/%.3f to %.3f/%.3f", c, paV[0], paA[0], paV[last], paA[last])
		}
		if ps[0] > 1-c.content || ps[last] < 1-c.content {
			t.Errorf("%+v: grid %g..%g misses 1 - content", c, ps[0], ps[last])
		}
	}
}

// TestTrendChartsNeedTwoPeriods: a property with one period gets no
// period chart of one point; the Ppk chart says it plots the estimate.
func TestTrendChartsNeedTwoPeriods(t *testing.T) {
	var data []store.LotValues
	for l := range 3 {
		lot := fmt.Sprintf("L%d", l)
		data = append(data, store.LotValues{Lot: lot, Supplier: "Mill", Material: "bar", Tested: fmt.Sprintf("2025-01-%02d", 10+l),
			Property: "tensile", Unit: "MPa", IDs: []string{lot + "-1", lot + "-2", lot + "-3"}, Values: []float64{600 + float64(l), 605, 611 - float64(l)}})
	}
	limits := []store.SpecLimit{{Spec: "S", Material: "bar", Property: "tensile", Minimum: 570, Maximum: math.NaN(), Unit: "MPa"}}
	one, err := trend.ComputeFrom(data, nil, limits, trend.Options{})
	if err != nil {
		t.Fatal(err)
	}
	sec, err := TrendSection(one, true, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, b := range sec.Blocks {
		if f, ok := b.(*Figure); ok && (strings.HasPrefix(f.Title, "Mean by") || strings.HasPrefix(f.Title, "Ppk by")) {
			t.Errorf("one period, yet a period chart: %s", f.Title)
		}
	}
	// Two groups of eight quarters: the Ppk chart is labelled as the estimate.
	sec, err = TrendSection(layoutTrend(t), true, nil)
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, b := range sec.Blocks {
		if f, ok := b.(*Figure); ok && strings.HasPrefix(f.Title, "Ppk by") {
			found = true
			if !strings.Contains(string(f.SVG), "Ppk (point estimate)") || strings.Contains(string(f.SVG), "Ppk (lower)") {
				t.Errorf("Ppk chart axis does not say it plots the estimate")
			}
		}
	}
	if !found {
		t.Error("no Ppk chart")
	}
}

// TestReasonsStateRetestOnce: the report's reasons give each lot's decisive
// reason and the retest allowance once, not in every lot's line.
func TestReasonsStateRetestOnce(t *testing.T) {
	d, err := lots.ReadFile("../../testdata/acceptance/lots.csv", lots.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	sp, err := spec.ReadFiles([]string{"../../testdata/acceptance/spec-test.yaml"})
	if err != nil {
		t.Fatal(err)
	}
	r, err := acceptance.Judge(d, sp, lots.ByLot)
	if err != nil {
		t.Fatal(err)
	}
	sec, _, err := AcceptanceSection(r, units.SI, nil)
	if err != nil {
		t.Fatal(err)
	}
	var items []string
	for _, b := range sec.Blocks {
		if l, ok := b.(List); ok && l.Title == "Reasons" {
			items = l.Items
		}
	}
	all := strings.Join(items, "\n")
	if strings.Count(all, "retest") != 1 || !strings.Contains(all, "Retest: TEST-1 rev A allows 1 retest(s)") {
		t.Errorf("retest rule not stated once:\n%s", all)
	}
	if !strings.Contains(all, "C (nonconforming): tensile (min): 1 value(s) below the minimum 930 MPa: C-2 925 MPa") ||
		!strings.Contains(all, "D (undecided): 1 specimen, fewer than the 5 required") {
		t.Errorf("decisive reasons missing:\n%s", all)
	}
}
