package report

import (
	"bytes"
	"strings"
	"testing"

	"lotproof/lots/units"
)

func TestBuild(t *testing.T) {
	d, _ := layoutDataset()
	d.Digest = "ab12"
	for i := range d.Len() {
		s := d.Specimen(i)
		s.Material = "bar"
		if i >= 10 {
			s.Material = "plate"
		}
		d.Set(i, s)
	}
	tr := layoutTrend(t)
	doc, err := Build(Inputs{Title: "Receiving " + hostile, Date: "2026-12-02", Data: d, System: units.SI,
		Minimums: map[string]float64{MinimumKey("Bar", "Tensile"): 570},
		Sections: []Section{{Title: "Caller's section", Blocks: []Block{Paragraph("first")}}}, Trend: tr})
	if err != nil {
		t.Fatal(err)
	}
	var titles []string
	for _, s := range doc.Sections {
		titles = append(titles, s.Title)
	}
	if got := strings.Join(titles, "|"); got != "Caller's section|Distribution of tensile, bar|Distribution of tensile, plate|Supplier trend" {
		t.Errorf("sections %q", got)
	}
	if doc.Cautions[0] != Caution || doc.Meta.Inputs[0].Digest != "ab12" || doc.Meta.Version == "" {
		t.Errorf("meta %+v cautions %q", doc.Meta, doc.Cautions)
	}
	var b bytes.Buffer
	if err := doc.WriteHTML(&b); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"spec minimum 570 MPa", "Specimens</dt><dd>15</dd>", "Trend signals"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("report lacks %q", want)
		}
	}
	dumpIfAsked(t, "build.html", b.Bytes())
}
