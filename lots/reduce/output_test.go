package reduce

import (
	"bytes"
	"math"
	"strings"
	"testing"
	"testing/fstest"

	"lotproof/lots"
	"lotproof/lots/units"
)

// TestResultsCSVReadBack: the results CSV is read back by lots.ReadCSV with
// the same values (to the decimals written), in SI and US units (1 ksi =
// 6.894757293168361 MPa, NIST SP 811).
func TestResultsCSVReadBack(t *testing.T) {
	a := reduceSpec(t, alu, Options{})
	x, s := discontinuous(205000, 360, 330, 480)
	y, err := Reduce(parseOne(t, record("Y", x, s)), Options{})
	if err != nil {
		t.Fatal(err)
	}
	rs := []*Result{a, y}
	for _, sys := range []units.System{units.SI, units.US} {
		b := ResultsCSV(rs, sys)
		d, err := lots.ReadCSV(bytes.NewReader(b), "r.csv")
		if err != nil {
			t.Fatalf("%s: %v\n%s", sys, err, b)
		}
		if d.Len() != 2 || len(d.Properties) != len(Columns) {
			t.Fatalf("%s: %d specimens %d properties", sys, d.Len(), len(d.Properties))
		}
		for i, r := range rs {
			for j, c := range Columns {
				want, got := c.Value(r), d.Specimen(i).Values[j]
				if math.IsNaN(want) != math.IsNaN(got) {
					t.Errorf("%s %s %s: got %g want %g", sys, r.ID, c.Name, got, want)
					continue
				}
				if !math.IsNaN(want) && math.Abs(got-want) > 1e-3*math.Abs(want)+1e-4 {
					t.Errorf("%s %s %s: got %g want %g", sys, r.ID, c.Name, got, want)
				}
			}
		}
	}
	head := strings.SplitN(string(ResultsCSV(rs, units.US)), "\n", 2)[0]
	want := "specimen,lot,heat,supplier,material,tested,condition,modulus [Msi],proof [ksi],upper yield [ksi],lower yield [ksi],tensile [ksi],uniform elongation [%],elongation [%],reduction of area [%],toughness [in-lbf/in^3],resilience [in-lbf/in^3]"
	if head != want {
		t.Errorf("US header\n%s\nwant\n%s", head, want)
	}
	d := Dataset(rs, "x")
	if d.Property("proof") != 1 || d.Specimen(1).Values[2] != y.UpperYield || d.Missing[2] != 1 {
		t.Errorf("dataset %+v", d.Missing)
	}
}

func TestReduceFS(t *testing.T) {
	one, _ := Synthesize(alu)
	two, _ := Synthesize(steel)
	fsys := fstest.MapFS{
		"raw/b.rec":     {Data: two},
		"raw/a.rec":     {Data: one},
		"raw/notes.txt": {Data: []byte("not a record")},
	}
	rs, err := ReduceFS(fsys, "raw", Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(rs) != 2 || rs[0].ID != "A1" || rs[1].ID != "S1" || rs[0].Source != "raw/a.rec:1:1" {
		t.Fatalf("results %d %q", len(rs), rs[0].Source)
	}
	fsys["raw/c.rec"] = &fstest.MapFile{Data: one[:len(one)/3]}
	_, err = ReduceFS(fsys, "raw", Options{})
	inputError(t, err, "raw/c.rec:", "")
	_, err = ReduceFS(fsys, "nothing", Options{})
	inputError(t, err, "nothing", "cannot read the folder")
}

// TestPlotDeterministic: the SVG is well formed enough to start as an SVG
// document, and the same result gives the same bytes.
func TestPlotDeterministic(t *testing.T) {
	r := reduceSpec(t, alu, Options{})
	a, err := PlotSVG(r)
	if err != nil {
		t.Fatal(err)
	}
	b, err := PlotSVG(r)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a, b) {
		t.Error("PlotSVG is not deterministic")
	}
	if !bytes.HasPrefix(a, []byte("<?xml")) || !bytes.Contains(a, []byte("<svg")) || !bytes.Contains(a, []byte("offset line")) {
		t.Errorf("not an SVG plot: %.200s", a)
	}
	// The report's sans-serif, not gonum's default serif.
	if bytes.Contains(a, []byte("Serif")) || !bytes.Contains(a, []byte("Liberation Sans")) {
		t.Errorf("stress-strain plot not in the report's sans-serif font")
	}
	if _, err := PlotSVG(&Result{}); err == nil {
		t.Error("empty result plotted")
	}
}
