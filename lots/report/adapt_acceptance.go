package report

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"

	"lotproof/lots/acceptance"
	"lotproof/lots/render"
	"lotproof/lots/units"
	"lotproof/stats"
)

// verdictStatus maps an acceptance verdict to a mark.
func verdictStatus(v string) Status {
	switch v {
	case acceptance.Conforming:
		return OK
	case acceptance.Nonconforming:
		return Fail
	case acceptance.Undecided:
		return Undecided
	}
	return None
}

// AcceptanceSection lays out lot verdicts: one row per lot with its
// verdict, one row per limit of every lot that does not conform with the
// figures behind it (AcceptanceAppendix has every lot), the reasons of every lot that is not conforming, the flagged values and the
// method. Values are shown in the display units of sys, at the resolutions
// rs of the properties' values in those units (nil: unknown; see
// render.Resolution). It also returns summary items (counts by verdict)
// for the box at the top.
func AcceptanceSection(r *acceptance.Result, sys units.System, rs render.Resolutions) (Section, []KV, error) {
	sec := Section{Title: "Lot acceptance"}
	if r == nil {
		return sec, nil, fmt.Errorf("report: no acceptance result")
	}
	r = r.Display(sys)
	var specs []string
	for _, s := range r.Specs {
		label := s.ID
		if s.Revision != "" {
			label += " rev " + s.Revision
		}
		specs = append(specs, fmt.Sprintf("%s for %s (content %g, confidence %g, at least %d specimens)", label, s.Material, s.Content, s.Confidence, s.MinN))
	}
	sec.Intro = "Every " + r.GroupBy + " judged against " + strings.Join(specs, "; ") + "."
	summary := []KV{
		{Key: "Conforming " + r.GroupBy + "s", Value: strconv.Itoa(r.Counts.Conforming), Status: OK},
		{Key: "Nonconforming " + r.GroupBy + "s", Value: strconv.Itoa(r.Counts.Nonconforming), Status: statusIf(r.Counts.Nonconforming > 0, Fail, OK)},
		{Key: "Undecided " + r.GroupBy + "s", Value: strconv.Itoa(r.Counts.Undecided), Status: statusIf(r.Counts.Undecided > 0, Undecided, OK)},
	}
	if r.Counts.NotJudged > 0 {
		summary = append(summary, KV{Key: "Not judged", Value: strconv.Itoa(r.Counts.NotJudged), Status: Warn})
	}
	var bad []string
	for _, l := range r.Lots {
		if l.Verdict == acceptance.Nonconforming {
			bad = append(bad, l.Lot)
		}
	}
	if len(bad) > 0 {
		summary = append(summary, KV{Key: "Rejected", Value: strings.Join(bad, ", "), Status: Fail})
	}

	lots := &Table{Title: "Verdicts", Columns: Cols(r.GroupBy, "supplier", "material", "specification", ">n", ">outliers", "verdict")}
	for _, l := range r.Lots {
		row := Cells(l.Lot, l.Supplier, l.Material, l.Spec, strconv.Itoa(l.N), strconv.Itoa(len(l.Outliers)))
		row = append(row, Cell{Text: l.Verdict, Status: verdictStatus(l.Verdict)})
		lots.Rows = append(lots.Rows, row)
	}
	sec.Blocks = append(sec.Blocks, lots)

	if props := limitTable(r, "Figures behind the verdicts of lots not conforming", func(v string) bool { return v != acceptance.Conforming }, rs); len(props.Rows) > 0 {
		sec.Blocks = append(sec.Blocks, props)
	}

	var reasons, retests []string
	for _, l := range r.Lots {
		if l.Verdict == acceptance.Conforming {
			continue
		}
		why, retest := acceptance.DecisiveReasons(l, r.MinSpecimens(l.Spec))
		if why != "" {
			reasons = append(reasons, l.Lot+" ("+l.Verdict+"): "+why)
		}
		if retest != "" && !slices.Contains(retests, retest) {
			retests = append(retests, retest)
		}
		for _, p := range l.Properties {
			if p.Verdict == acceptance.Undecided && p.NeededN > 0 {
				reasons = append(reasons, fmt.Sprintf("%s: %s would need %d specimens in all to decide at the observed mean and SD", l.Lot, p.Property, p.NeededN))
			}
		}
	}
	for _, rt := range retests {
		reasons = append(reasons, "Retest: "+rt+" (for a lot that is not conforming).")
	}
	if len(reasons) > 0 {
		sec.Blocks = append(sec.Blocks, List{Title: "Reasons", Items: reasons})
	}

	out := &Table{Title: "Values flagged by the maximum normed residual test (kept)", Columns: Cols(r.GroupBy, "specimen", "property", ">value", ">MNR", ">critical", ">line")}
	for _, l := range r.Lots {
		for _, o := range l.Outliers {
			out.Rows = append(out.Rows, append(Cells(l.Lot, o.Specimen, o.Property, rs.Of(l.Material, o.Property).Given(float64(o.Value)).Text()+unitSuffix(o.Unit),
				render.Factor(o.MNR).Text(), render.Factor(o.Critical).Text()), Cell{Text: strconv.Itoa(o.Line)}))
		}
	}
	if len(out.Rows) > 0 {
		sec.Blocks = append(sec.Blocks, out)
	}

	for _, s := range r.Specs {
		b, err := ocFigure(s)
		if err != nil {
			return sec, nil, err
		}
		if b != nil {
			sec.Blocks = append(sec.Blocks, b)
		}
	}
	sec.Blocks = append(sec.Blocks, Paragraph("Method: "+r.Method+"."))
	for _, c := range r.Cautions {
		sec.Blocks = append(sec.Blocks, Paragraph(c))
	}
	return sec, summary, nil
}

// AcceptanceAppendix is the table of the figures behind every lot's
// verdict, for an appendix (the main section shows only the lots that do
// not conform), at the resolutions rs as in AcceptanceSection.
func AcceptanceAppendix(r *acceptance.Result, sys units.System, rs render.Resolutions) Section {
	r = r.Display(sys)
	return Section{Title: "Appendix: figures behind every verdict", Blocks: []Block{
		limitTable(r, "Every "+r.GroupBy+" and limit", func(string) bool { return true }, rs)}}
}

// limitTable lists, for the lots whose verdict keep accepts, every limit
// with the figures behind its verdict.
func limitTable(r *acceptance.Result, title string, keep func(verdict string) bool, rs render.Resolutions) *Table {
	props := &Table{Title: title, Columns: Cols(r.GroupBy, "property", ">limit", ">n", ">mean", ">SD", ">extreme", ">k", ">tolerance bound", ">fraction beyond (est. / upper)", ">values beyond", "verdict")}
	for _, l := range r.Lots {
		if !keep(l.Verdict) {
			continue
		}
		for _, p := range l.Properties {
			side := "min "
			if p.Side == "max" {
				side = "max "
			}
			pr := rs.Of(l.Material, p.Property)
			row := Cells(l.Lot, p.Property, side+pr.Given(float64(p.Limit)).Text()+unitSuffix(p.Unit), strconv.Itoa(p.N),
				pr.Stat(float64(p.Mean)).Text(), pr.Spread(float64(p.SD)).Text(), pr.Given(float64(p.Extreme)).Text(), render.Factor(float64(p.K)).Text(),
				pr.Stat(float64(p.ToleranceBound)).Text(), render.Fraction(float64(p.FractionEstimate)).Text()+" / "+render.Fraction(float64(p.FractionUpper)).Text())
			beyond := Cell{Text: strconv.Itoa(p.Beyond)}
			if p.Beyond > 0 {
				beyond.Status = Fail
			}
			row = append(row, beyond, Cell{Text: p.Verdict, Status: verdictStatus(p.Verdict)})
			props.Rows = append(props.Rows, row)
		}
	}
	props.Note = "The tolerance bound is mean - k SD for a minimum (mean + k SD for a maximum); a lot conforms when the bound lies within the limit."
	return props
}

// ocFigure draws the operating characteristic of a specification's plan at
// its minimum lot size.
func ocFigure(s acceptance.SpecRef) (Block, error) {
	n := s.MinN
	if n < 2 || !(s.Content > 0 && s.Content < 1) || !(s.Confidence > 0 && s.Confidence < 1) {
		return nil, nil
	}
	k, err := stats.NormalK(n, s.Content, s.Confidence)
	if err != nil {
		return nil, err
	}
	ps, paV, paA, err := ocRange(n, k, s.Content)
	if err != nil {
		return nil, err
	}

	label := s.ID
	if s.Revision != "" {
		label += " rev " + s.Revision
	}
	svg, err := OCPlot(OCData{Title: "Operating characteristic, " + label,
		Curves: []OCCurve{
			{Label: fmt.Sprintf("variables: n = %d, accept if mean - %.3f SD >= limit", n, k), P: ps, Pa: paV},
			{Label: fmt.Sprintf("attributes: n = %d, accept with no value beyond the limit", n), P: ps, Pa: paA},
		},
		Lines: []RefLine{{Label: "1 - content = " + num(1-s.Content, 6), Value: 1 - s.Content}}, LogX: true})
	if err != nil {
		return nil, err
	}
	return &Figure{Title: "Operating characteristic of " + label + " at " + strconv.Itoa(n) + " specimens", SVG: svg,
		Caption: "Probability of accepting a lot against its true fraction beyond the limit (logarithmic axis, over the range where the plans go from accepting to rejecting), for one limit and normal values. The variables curve passes through Pa = 1 - confidence = " + num(1-s.Confidence, 6) + " at a fraction of 1 - content = " + num(1-s.Content, 6) + "."}, nil
}

// OCVariables is the operating characteristic of the one-sided variables
// plan "accept when (mean - L)/s >= k" on n specimens from a normal lot of
// which a fraction p lies below L: with T = sqrt(n)(mean - L)/s noncentral t
// on n-1 degrees of freedom with noncentrality sqrt(n) z_(1-p),
//
//	Pa(p) = P(T >= k sqrt(n)) (Owen 1968, Technometrics 10:445; Schilling
//	and Neubauer, Acceptance Sampling in Quality Control, 2nd ed., ch. 14).
//
// With k the tolerance factor for content 1-p0 and confidence gamma,
// Pa(p0) = 1 - gamma.
func OCVariables(n int, k float64, ps []float64) ([]float64, error) {
	if n < 2 || math.IsNaN(k) || math.IsInf(k, 0) {
		return nil, fmt.Errorf("OC of a variables plan needs n >= 2 and a finite k (got %d, %g)", n, k)
	}
	rn := math.Sqrt(float64(n))
	out := make([]float64, len(ps))
	for i, p := range ps {
		switch {
		case p <= 0:
			out[i] = 1
		case p >= 1:
			out[i] = 0
		default:
			delta := rn * distuv.UnitNormal.Quantile(1-p)
			out[i] = stats.NoncentralTSurvival(k*rn, float64(n-1), delta)
		}
	}
	return out, nil
}

// OCAttributes is the operating characteristic of the single attributes
// plan "accept with at most c of n values beyond the limit": the binomial
// sum Pa(p) = sum_{i=0..c} C(n,i) p^i (1-p)^(n-i) (Schilling and Neubauer,
// ch. 3), by gonum distuv.Binomial.CDF.
func OCAttributes(n, c int, ps []float64) ([]float64, error) {
	if n < 1 || c < 0 || c > n {
		return nil, fmt.Errorf("OC of an attributes plan needs 0 <= c <= n, n >= 1 (got n %d, c %d)", n, c)
	}
	out := make([]float64, len(ps))
	for i, p := range ps {
		switch {
		case p <= 0:
			out[i] = 1
		case p >= 1:
			out[i] = 0
			if c == n {
				out[i] = 1
			}
		default:
			out[i] = distuv.Binomial{N: float64(n), P: p}.CDF(float64(c))
		}
	}
	return out, nil
}

// ocRange is the grid of fractions an OC figure shows, with the variables
// (n, k) and attributes (n, c = 0) acceptance probabilities.
func ocRange(n int, k, content float64) (ps, paV, paA []float64, err error) {
	// A logarithmic grid of fractions from 1e-10 to 0.8, cut to where the
	// plans work: from just before either curve leaves Pa = 0.995 to just
	// after both fall below 0.005, and always including 1 - content.
	var all []float64
	for i := 0; i <= 240; i++ {
		all = append(all, 1e-10*math.Pow(0.8/1e-10, float64(i)/240))
	}
	allV, err := OCVariables(n, k, all)
	if err != nil {
		return nil, nil, nil, err
	}
	allA, err := OCAttributes(n, 0, all)
	if err != nil {
		return nil, nil, nil, err
	}
	from, to := 0, len(all)-1
	for from < len(all)-1 && math.Min(allV[from+1], allA[from+1]) > 0.995 {
		from++
	}
	for to > 0 && math.Max(allV[to-1], allA[to-1]) < 0.005 {
		to--
	}
	for from > 0 && all[from] > 0.5*(1-content) {
		from--
	}
	for to < len(all)-1 && all[to] < 2*(1-content) {
		to++
	}
	return all[from : to+1], allV[from : to+1], allA[from : to+1], nil
}
