package trend

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
	"time"

	"lotproof/lots"
	"lotproof/lots/store"
)

// trendRef is testdata/trend/trend_ref.json: the trend of
// testdata/trend/ref_history.csv recomputed independently with numpy and
// scipy by testdata/trend/make_trend_ref.py (versions inside).
type trendRef struct {
	Periods []struct {
		Group, Property, Period string
		Lots, Specimens         int
		Mean, SD, Ppk           float64
		PpkLower                float64 `json:"ppk_lower"`
		PPMBelow                float64 `json:"ppm_below"`
	} `json:"periods"`
	Series []struct {
		Group, Property string
		BaselineLots    int `json:"baseline_lots"`
		Excluded        []string
		Center, Sigma   float64
		MRBar           float64 `json:"mr_bar"`
		LCL, UCL        float64
		SBar            float64 `json:"s_bar"`
		Lots            []string
		EWMA            [][3]float64
		SLimits         [][2]float64 `json:"s_limits"`
		LotLimits       [][2]float64 `json:"lot_limits"`
	} `json:"series"`
	Signals [][4]string `json:"signals"`
}

func near(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.Abs(got-want) > rel*math.Max(1, math.Abs(want)) {
		t.Errorf("%s = %.12g, want %.12g", what, got, want)
	}
}

func TestTrendAgainstIndependentRecomputation(t *testing.T) {
	b, err := os.ReadFile("../../testdata/trend/trend_ref.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref trendRef
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	d, err := lots.ReadFile("../../testdata/trend/ref_history.csv", lots.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	st, err := store.Open(ctx, filepath.Join(t.TempDir(), "ref.db"))
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	limits := []store.SpecLimit{
		{Spec: "REF", Material: "bar", Property: "tensile", Minimum: 930, Maximum: math.NaN(), Unit: "MPa"},
		{Spec: "REF", Material: "bar", Property: "proof", Minimum: 800, Maximum: math.NaN(), Unit: "MPa"},
	}
	if _, err := st.Record(ctx, d, nil, limits, store.Meta{Time: time.Unix(0, 0), User: "ref"}); err != nil {
		t.Fatal(err)
	}
	r, err := Compute(ctx, st, Options{})
	if err != nil {
		t.Fatal(err)
	}
	// Periods (relative 1e-9; ppm relative 1e-7 as the tail is tiny).
	if len(r.Periods) != len(ref.Periods) {
		t.Fatalf("%d period rows, want %d", len(r.Periods), len(ref.Periods))
	}
	got := map[string]Period{}
	for _, p := range r.Periods {
		got[p.Group+"|"+p.Property+"|"+p.Period] = p
	}
	for _, w := range ref.Periods {
		p, ok := got[w.Group+"|"+w.Property+"|"+w.Period]
		if !ok {
			t.Fatalf("no row for %s %s %s", w.Group, w.Property, w.Period)
		}
		if p.Lots != w.Lots || p.Specimens != w.Specimens {
			t.Errorf("%s %s %s: %d lots %d specimens, want %d %d", w.Group, w.Property, w.Period, p.Lots, p.Specimens, w.Lots, w.Specimens)
		}
		near(t, "mean", float64(p.Mean), w.Mean, 1e-12)
		near(t, "sd", float64(p.SD), w.SD, 1e-10)
		near(t, "ppk", float64(p.Ppk), w.Ppk, 1e-10)
		near(t, "ppk lower", float64(p.PpkLower), w.PpkLower, 1e-10)
		if math.Abs(float64(p.PPMBelow)-w.PPMBelow) > 1e-7*w.PPMBelow+1e-12 {
			t.Errorf("ppm %g, want %g", float64(p.PPMBelow), w.PPMBelow)
		}
	}
	// Series: baseline, limits, EWMA and S limits per lot.
	if len(r.Series) != len(ref.Series) {
		t.Fatalf("%d series, want %d", len(r.Series), len(ref.Series))
	}
	for _, w := range ref.Series {
		var s *Series
		for i := range r.Series {
			if r.Series[i].Group == w.Group && r.Series[i].Property == w.Property {
				s = &r.Series[i]
			}
		}
		if s == nil {
			t.Fatalf("no series %s %s", w.Group, w.Property)
		}
		if s.BaselineLots != w.BaselineLots {
			t.Errorf("%s %s: %d baseline lots, want %d (excluded %v; notes %v)", w.Group, w.Property, s.BaselineLots, w.BaselineLots, w.Excluded, s.Notes)
		}
		near(t, "centre", float64(s.Center), w.Center, 1e-12)
		near(t, "MRbar", float64(s.MRBar), w.MRBar, 1e-12)
		near(t, "sigma", float64(s.Sigma), w.Sigma, 1e-12)
		near(t, "LCL", float64(s.Lower), w.LCL, 1e-12)
		near(t, "UCL", float64(s.Upper), w.UCL, 1e-12)
		near(t, "sbar", float64(s.SBar), w.SBar, 1e-12)
		if len(s.Points) != len(w.Lots) {
			t.Fatalf("%d points, want %d", len(s.Points), len(w.Lots))
		}
		for i, p := range s.Points {
			if p.Lot != w.Lots[i] {
				t.Fatalf("point %d is lot %s, want %s", i, p.Lot, w.Lots[i])
			}
			near(t, "ewma", float64(p.EWMA), w.EWMA[i][0], 1e-12)
			near(t, "ewma lcl", float64(p.EWMALow), w.EWMA[i][1], 1e-12)
			near(t, "ewma ucl", float64(p.EWMAHigh), w.EWMA[i][2], 1e-12)
			near(t, "lot lcl", float64(p.Lower), w.LotLimits[i][0], 1e-12)
			near(t, "lot ucl", float64(p.Upper), w.LotLimits[i][1], 1e-12)
			near(t, "s lcl", float64(p.SLower), w.SLimits[i][0], 1e-10)
			near(t, "s ucl", float64(p.SUpper), w.SLimits[i][1], 1e-10)
		}
	}
	// Signals: the same set of (rule, group, property, lot or period).
	var gs, ws []string
	for _, s := range r.Signals {
		where := s.Lot
		if where == "" {
			where = s.Period
		}
		gs = append(gs, strings.Join([]string{s.Rule, s.Group, s.Property, where}, "|"))
	}
	for _, s := range ref.Signals {
		ws = append(ws, strings.Join(s[:], "|"))
	}
	sort.Strings(gs)
	sort.Strings(ws)
	if strings.Join(gs, "\n") != strings.Join(ws, "\n") {
		t.Errorf("signals\n%s\nwant\n%s", strings.Join(gs, "\n"), strings.Join(ws, "\n"))
	}
	if len(ws) == 0 {
		t.Fatal("the reference has no signals to compare")
	}
}

func TestOptionsAndPeriods(t *testing.T) {
	for _, c := range []struct{ date, every, want string }{
		{"2026-01-01", "quarter", "2026-Q1"}, {"2026-03-31", "quarter", "2026-Q1"}, {"2026-04-01", "quarter", "2026-Q2"},
		{"2026-12-31", "quarter", "2026-Q4"}, {"2026-05-17", "month", "2026-05"},
	} {
		if p, ok := PeriodOf(c.date, c.every); !ok || p != c.want {
			t.Errorf("PeriodOf(%s, %s) = %s, want %s", c.date, c.every, p, c.want)
		}
	}
	if _, ok := PeriodOf("2026-5-1", "month"); ok {
		t.Error("bad date accepted")
	}
	for _, o := range []Options{{By: "heat"}, {Every: "week"}, {Since: "x"}, {Since: "2026-02-01", Until: "2026-01-01"},
		{Baseline: "2025-Q1"}, {Baseline: "2025-Q3..2025-Q1"}, {Every: "month", Baseline: "2025-Q1..2025-Q2"}, {Confidence: 1.5}, {Lambda: 2}} {
		if _, err := ComputeFrom(nil, nil, nil, o); err == nil {
			t.Errorf("options %+v accepted", o)
		}
	}
	r, err := ComputeFrom(nil, nil, nil, Options{Every: "month", Baseline: "2025-01..2025-06"})
	if err != nil || len(r.Periods) != 0 || r.Signals == nil {
		t.Errorf("empty history: %+v %v", r, err)
	}
}

// Grouping by material, monthly periods and a chosen baseline.
func TestByMaterialMonthlyBaseline(t *testing.T) {
	d, err := lots.ReadFile("../../testdata/trend/ref_history.csv", lots.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	_, r, err := RecordAndCompute(context.Background(), filepath.Join(t.TempDir(), "m.db"), d, nil, nil,
		store.Meta{Time: time.Unix(0, 0), User: "u"}, Options{By: "material", Every: "month", Baseline: "2024-01..2024-06", Since: "2024-01-01", Until: "2025-03-31"})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Series) != 2 {
		t.Fatalf("%d series, want 2 (one material, two properties)", len(r.Series))
	}
	lotsIn := 0
	for _, p := range r.Periods {
		if p.Group != "bar" || len(p.Period) != 7 || p.Period[4] != '-' || p.Period < "2024-01" || p.Period > "2025-03" {
			t.Errorf("row %+v", p)
		}
		if p.Baseline != (p.Period <= "2024-06") {
			t.Errorf("period %s baseline %v", p.Period, p.Baseline)
		}
		if p.Property == "tensile" {
			lotsIn += p.Lots
		}
		if !math.IsNaN(float64(p.Minimum)) {
			t.Errorf("no limits were given, but row has minimum %v", p.Minimum)
		}
	}
	// Two suppliers with 2 and 3 lots per quarter; five quarters in range.
	if lotsIn != 5*5 {
		t.Errorf("%d tensile lots in range, want 25", lotsIn)
	}
	for _, s := range r.Series {
		if s.BaselineFrom < "2024-01" || s.BaselineTo > "2024-06" {
			t.Errorf("baseline %s..%s", s.BaselineFrom, s.BaselineTo)
		}
	}
}
