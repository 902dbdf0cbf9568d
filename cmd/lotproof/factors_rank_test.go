package main

import (
	"encoding/json"
	"math"
	"strconv"
	"testing"

	"lotproof/lots"
	"lotproof/lots/allowables"
	"lotproof/lots/allowables/factors"
	"lotproof/lots/units"
	"lotproof/stats"
)

// TestFactorsNonparametricRankAsApplied: the Hanson-Koopmans rows show the
// rank and factor the allowables procedure applies: for the B-basis the
// ranks of CMH-17-1G Vol. 1 Table 8.5.14 (from memory: n = 24, r = 11,
// k = 1.114; n = 10, r = 6, k = 2.137; n = 28, r = 12, k = 1.010), for the
// A-basis r = n. Each row also equals the factor of an allowables run on
// n values with the Hanson-Koopmans method.
func TestFactorsNonparametricRankAsApplied(t *testing.T) {
	code, out, errs := run(t, "", "factors", "--n", "5,10,24,28", "--method", "nonparametric", "--format", "json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res factors.Result
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	table := map[int][2]float64{10: {6, 2.137}, 24: {11, 1.114}, 28: {12, 1.010}}
	rows := 0
	for _, r := range res.Rows {
		if r.Method != "hanson-koopmans" {
			t.Errorf("row %+v", r)
			continue
		}
		rows++
		want := stats.HansonKoopmansRank(r.N, r.Content, r.Confidence)
		if r.Rank != want {
			t.Errorf("n=%d p=%g: rank %d, the procedure applies %d", r.N, r.Content, r.Rank, want)
		}
		if tb, ok := table[r.N]; ok && r.Content == 0.90 && (r.Rank != int(tb[0]) || math.Abs(r.Factor-tb[1]) > 0.0006) {
			t.Errorf("n=%d: r %d k %.4f, Table 8.5.14 r %g k %.3f", r.N, r.Rank, r.Factor, tb[0], tb[1])
		}
		if r.Content == 0.99 && r.Rank != r.N {
			t.Errorf("A-basis n=%d: rank %d", r.N, r.Rank)
		}
		// The same factor in an allowables run (one lot, n values).
		vals := make([]float64, r.N)
		for i := range vals {
			vals[i] = 100 + float64(i*i%7) + float64(i)/10
		}
		opt := allowables.DefaultOptions()
		opt.Method = allowables.HansonKoop
		u, _ := units.Parse("MPa")
		d := &lots.Dataset{Source: "t", Properties: []lots.Property{{Name: "x", Unit: u}}}
		for i, v := range vals {
			d.Add(lots.Specimen{ID: strconv.Itoa(i), Lot: "L1", Values: []float64{v}})
		}
		rep, err := allowables.Analyze(d, opt, "2026-12-02")
		if err != nil {
			t.Fatal(err)
		}
		b := rep.Results[0].B
		if r.Content == 0.99 {
			b = rep.Results[0].A
		}
		if float64(b.Factor) != r.Factor {
			t.Errorf("n=%d p=%g: factors %.6g, allowables applies %.6g", r.N, r.Content, r.Factor, float64(b.Factor))
		}
	}
	if rows != 8 {
		t.Errorf("%d Hanson-Koopmans rows, want 8", rows)
	}
}
