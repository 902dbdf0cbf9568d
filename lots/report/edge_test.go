package report

import (
	"bytes"
	"math"
	"strings"
	"testing"
	"unicode/utf8"
)

// TestPlotEdgeCases feeds the plot functions degenerate and hostile input:
// each must return an SVG or an error, never panic.
func TestPlotEdgeCases(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	cases := map[string]func() ([]byte, error){
		"histogram nan":   func() ([]byte, error) { return Histogram(HistogramData{Values: []float64{1, nan, 3}}) },
		"histogram equal": func() ([]byte, error) { return Histogram(HistogramData{Values: []float64{5, 5, 5}}) },
		"histogram huge":  func() ([]byte, error) { return Histogram(HistogramData{Values: []float64{1e300, -1e300, 0}}) },
		"histogram tiny":  func() ([]byte, error) { return Histogram(HistogramData{Values: []float64{1e-300, 2e-300, 3e-300}}) },
		"histogram bad fit": func() ([]byte, error) {
			return Histogram(HistogramData{Values: []float64{1, 2, 3}, Fits: Fits{Normal: &NormalFit{0, -1}}})
		},
		"histogram inf line": func() ([]byte, error) {
			return Histogram(HistogramData{Values: []float64{1, 2, 3}, Lines: []RefLine{{"x", inf}}})
		},
		"histogram one": func() ([]byte, error) { return Histogram(HistogramData{Values: []float64{1}}) },
		"histogram neg wbl": func() ([]byte, error) {
			return Histogram(HistogramData{Values: []float64{-3, -2, -1}, Fits: Fits{Weibull: &WeibullFit{2, 1}, Lognormal: &LognormalFit{0, 1}}})
		},
		"normal pp equal": func() ([]byte, error) { return NormalProbPlot(ProbData{Values: []float64{2, 2, 2}}, NormalFit{2, 1}) },
		"normal pp two":   func() ([]byte, error) { return NormalProbPlot(ProbData{Values: []float64{1, 2}}, NormalFit{2, 1}) },
		"weibull pp negative": func() ([]byte, error) {
			return WeibullProbPlot(ProbData{Values: []float64{-1, 2, 3}}, WeibullFit{2, 1})
		},
		"weibull pp zero fit": func() ([]byte, error) { return WeibullProbPlot(ProbData{Values: []float64{1, 2, 3}}, WeibullFit{0, 1}) },
		"dot empty":           func() ([]byte, error) { return DotPlot(DotPlotData{}) },
		"dot one value":       func() ([]byte, error) { return DotPlot(DotPlotData{Groups: []DotGroup{{"a", []float64{3}}}}) },
		"dot no values":       func() ([]byte, error) { return DotPlot(DotPlotData{Groups: []DotGroup{{"a", nil}}}) },
		"dot nan":             func() ([]byte, error) { return DotPlot(DotPlotData{Groups: []DotGroup{{"a", []float64{nan}}}}) },
		"dot many groups": func() ([]byte, error) {
			var gs []DotGroup
			for i := range 400 {
				gs = append(gs, DotGroup{Label: string(rune('a' + i%26)), Values: []float64{float64(i)}})
			}
			return DotPlot(DotPlotData{Groups: gs})
		},
		"chart constant": func() ([]byte, error) { return ControlChart(ChartData{Values: []float64{1, 1, 1}, Centre: 1}) },
		"chart one": func() ([]byte, error) {
			return ControlChart(ChartData{Values: []float64{1}, Centre: 1, Lower: []float64{0}, Upper: []float64{2}})
		},
		"chart bad limits": func() ([]byte, error) {
			return ControlChart(ChartData{Values: []float64{1, 2}, Centre: 1, Lower: []float64{0, 0, 0}})
		},
		"chart bad signal": func() ([]byte, error) {
			return ControlChart(ChartData{Values: []float64{1, 2}, Centre: 1, Signals: []int{5}})
		},
		"chart nan centre": func() ([]byte, error) { return ControlChart(ChartData{Values: []float64{1, 2}, Centre: nan}) },
		"chart labels": func() ([]byte, error) {
			return ControlChart(ChartData{Values: []float64{1, 2}, Centre: 1, Labels: []string{"a"}})
		},
		"chart nan limits": func() ([]byte, error) {
			return ControlChart(ChartData{Values: []float64{1, 2}, Centre: 1, Lower: []float64{nan, nan}})
		},
		"oc none": func() ([]byte, error) { return OCPlot(OCData{}) },
		"oc out of range": func() ([]byte, error) {
			return OCPlot(OCData{Curves: []OCCurve{{"a", []float64{0, 2}, []float64{1, 0}}}})
		},
		"oc mismatch": func() ([]byte, error) {
			return OCPlot(OCData{Curves: []OCCurve{{"a", []float64{0, 0.1}, []float64{1}}}})
		},
		"oc flat": func() ([]byte, error) {
			return OCPlot(OCData{Curves: []OCCurve{{"a", []float64{0, 0}, []float64{1, 1}}}})
		},
		"trend all nan": func() ([]byte, error) {
			return TrendPlot(TrendData{Periods: []string{"a"}, Series: []TrendSeries{{"s", []float64{nan}}}})
		},
		"trend one": func() ([]byte, error) {
			return TrendPlot(TrendData{Periods: []string{"a"}, Series: []TrendSeries{{"s", []float64{3}}}})
		},
		"trend inf": func() ([]byte, error) {
			return TrendPlot(TrendData{Periods: []string{"a"}, Series: []TrendSeries{{"s", []float64{inf}}}})
		},
		"trend wrong length": func() ([]byte, error) {
			return TrendPlot(TrendData{Periods: []string{"a", "b"}, Series: []TrendSeries{{"s", []float64{1}}}})
		},
		"trend none": func() ([]byte, error) { return TrendPlot(TrendData{}) },
	}
	mustFail := map[string]bool{"histogram nan": true, "histogram equal": true, "histogram bad fit": true, "histogram inf line": true,
		"histogram one": true, "normal pp equal": true, "normal pp two": true, "weibull pp negative": true, "weibull pp zero fit": true,
		"dot empty": true, "dot no values": true, "dot nan": true, "chart bad limits": true, "chart bad signal": true, "chart nan centre": true,
		"chart labels": true, "oc none": true, "oc out of range": true, "oc mismatch": true, "trend all nan": true, "trend inf": true,
		"trend wrong length": true, "trend none": true}
	for name, f := range cases {
		svg, err := func() (b []byte, err error) {
			defer func() {
				if r := recover(); r != nil {
					t.Errorf("%s: panic: %v", name, r)
				}
			}()
			return f()
		}()
		if mustFail[name] && err == nil {
			t.Errorf("%s: accepted", name)
		}
		if err == nil {
			if _, err := embedSVG(svg, "x-"); err != nil {
				t.Errorf("%s: SVG refused: %v", name, err)
			}
		}
	}
}

// TestWriteHTMLRefusesBrokenDocuments: a malformed document is an error
// and nothing is written.
func TestWriteHTMLRefusesBrokenDocuments(t *testing.T) {
	var nilDoc *Document
	if err := nilDoc.WriteHTML(&failWriter{t}); err == nil {
		t.Error("nil document accepted")
	}
	for name, b := range map[string]Block{
		"nil table":  (*Table)(nil),
		"nil figure": (*Figure)(nil),
		"nil audit":  (*Audit)(nil),
		"long row":   &Table{Columns: Cols("a"), Rows: [][]Cell{Cells("1", "2")}},
		"bad svg":    &Figure{SVG: []byte("<svg")},
	} {
		d := &Document{Title: "t", Sections: []Section{{Title: "s", Blocks: []Block{b}}}}
		if err := d.WriteHTML(&failWriter{t}); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
}

// failWriter fails the test when anything is written to it.
type failWriter struct{ t *testing.T }

func (w *failWriter) Write(p []byte) (int, error) {
	w.t.Errorf("wrote %d bytes for a document that should be refused", len(p))
	return len(p), nil
}

// TestInvalidUTF8 : a page declared UTF-8 stays valid UTF-8 whatever bytes
// a user string holds.
func TestInvalidUTF8(t *testing.T) {
	bad := "lot \xff\xfe-1"
	svg, err := DotPlot(DotPlotData{Title: bad, Groups: []DotGroup{{bad, []float64{1, 2}}}})
	if err != nil {
		t.Fatal(err)
	}
	d := &Document{Title: bad, Summary: []KV{{Key: bad, Value: bad}}, Sections: []Section{{Title: bad, Blocks: []Block{
		&Table{Columns: Cols(bad), Rows: [][]Cell{Cells(bad)}}, &Figure{Title: bad, SVG: svg}}}}}
	var b bytes.Buffer
	if err := d.WriteHTML(&b); err != nil {
		t.Fatal(err)
	}
	if !utf8.Valid(b.Bytes()) {
		t.Error("page is not valid UTF-8")
	}
	if !strings.Contains(b.String(), "lot \uFFFD-1") {
		t.Error("invalid bytes not replaced by U+FFFD")
	}
}
