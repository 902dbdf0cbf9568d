package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"strconv"
	"strings"
	"testing"
)

// csvRows reads a CSV stream that must be one table: a header and rows of
// the same width.
func csvRows(t *testing.T, out string) []map[string]string {
	t.Helper()
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatalf("not one CSV table: %v\n%s", err, out)
	}
	var rows []map[string]string
	for _, r := range recs[1:] {
		m := map[string]string{}
		for i, h := range recs[0] {
			m[h] = r[i]
		}
		rows = append(rows, m)
	}
	return rows
}

// same reports whether a CSV field reads back to exactly the JSON value
// (nil: an empty field).
func same(field string, v *float64) bool {
	if v == nil {
		return field == ""
	}
	got, err := strconv.ParseFloat(field, 64)
	return err == nil && got == *v
}

// TestSummaryCSVRoundTrip: summary CSV carries every number in full, in the
// shortest form that reads back to the same float64; a value entered as
// 1002.5 MPa or 14.9 % reads back as exactly that, and CSV and JSON agree
// exactly.
func TestSummaryCSVRoundTrip(t *testing.T) {
	in := "specimen,lot,tensile [MPa],elongation [%],proof [ksi]\n" +
		"A,L1,1002.5,14.9,120.3\n" +
		"B,L2,1000.1,12.7,119.9\nC,L2,1003.3,13.1,121.7\nD,L2,998.9,,118.35\n"
	for _, sys := range []string{"si", "us"} {
		code, c, errs := run(t, in, "summary", "-", "--format", "csv", "--units", sys)
		_, j, _ := run(t, in, "summary", "-", "--format", "json", "--units", sys)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, errs)
		}
		var js []struct {
			Lot        string `json:"lot"`
			Properties []struct {
				Property           string
				Mean, SD, Min, Max *float64
				N, Missing         int
			} `json:"properties"`
		}
		if err := json.Unmarshal([]byte(j), &js); err != nil {
			t.Fatal(err)
		}
		rows := csvRows(t, c)
		i := 0
		for _, g := range js {
			for _, p := range g.Properties {
				r := rows[i]
				i++
				if r["lot"] != g.Lot || r["property"] != p.Property || r["n"] != strconv.Itoa(p.N) {
					t.Fatalf("row %d %v does not match %s %s", i, r, g.Lot, p.Property)
				}
				for name, v := range map[string]*float64{"mean": p.Mean, "sd": p.SD, "min": p.Min, "max": p.Max} {
					if !same(r[name], v) {
						t.Errorf("%s %s %s %s: CSV %q, JSON %v", sys, g.Lot, p.Property, name, r[name], v)
					}
				}
			}
		}
		if i != len(rows) {
			t.Errorf("%d CSV rows, %d in JSON", len(rows), i)
		}
		// Entered values come back as entered (after conversion to the
		// internal unit and back).
		want := []string{"L1,,proof,ksi,1,0,120.3,,120.3,120.3", "L1,,elongation,%,1,0,14.9,,14.9,14.9"}
		if sys == "si" {
			want = []string{"L1,,tensile,MPa,1,0,1002.5,,1002.5,1002.5", "L1,,elongation,%,1,0,14.9,,14.9,14.9"}
		}
		{
			for _, w := range want {
				if !strings.Contains(c, w+"\n") {
					t.Errorf("missing %q in\n%s", w, c)
				}
			}
		}
	}
}

// TestAllowablesCSVRoundTrip: the design values in CSV read back to exactly
// the JSON values; a value that does not exist is an empty field.
func TestAllowablesCSVRoundTrip(t *testing.T) {
	path := "../../lots/demo/data/campaign.csv"
	_, c, _ := run(t, "", "allowables", path, "--format", "csv", "--date", "2026-12-02")
	code, j, errs := run(t, "", "allowables", path, "--format", "json", "--date", "2026-12-02")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rep struct {
		Results []struct {
			Property, Condition string
			ABasis              *float64 `json:"a_basis"`
			BBasis              *float64 `json:"b_basis"`
			Mean, SD, Min       *float64
			Pooled              *struct {
				ABasis *float64 `json:"a_basis"`
				BBasis *float64 `json:"b_basis"`
			} `json:"pooled_across_conditions"`
		} `json:"results"`
	}
	if err := json.Unmarshal([]byte(j), &rep); err != nil {
		t.Fatal(err)
	}
	rows := csvRows(t, c)
	if len(rows) != len(rep.Results) || len(rows) == 0 {
		t.Fatalf("%d CSV rows, %d results", len(rows), len(rep.Results))
	}
	pooled := 0
	for i, r := range rep.Results {
		row := rows[i]
		var pa, pb *float64
		if r.Pooled != nil {
			pa, pb = r.Pooled.ABasis, r.Pooled.BBasis
			pooled++
		}
		checks := []struct {
			col string
			v   *float64
		}{{"A-basis", r.ABasis}, {"B-basis", r.BBasis}, {"pooled A", pa}, {"pooled B", pb}, {"mean", r.Mean}, {"sd", r.SD}, {"min", r.Min}}
		for _, ch := range checks {
			field, ok := row[ch.col]
			if !ok {
				t.Fatalf("no column %q in %v", ch.col, row)
			}
			if !same(field, ch.v) {
				t.Errorf("%s %s %s: CSV %q, JSON %v", r.Property, r.Condition, ch.col, field, ch.v)
			}
			if field == "-" {
				t.Errorf("%s: missing written as -", ch.col)
			}
		}
		if r.ABasis != nil && math.Abs(*r.ABasis) > 0 && !strings.Contains(c, row["A-basis"]) {
			t.Errorf("A-basis %v not in CSV", *r.ABasis)
		}
	}
	if pooled == len(rep.Results) {
		t.Log("every result pooled: the empty-field case is not exercised by this campaign")
	}
}

// TestAcceptCSVRoundTrip: the limit table in CSV reads back to exactly the
// JSON values, in both unit systems.
func TestAcceptCSVRoundTrip(t *testing.T) {
	for _, sys := range []string{"si", "us"} {
		_, c, _ := run(t, "", "accept", testLots, "--spec", testSpec, "--format", "csv", "--table", "limits", "--units", sys)
		_, j, _ := run(t, "", "accept", testLots, "--spec", testSpec, "--format", "json", "--units", sys)
		var res struct {
			Lots []struct {
				Lot        string
				Properties []struct {
					Property, Side              string
					Limit, Mean, SD, Extreme, K *float64
					MeanBound                   *float64 `json:"mean_bound"`
					ToleranceBound              *float64 `json:"tolerance_bound"`
					FractionEstimate            *float64 `json:"fraction_estimate"`
					FractionUpper               *float64 `json:"fraction_upper"`
				}
			}
		}
		if err := json.Unmarshal([]byte(j), &res); err != nil {
			t.Fatal(err)
		}
		rows := csvRows(t, c)
		i := 0
		for _, l := range res.Lots {
			for _, p := range l.Properties {
				if i >= len(rows) {
					t.Fatalf("%d CSV rows only", len(rows))
				}
				r := rows[i]
				i++
				if r["lot"] != l.Lot || r["property"] != p.Property || r["side"] != p.Side {
					t.Fatalf("row %v is not %s %s %s", r, l.Lot, p.Property, p.Side)
				}
				for col, v := range map[string]*float64{"limit": p.Limit, "mean": p.Mean, "sd": p.SD, "extreme": p.Extreme, "k": p.K,
					"mean bound": p.MeanBound, "tol. bound": p.ToleranceBound, "frac. est": p.FractionEstimate, "frac. upper": p.FractionUpper} {
					if _, ok := r[col]; !ok {
						t.Fatalf("no column %q", col)
					}
					if !same(r[col], v) {
						t.Errorf("%s %s %s %s %s: CSV %q, JSON %v", sys, l.Lot, p.Property, p.Side, col, r[col], v)
					}
				}
			}
		}
		if i != len(rows) || i == 0 {
			t.Errorf("%d CSV rows, %d limits in JSON", len(rows), i)
		}
	}
}
