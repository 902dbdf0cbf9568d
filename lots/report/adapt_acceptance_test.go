package report

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"strings"
	"testing"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/units"
	"lotproof/spec"
	"lotproof/stats"
)

// TestOCAgainstScipy: the variables-plan OC against scipy.stats.nct.sf and
// the attributes-plan OC against scipy.stats.binom.cdf
// (testdata/report/plot_ref.json). Asserted: 1e-7 relative (scipy's nct
// is good to about 1e-9); the variables curve also passes through
// Pa = 1 - confidence at p = 1 - content, the definition of the tolerance
// factor (Owen 1968), to 1e-9.
func TestOCAgainstScipy(t *testing.T) {
	b, err := os.ReadFile("../../testdata/report/plot_ref.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		OC []struct {
			N, C                int
			Content, Confidence float64
			K                   float64
			P                   []float64
			PaVariables         []float64 `json:"pa_variables"`
			PaAttributes        []float64 `json:"pa_attributes"`
		}
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.OC) != 4 {
		t.Fatalf("%d OC sets, want 4", len(ref.OC))
	}
	for _, o := range ref.OC {
		k, err := stats.NormalK(o.N, o.Content, o.Confidence)
		if err != nil {
			t.Fatal(err)
		}
		if !relClose(k, o.K, 1e-9, 0) {
			t.Errorf("n=%d: NormalK %.12g, scipy %.12g", o.N, k, o.K)
		}
		pv, err := OCVariables(o.N, o.K, o.P)
		if err != nil {
			t.Fatal(err)
		}
		pa, err := OCAttributes(o.N, o.C, o.P)
		if err != nil {
			t.Fatal(err)
		}
		for i, p := range o.P {
			if !relClose(pv[i], o.PaVariables[i], 1e-7, 1e-15) {
				t.Errorf("n=%d k=%g p=%g: variables Pa %.12g, scipy %.12g", o.N, o.K, p, pv[i], o.PaVariables[i])
			}
			if !relClose(pa[i], o.PaAttributes[i], 1e-10, 1e-15) {
				t.Errorf("n=%d c=%d p=%g: attributes Pa %.12g, scipy %.12g", o.N, o.C, p, pa[i], o.PaAttributes[i])
			}
		}
		at, _ := OCVariables(o.N, k, []float64{1 - o.Content})
		if math.Abs(at[0]-(1-o.Confidence)) > 1e-9 {
			t.Errorf("n=%d: Pa(1-content) = %.12g, want 1-confidence = %g", o.N, at[0], 1-o.Confidence)
		}
	}
	if _, err := OCVariables(1, 2, []float64{0.1}); err == nil {
		t.Error("n = 1 accepted")
	}
	if _, err := OCAttributes(5, 6, []float64{0.1}); err == nil {
		t.Error("c > n accepted")
	}
}

const layoutSpec = `specification: LAYOUT-1
revision: A
material: bar
properties:
  tensile:
    unit: MPa
    min: 590
acceptance:
  content: 0.90
  confidence: 0.90
  min_specimens: 5
  individual_reject: true
`

// TestAcceptanceSection judges the layout dataset and checks that every lot
// gets a row with its verdict mark, that the rejected lot is named in the
// summary, and that the OC figure is drawn.
func TestAcceptanceSection(t *testing.T) {
	d, _ := layoutDataset()
	for i := range d.Len() {
		s := d.Specimen(i)
		s.Material, s.Supplier = "bar", "Supplier "+hostile
		d.Set(i, s)
	}
	// The third lot falls below the minimum.
	for i := 10; i < 15; i++ {
		d.Specimen(i).Values[0] -= 40
	}
	sp, err := spec.Parse("layout.yaml", []byte(layoutSpec))
	if err != nil {
		t.Fatal(err)
	}
	r, err := acceptance.Judge(d, []*spec.Spec{sp}, lots.ByLot)
	if err != nil {
		t.Fatal(err)
	}
	sec, summary, err := AcceptanceSection(r, units.US, nil)
	if err != nil {
		t.Fatal(err)
	}
	verdicts := sec.Blocks[0].(*Table)
	if len(verdicts.Rows) != len(r.Lots) {
		t.Fatalf("%d verdict rows for %d lots", len(verdicts.Rows), len(r.Lots))
	}
	for i, l := range r.Lots {
		c := verdicts.Rows[i][len(verdicts.Rows[i])-1]
		if c.Text != l.Verdict || c.Status != verdictStatus(l.Verdict) {
			t.Errorf("lot %s: cell %+v for verdict %q", l.Lot, c, l.Verdict)
		}
	}
	if r.Lots[2].Verdict != acceptance.Nonconforming {
		t.Fatalf("lot L-3 verdict %q, want nonconforming", r.Lots[2].Verdict)
	}
	found := false
	for _, kv := range summary {
		if kv.Key == "Rejected" && strings.Contains(kv.Value, "L-3") && kv.Status == Fail {
			found = true
		}
	}
	if !found {
		t.Errorf("summary does not name the rejected lot: %+v", summary)
	}
	// Limits in ksi: 590 MPa = 85.5723 ksi (1 ksi = 6.894757 MPa, NIST SP 811), 6 significant digits (render.Given).
	props := sec.Blocks[1].(*Table)
	if len(props.Rows) != 3 {
		t.Errorf("%d rows of lots not conforming, want 3 (every lot of this layout data is not conforming)", len(props.Rows))
	}
	app := AcceptanceAppendix(r, units.US, nil).Blocks[0].(*Table)
	if len(app.Rows) != 3 {
		t.Errorf("appendix has %d rows, want 3", len(app.Rows))
	}
	if !strings.Contains(props.Rows[0][2].Text, "min 85.5723 ksi") {
		t.Errorf("limit cell %q, want min 85.5723 ksi", props.Rows[0][2].Text)
	}
	figs := 0
	for _, b := range sec.Blocks {
		if _, ok := b.(*Figure); ok {
			figs++
		}
	}
	if figs != 1 {
		t.Errorf("%d figures, want the OC curve", figs)
	}
	doc := &Document{Title: "acceptance", Summary: summary, Sections: []Section{sec}}
	var b bytes.Buffer
	if err := doc.WriteHTML(&b); err != nil {
		t.Fatal(err)
	}
	dumpIfAsked(t, "acceptance.html", b.Bytes())
}
