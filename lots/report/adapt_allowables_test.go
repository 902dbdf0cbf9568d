package report

import (
	"bytes"
	"fmt"
	"strings"
	"testing"

	"lotproof/lots"
	"lotproof/lots/allowables"
	"lotproof/lots/units"
)

// layoutCampaign is 6 lots of 6 specimens of one stress property (layout
// input only).
func layoutCampaign() *lots.Dataset {
	u, _ := units.Parse("MPa")
	d := &lots.Dataset{Source: "campaign.csv", Digest: "cd34", Properties: []lots.Property{{Name: "tensile", Unit: u}}}
	vals := spread(36, 480, 9)
	for i, v := range vals {
		lot := fmt.Sprintf("Q-%d", i/6+1)
		if i/6 == 1 {
			lot = hostile
		}
		d.Add(lots.Specimen{ID: fmt.Sprintf("Q%02d", i+1), Lot: lot, Material: "plate", Values: []float64{v}})
	}
	return d
}

// TestAllowablesSection: the table carries the analysis' values as computed,
// every step of the audit trail is shown, and the figures draw the basis
// values.
func TestAllowablesSection(t *testing.T) {
	d := layoutCampaign()
	opt := allowables.DefaultOptions()
	opt.Method = allowables.Normal
	rep, err := allowables.Analyze(d, opt, "2026-12-02")
	if err != nil {
		t.Fatal(err)
	}
	sec, summary, err := AllowablesSection(rep, d)
	if err != nil {
		t.Fatal(err)
	}
	r := rep.Results[0]
	var tab *Table
	var audits []*Audit
	var figs []*Figure
	for _, b := range sec.Blocks {
		switch b := b.(type) {
		case *Table:
			if tab == nil {
				tab = b
			}
		case *Audit:
			audits = append(audits, b)
		case *Figure:
			figs = append(figs, b)
		}
	}
	if tab == nil || len(tab.Rows) != len(rep.Results) {
		t.Fatalf("design value table missing or wrong size")
	}
	if got, want := tab.Rows[0][6].Text, num(float64(r.BBasis), 5); got != want {
		t.Errorf("B-basis cell %q, want %q", got, want)
	}
	if len(audits) != 1 || len(audits[0].Steps) < len(r.Steps) {
		t.Fatalf("audit trail: %d trails, want 1 with %d steps", len(audits), len(r.Steps))
	}
	for i, s := range r.Steps {
		if audits[0].Steps[i].Step != s.Step || audits[0].Steps[i].Decision != s.Decision {
			t.Errorf("step %d: %+v, want %+v", i+1, audits[0].Steps[i], s)
		}
	}
	if len(figs) != 4 {
		t.Fatalf("%d figures, want 4", len(figs))
	}
	// The figure labels the B-basis as the table prints it.
	if want := "B-basis " + tab.Rows[0][6].Text + " MPa"; !bytes.Contains(figs[1].SVG, []byte(want)) {
		t.Errorf("histogram lacks %q", want)
	}
	if len(summary) != 1 || !strings.Contains(summary[0].Value, "B-basis "+num(float64(r.BBasis), 5)+" MPa") {
		t.Errorf("summary %+v", summary)
	}
	doc := &Document{Title: "allowables", Summary: summary, Sections: []Section{sec}}
	var b bytes.Buffer
	if err := doc.WriteHTML(&b); err != nil {
		t.Fatal(err)
	}
	dumpIfAsked(t, "allowables.html", b.Bytes())
}
