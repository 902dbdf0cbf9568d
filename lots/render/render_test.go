package render

import (
	"bytes"
	"encoding/csv"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// TestCSVRoundTrip: numbers written to CSV read back (strconv.ParseFloat)
// to exactly the same float64, whatever the digits shown to people; a
// missing number is an empty field in CSV and "-" in text.
func TestCSVRoundTrip(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	vals := []float64{1002.5, 14.9, 0.1, 1e-236, 123456789.123, -0.0005, 3}
	for range 2000 {
		vals = append(vals, math.Float64frombits(r.Uint64()&^(0x7ff<<52)|uint64(1023+r.IntN(40)-20)<<52))
	}
	tb := NewTable("t", "name", ">sig", ">fixed")
	for i, v := range vals {
		tb.Add(strconv.Itoa(i), N(v, 4), F(v, 1))
	}
	tb.Add("missing", N(math.NaN(), 4), F(math.NaN(), 2))
	var b bytes.Buffer
	if err := tb.WriteCSV(&b); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != len(vals)+2 || strings.Join(recs[0], ",") != "name,sig,fixed" {
		t.Fatalf("%d records, header %v", len(recs), recs[0])
	}
	for i, v := range vals {
		for _, cell := range recs[i+1][1:] {
			got, err := strconv.ParseFloat(cell, 64)
			if err != nil || got != v {
				t.Fatalf("row %d: %q reads back as %v, want %v (%v)", i, cell, got, v, err)
			}
		}
	}
	if last := recs[len(recs)-1]; last[1] != "" || last[2] != "" {
		t.Errorf("missing numbers in CSV: %q", last)
	}
	if got := recs[1][1]; got != "1002.5" {
		t.Errorf("1002.5 written as %q", got)
	}
	// Text keeps the rounding meant for reading.
	var txt bytes.Buffer
	if err := tb.WriteText(&txt); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(txt.String(), "\n")
	if f := strings.Fields(lines[3]); len(f) != 3 || f[1] != "1002" || f[2] != "1002.5" {
		t.Errorf("first row shown as %q", lines[3])
	}
	if f := strings.Fields(lines[len(lines)-2]); len(f) != 3 || f[0] != "missing" || f[1] != "-" || f[2] != "-" {
		t.Errorf("missing row shown as %q", lines[len(lines)-2])
	}
	if t.Failed() {
		t.Errorf("text:\n%.300s", txt.String())
	}
}

// A label cell shows words in the text table and its stable code in CSV,
// so scripts keep the code and people read the words (common practice for
// coded columns).
func TestLabelCell(t *testing.T) {
	tb := NewTable("", "rule", ">n")
	tb.Add(Label{Text: "beyond 3 sigma", Key: "we1"}, 3)
	var text, out strings.Builder
	if err := tb.WriteText(&text); err != nil {
		t.Fatal(err)
	}
	if err := tb.WriteCSV(&out); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(text.String(), "beyond 3 sigma") || strings.Contains(text.String(), "we1") {
		t.Errorf("text table: %q", text.String())
	}
	if got, want := out.String(), "rule,n\nwe1,3\n"; got != want {
		t.Errorf("CSV: %q, want %q", got, want)
	}
}
