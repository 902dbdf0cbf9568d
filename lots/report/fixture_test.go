package report

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// Layout fixtures. The numbers below only give the plots something to draw
// (normal quantiles at (i-0.5)/n, shuffled by a fixed stride); no test uses
// them as a reference for a statistical result.

const hostile = `<script>alert(1)</script> "q" 'a' & ]]> </svg><p>`

// spread returns n values with mean mu and spread sigma, in a fixed order.
func spread(n int, mu, sigma float64) []float64 {
	out := make([]float64, n)
	for i := range n {
		j := (i * 7) % n
		out[i] = mu + sigma*distuv.UnitNormal.Quantile((float64(j)+0.5)/float64(n))
	}
	return out
}

func mean(xs []float64) float64 {
	s := 0.0
	for _, x := range xs {
		s += x
	}
	return s / float64(len(xs))
}

func sd(xs []float64) float64 {
	m, s := mean(xs), 0.0
	for _, x := range xs {
		s += (x - m) * (x - m)
	}
	return math.Sqrt(s / float64(len(xs)-1))
}

// externalSVG stands for a drawing made elsewhere (a stress-strain curve):
// it has ids and url(#id) references that must be namespaced.
const externalSVG = `<?xml version="1.0" encoding="UTF-8"?>
<!-- drawn by another package -->
<svg xmlns="http://www.w3.org/2000/svg" width="400" height="220" viewBox="0 0 400 220">
<defs><clipPath id="plotarea"><rect x="40" y="10" width="350" height="180"/></clipPath></defs>
<title>stress-strain</title>
<rect x="40" y="10" width="350" height="180" fill="none" stroke="#888"/>
<polyline clip-path="url(#plotarea)" fill="none" stroke="#2d4a66" stroke-width="2" points="40,190 90,60 120,45 200,35 300,38 360,70"/>
<text x="200" y="212" font-size="12" text-anchor="middle">strain [%]</text>
<text x="12" y="100" font-size="12" transform="rotate(-90 12 100)" text-anchor="middle">stress [MPa]</text>
</svg>`

// sampleDocument builds a report with every kind of block and plot, with
// hostile strings in every user-visible place. It returns the document and
// the number of figures in it.
func sampleDocument() (*Document, error) {
	vals := spread(30, 612, 14)
	var groups []DotGroup
	for g := range 6 {
		name := fmt.Sprintf("L-%02d", g+1)
		if g == 2 {
			name = hostile
		}
		groups = append(groups, DotGroup{Label: name, Values: vals[g*5 : g*5+5]})
	}
	mu, s := mean(vals), sd(vals)
	var lsum, lsq float64
	for _, v := range vals {
		lsum += math.Log(v)
	}
	lmu := lsum / float64(len(vals))
	for _, v := range vals {
		lsq += (math.Log(v) - lmu) * (math.Log(v) - lmu)
	}
	lsig := math.Sqrt(lsq / float64(len(vals)-1))
	fits := Fits{Normal: &NormalFit{mu, s}, Lognormal: &LognormalFit{lmu, lsig}, Weibull: &WeibullFit{Shape: 48, Scale: 618}}
	hist, err := Histogram(HistogramData{Title: "Tensile strength, " + hostile, Quantity: "tensile strength", Unit: "MPa",
		Values: vals, Fits: fits, Lines: []RefLine{{"spec minimum 570 MPa", 570}, {"B-basis 590.1 MPa", 590.1}, {"A-basis 575.3 MPa", 575.3}}})
	if err != nil {
		return nil, err
	}
	npp, err := NormalProbPlot(ProbData{Title: "Normal probability plot " + hostile, Quantity: "tensile strength", Unit: "MPa", Values: vals}, *fits.Normal)
	if err != nil {
		return nil, err
	}
	wpp, err := WeibullProbPlot(ProbData{Title: "Weibull probability plot", Quantity: "tensile strength", Unit: "MPa", Values: vals}, *fits.Weibull)
	if err != nil {
		return nil, err
	}
	dots, err := DotPlot(DotPlotData{Title: "Specimens by lot", XLabel: "lot", Quantity: "tensile strength", Unit: "MPa",
		Groups: groups, Lines: []RefLine{{"spec minimum 570 MPa", 570}}, Marked: []string{hostile}})
	if err != nil {
		return nil, err
	}
	means := make([]float64, 12)
	labels := make([]string, 12)
	for i := range means {
		means[i] = 610 + 6*math.Sin(float64(i))
		labels[i] = fmt.Sprintf("L-%02d", i+1)
	}
	means[10] = 588
	labels[4] = hostile
	ind, err := ControlChart(ChartData{Title: "Individuals chart of lot means", XLabel: "lot", Quantity: "lot mean tensile strength", Unit: "MPa",
		Labels: labels, Values: means, Centre: 609.5, Lower: []float64{592}, Upper: []float64{627}, Signals: []int{10}, Name: "lot mean"})
	if err != nil {
		return nil, err
	}
	z := make([]float64, 12)
	lo, up := make([]float64, 12), make([]float64, 12)
	prev := 609.5
	for i, m := range means {
		prev = 0.2*m + 0.8*prev
		z[i] = prev
		w := 5.5 * math.Sqrt(0.2/(2-0.2)*(1-math.Pow(0.8, float64(2*(i+1)))))
		lo[i], up[i] = 609.5-3*w*1.7, 609.5+3*w*1.7
	}
	ewma, err := ControlChart(ChartData{Title: "EWMA of lot means (lambda 0.2)", XLabel: "lot", Quantity: "EWMA", Unit: "MPa",
		Labels: labels, Values: z, Centre: 609.5, Lower: lo, Upper: up, Name: "EWMA"})
	if err != nil {
		return nil, err
	}
	periods := []string{"2025-Q1", "2025-Q2", "2025-Q3", "2025-Q4", "2026-Q1", "2026-Q2"}
	trend, err := TrendPlot(TrendData{Title: "Quarterly mean by supplier", Quantity: "mean tensile strength", Unit: "MPa", Periods: periods,
		Series: []TrendSeries{{"Supplier A", []float64{612, 611, 613, 610, 612, 611}}, {hostile, []float64{608, math.NaN(), 605, 601, 597, 590}}},
		Lines:  []RefLine{{"spec minimum 570 MPa", 570}}})
	if err != nil {
		return nil, err
	}
	var ps, paAttr, paVar []float64
	for i := 0; i <= 60; i++ {
		p := 0.2 * float64(i) / 60
		ps = append(ps, p)
		paAttr = append(paAttr, math.Pow(1-p, 20)+20*p*math.Pow(1-p, 19))
		paVar = append(paVar, distuv.UnitNormal.CDF((distuv.UnitNormal.Quantile(1-math.Max(p, 1e-12))-1.8)*math.Sqrt(10)/math.Sqrt(1+1.8*1.8/2)))
	}
	oc, err := OCPlot(OCData{Title: "Operating characteristic", Curves: []OCCurve{{"attributes n=20, c=1 " + hostile, ps, paAttr}, {"variables n=10, k=1.8", ps, paVar}},
		Lines: []RefLine{{"AQL 1%", 0.01}, {"LTPD 10%", 0.1}}})
	if err != nil {
		return nil, err
	}
	d := &Document{
		Title:    "Incoming lot report " + hostile,
		Subtitle: "Layout fixture & escaping check",
		Meta: Meta{
			Inputs:  []Input{{Name: "receipts " + hostile + ".csv", Digest: "9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08", Bytes: 12345}},
			Version: "0.1.0", Date: "2026-12-02", Seed: "42",
			Extra: []KV{{Key: "spec", Value: "S.yaml " + hostile}},
		},
		Summary: []KV{
			{Key: "Lots judged", Value: "6"},
			{Key: "Accepted", Value: "4", Status: OK},
			{Key: "Rejected", Value: "1: " + hostile, Status: Fail},
			{Key: "Undecided", Value: "1", Status: Undecided},
		},
		Cautions: []string{"Statistical values support, and never replace, the governing specification, regulations, local codes and licensed engineering judgement.", hostile},
		Sections: []Section{
			{Title: "Lot verdicts " + hostile, Intro: "Each lot against the purchase-specification minimum.", Blocks: []Block{
				&Table{Title: "Verdicts " + hostile, Columns: Cols("lot", "supplier", ">n", ">mean [MPa]", "verdict"), Rows: [][]Cell{
					append(Cells("L-01", "Supplier A", "5", "612.3"), Cell{"accept", OK}),
					append(Cells(hostile, hostile, "5", "598.0"), Cell{"reject " + hostile, Fail}),
					append(Cells("L-03", "Supplier A", "3", "575.1"), Cell{"undecided", Undecided}),
				}, Note: "Note " + hostile},
				&Figure{Title: "Specimens by lot " + hostile, Caption: "Dots: specimens; bars: lot means. " + hostile, SVG: dots},
			}},
			{Title: "Distribution of tensile strength", Blocks: []Block{
				Paragraph("Paragraph " + hostile),
				&Figure{Title: "Histogram with fitted densities", Caption: hostile, SVG: hist},
				&Figure{Title: "Normal probability plot", Caption: "Plotting positions: Benard's median ranks (i-0.3)/(n+0.4).", SVG: npp},
			}},
			{Title: "Design values", Blocks: []Block{
				&Figure{Title: "Weibull probability plot", Caption: "Plotting positions: Benard's median ranks.", SVG: wpp},
				&Audit{Title: "Audit trail " + hostile, Steps: []Step{
					{Step: "Outliers (maximum normed residual)", Statistic: "MNR 2.41", Threshold: "2.56", Decision: "none", Reason: "CMH-17-1G 8.3.3", Status: OK},
					{Step: "Between-batch variability " + hostile, Statistic: "ADK 3.1", Threshold: "2.0", Decision: "pool anyway " + hostile, Reason: hostile, Status: Warn},
				}},
			}},
			{Title: "Process control", Blocks: []Block{
				&Figure{Title: "Individuals chart", Caption: "Limits at centre ± 2.66 mean moving range.", SVG: ind},
				&Figure{Title: "EWMA chart", SVG: ewma},
			}},
			{Title: "Suppliers and sampling plans", Blocks: []Block{
				&Figure{Title: "Quarterly trend", SVG: trend},
				&Figure{Title: "OC curves", SVG: oc},
			}},
			{Title: "Specimen record", Blocks: []Block{
				KeyValues{Title: "Specimen " + hostile, Items: []KV{{Key: "ID", Value: hostile}, {Key: "proof", Value: "455 MPa", Status: Info}}},
				List{Title: "Remarks", Items: []string{hostile, "second"}},
				&Figure{Title: "Stress-strain curve", Caption: "External drawing", SVG: []byte(externalSVG)},
			}},
		},
	}
	return d, nil
}

// sampleSections is the number of major sections of sampleDocument; each
// fits on one printed page, after the first page (title, summary, contents).
const sampleSections = 6
