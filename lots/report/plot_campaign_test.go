package report

import (
	"bytes"
	"encoding/xml"
	"io"
	"math"
	"strings"
	"testing"
)

// The plan figure is well-formed SVG, the same data give the same bytes,
// and bad input is refused.
func TestPlanBandPlot(t *testing.T) {
	d := PlanBandData{Title: "B-basis ratio", Labels: []string{"3x6", "5x6", "10x6"}, Series: []PlanSeries{
		{Name: "B-basis median, 10th-90th percentile", Median: []float64{0.94, 0.955, 0.97}, Low: []float64{0.90, 0.925, 0.95}, High: []float64{0.97, 0.98, 0.99}},
		{Name: "A-basis", Median: []float64{0.86, 0.89, 0.95}, Low: []float64{0.8, 0.85, 0.92}, High: []float64{0.9, 0.92, 0.97}},
	}}
	svg, err := PlanBandPlot(d)
	if err != nil {
		t.Fatal(err)
	}
	dec := xml.NewDecoder(bytes.NewReader(svg))
	for {
		if _, err := dec.Token(); err == io.EOF {
			break
		} else if err != nil {
			t.Fatalf("not well-formed: %v", err)
		}
	}
	if !strings.Contains(string(svg), "true percentile") {
		t.Error("no reference line in the legend")
	}
	again, _ := PlanBandPlot(d)
	if !bytes.Equal(svg, again) {
		t.Error("two drawings differ")
	}
	d.Series[0].Low[1] = math.NaN()
	if _, err := PlanBandPlot(d); err == nil {
		t.Error("NaN accepted")
	}
	if _, err := PlanBandPlot(PlanBandData{Title: "x"}); err == nil {
		t.Error("no plans accepted")
	}
}
