package report

import (
	"bytes"
	"fmt"
	"math"
	"strings"
	"testing"

	"lotproof/lots"
	"lotproof/lots/reduce"
	"lotproof/lots/units"
)

// layoutDataset is a dataset of three lots of one stress property (values
// from spread, layout only).
func layoutDataset() (*lots.Dataset, []lots.Group) {
	u, _ := units.Parse("MPa")
	d := &lots.Dataset{Source: "layout.csv", Properties: []lots.Property{{Name: "tensile", Unit: u}}}
	vals := spread(15, 612, 14)
	var groups []lots.Group
	for g := range 3 {
		key := []string{"L-1", hostile, "L-3"}[g]
		grp := lots.Group{Key: key}
		for i := range 5 {
			grp.Specimens = append(grp.Specimens, d.Len())
			d.Add(lots.Specimen{ID: key + "-" + string(rune('a'+i)), Lot: key, Values: []float64{vals[g*5+i]}})
		}
		groups = append(groups, grp)
	}
	d.Specimen(3).Values[0] = math.NaN() // a missing value is skipped
	return d, groups
}

// TestPropertyFiguresUnits: in US units the reference lines are converted
// with 1 ksi = 6.894757 MPa (NIST SP 811, appendix B.9) and labelled in ksi.
func TestPropertyFiguresUnits(t *testing.T) {
	d, groups := layoutDataset()
	blocks, err := PropertyFigures(d, 0, groups, PropertyOptions{By: "lot", System: units.US, Minimum: 550,
		Lines: []RefLine{{Label: "B-basis", Value: 580}}, Marked: []string{hostile}})
	if err != nil {
		t.Fatal(err)
	}
	if len(blocks) != 4 {
		t.Fatalf("%d blocks, want 4 (dot plot, histogram, normal and Weibull probability plots)", len(blocks))
	}
	hist := string(blocks[1].(*Figure).SVG)
	// 550/6.894757 = 79.7708 ksi, 580/6.894757 = 84.1219 ksi (hand
	// computation); converted values have no finite resolution, so the
	// minimum prints to 6 and the B-basis to 5 significant digits.
	for _, want := range []string{"spec minimum 79.7708 ksi", "B-basis 84.122 ksi", "tensile [ksi]", "data (n = 14)"} {
		if !strings.Contains(hist, want) {
			t.Errorf("histogram lacks %q", want)
		}
	}
	doc := &Document{Title: "t", Sections: []Section{{Title: "s", Blocks: blocks}}}
	var b bytes.Buffer
	if err := doc.WriteHTML(&b); err != nil {
		t.Fatal(err)
	}
	if _, err := PropertyFigures(d, 3, groups, PropertyOptions{}); err == nil {
		t.Error("property index out of range accepted")
	}
}

// TestReduceSection embeds the stress-strain plots of lots/reduce: they must
// pass the SVG check, keep unique ids and carry the specimen's values.
func TestReduceSection(t *testing.T) {
	var rs []*reduce.Result
	for i, sp := range []reduce.SynthSpec{
		{ID: "S1", Lot: hostile, Diameter: 10, Gauge: 50, E: 205000, Rp: 620, Rm: 780, Uniform: 0.08, Elongation: 0.16, ReductionOfArea: 0.55, Points: 400, Seed: 1},
		{ID: "S2", Lot: "L-2", Diameter: 10, Gauge: 50, E: 205000, Rp: 600, Rm: 760, Uniform: 0.09, Elongation: 0.17, ReductionOfArea: 0.5, Points: 400, Seed: 2},
	} {
		raw, err := reduce.Synthesize(sp)
		if err != nil {
			t.Fatal(err)
		}
		recs, err := reduce.ParseBytes(raw, "rec"+string(rune('1'+i))+".rec")
		if err != nil {
			t.Fatal(err)
		}
		res, err := reduce.ReduceAll(recs, reduce.Options{})
		if err != nil {
			t.Fatal(err)
		}
		rs = append(rs, res...)
	}
	sec, err := ReduceSection(rs, units.SI, 1)
	if err != nil {
		t.Fatal(err)
	}
	tab := sec.Blocks[0].(*Table)
	if len(tab.Rows) != 2 || tab.Rows[0][0].Text != "S1" {
		t.Fatalf("table rows %v", tab.Rows)
	}
	// Proof strength of the Ramberg-Osgood record is 620 MPa by
	// construction (reduce.Synthesize); the table shows the reduction to
	// one decimal, within 1 % of it.
	var proof float64
	for i, c := range tab.Columns {
		if strings.HasPrefix(c.Label, "proof") {
			if _, err := fmtScan(tab.Rows[0][i].Text, &proof); err != nil {
				t.Fatal(err)
			}
		}
	}
	if math.Abs(proof-620) > 6.2 {
		t.Errorf("proof in table %g, want 620 within 1 %%", proof)
	}
	figs := 0
	for _, b := range sec.Blocks {
		if _, ok := b.(*Figure); ok {
			figs++
		}
	}
	if figs != 1 {
		t.Errorf("%d curves with maxCurves 1", figs)
	}
	doc := &Document{Title: "t", Sections: []Section{sec}}
	var b bytes.Buffer
	if err := doc.WriteHTML(&b); err != nil {
		t.Fatal(err)
	}
	if bytes.Contains(b.Bytes(), []byte("<script")) {
		t.Error("unescaped lot name")
	}
}

func fmtScan(s string, v *float64) (int, error) { return fmt.Sscan(s, v) }
