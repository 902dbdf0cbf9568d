package report

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"lotproof/lots"
	"lotproof/lots/allowables"
	"lotproof/lots/render"
	"lotproof/lots/units"
)

// AllowablesSection lays out design values from a qualification campaign:
// the table of A- and B-basis values per property and condition, then per
// result its audit trail (every step with its statistic, threshold,
// decision and reason), flagged and excluded values, warnings, and the
// campaign's figures for the property with the basis values drawn (when
// the campaign dataset is given). It also returns summary items.
func AllowablesSection(rep *allowables.Report, campaign *lots.Dataset) (Section, []KV, error) {
	sec := Section{Title: "Design values (A- and B-basis)"}
	if rep == nil {
		return sec, nil, fmt.Errorf("report: no design-value analysis")
	}
	o := rep.Options
	sec.Intro = fmt.Sprintf("Campaign %s (SHA-256 %s), grouped by %s. A-basis: %g content at %g confidence; B-basis: %g content at %g confidence.",
		rep.Input, shortDigest(rep.SHA256), o.GroupBy, o.A.Content, o.A.Confidence, o.B.Content, o.B.Confidence)
	sec.Blocks = append(sec.Blocks, KeyValues{Title: "Settings", Items: []KV{
		{Key: "method", Value: o.Method},
		{Key: "outlier test level (MNR)", Value: num(o.OutlierAlpha, 4)},
		{Key: "lot comparison level (k-sample AD)", Value: num(o.LotAlpha, 4)},
		{Key: "distribution accepted when AD OSL >", Value: num(o.OSLMin, 4)},
		{Key: "pooling level (Levene)", Value: num(o.LeveneAlpha, 4)},
		{Key: "Monte Carlo samples, seed", Value: strconv.Itoa(o.Sims) + ", " + strconv.FormatUint(rep.Seed, 10)},
	}})

	t := &Table{Title: "Design values", Columns: Cols("property", "condition", ">n", ">lots", "method", ">A-basis", ">B-basis", ">mean", ">SD", ">min", ">max")}
	var summary []KV
	for _, r := range rep.Results {
		method := r.Method
		if r.AutoMethod != "" && r.AutoMethod != r.Method {
			method += " (handbook choice: " + r.AutoMethod + ")"
		}
		row := Cells(r.Property+unitText(r.Unit), condText(r.Condition), strconv.Itoa(r.N), strconv.Itoa(r.Lots), method)
		pr := CampaignResolution(campaign, r)
		row = append(row, basisCell(r.ABasis, pr), basisCell(r.BBasis, pr))
		row = append(row, Cells(pr.Stat(float64(r.Mean)).Text(), pr.Spread(float64(r.SD)).Text(), pr.Given(float64(r.Min)).Text(), pr.Given(float64(r.Max)).Text())...)
		t.Rows = append(t.Rows, row)
		summary = append(summary, KV{Key: "Design values, " + r.Property + condSuffix(r.Condition),
			Value:  "B-basis " + basisText(r.BBasis, r.Unit, pr) + "; A-basis " + basisText(r.ABasis, r.Unit, pr),
			Status: statusIf(isNum(r.BBasis) && isNum(r.ABasis), None, Undecided)})
	}
	t.Note = "A dash: the value is not defined for this campaign (the audit trail says why)."
	sec.Blocks = append(sec.Blocks, t)

	for _, r := range rep.Results {
		pr := CampaignResolution(campaign, r)
		name := r.Property + condSuffix(r.Condition)
		audit := &Audit{Title: "Audit trail: " + name}
		for _, s := range r.Steps {
			audit.Steps = append(audit.Steps, Step{Step: s.Step, Statistic: numOrEmpty(s.Statistic, 5), Threshold: numOrEmpty(s.Threshold, 5),
				Decision: s.Decision, Reason: s.Reason, Status: stepStatus(s)})
		}
		for _, b := range []struct {
			name string
			b    allowables.Basis
		}{{"A", r.A}, {"B", r.B}} {
			if b.b.Note != "" {
				audit.Steps = append(audit.Steps, Step{Step: b.name + "-basis note", Decision: b.b.Note, Status: Info})
			}
		}
		sec.Blocks = append(sec.Blocks, audit)
		if r.Pooled != nil {
			p := r.Pooled
			sec.Blocks = append(sec.Blocks, KeyValues{Title: "Pooled across conditions: " + r.Property, Items: []KV{
				{Key: "conditions", Value: strings.Join(p.Conditions, ", ")},
				{Key: "n, degrees of freedom", Value: strconv.Itoa(p.N) + ", " + strconv.Itoa(p.DF)},
				{Key: "pooled CV", Value: num(float64(p.CV), 4)},
				{Key: "A-basis (factor)", Value: pr.Stat(float64(p.ABasis)).Text() + " (" + render.Factor(float64(p.AFactor)).Text() + ")"},
				{Key: "B-basis (factor)", Value: pr.Stat(float64(p.BBasis)).Text() + " (" + render.Factor(float64(p.BFactor)).Text() + ")"},
			}})
		}
		if len(r.Outliers) > 0 {
			ot := &Table{Title: "Flagged values (kept unless excluded): " + name, Columns: Cols("specimen", "lot", ">value", "within", ">MNR", ">critical")}
			for _, x := range r.Outliers {
				ot.Rows = append(ot.Rows, []Cell{{Text: x.Specimen, Status: Warn}, {Text: x.Lot}, {Text: pr.Given(float64(x.Value)).Text()}, {Text: x.Within},
					{Text: num(float64(x.MNR), 4)}, {Text: num(float64(x.Critical), 4)}})
			}
			sec.Blocks = append(sec.Blocks, ot)
		}
		if len(r.Excluded) > 0 {
			et := &Table{Title: "Excluded by the user: " + name, Columns: Cols("specimen", "lot", ">value", "reason")}
			for _, x := range r.Excluded {
				et.Rows = append(et.Rows, Cells(x.Specimen, x.Lot, pr.Given(float64(x.Value)).Text(), x.Reason))
			}
			sec.Blocks = append(sec.Blocks, et)
		}
		if len(r.Warnings) > 0 {
			sec.Blocks = append(sec.Blocks, List{Title: "Warnings: " + name, Items: r.Warnings})
		}
		if campaign != nil {
			blocks, err := basisFigures(campaign, lots.GroupBy(o.GroupBy), r)
			if err != nil {
				return sec, nil, err
			}
			sec.Blocks = append(sec.Blocks, blocks...)
		}
	}
	for _, c := range rep.Cautions {
		sec.Blocks = append(sec.Blocks, Paragraph(c))
	}
	return sec, summary, nil
}

// basisFigures draws the campaign values of one result (its property and
// condition) with the basis values.
func basisFigures(d *lots.Dataset, by lots.GroupBy, r allowables.Result) ([]Block, error) {
	pi := d.Property(r.Property)
	if pi < 0 || r.Method == allowables.NotAnalysed || r.N < 3 {
		return nil, nil // nothing to draw: the audit trail says why
	}
	if by == "" {
		by = lots.ByLot
	}
	groups, err := d.Group(by, lots.InCondition(r.Condition))
	if err != nil {
		return nil, err
	}
	// The result is in display units; the figures take internal units and
	// convert to the same display unit.
	du, err := units.Parse(r.Unit)
	if err != nil {
		return nil, nil
	}
	sys := units.SI
	if d.Properties[pi].Unit.Display(units.US).Symbol == du.Symbol && d.Properties[pi].Unit.Display(units.SI).Symbol != du.Symbol {
		sys = units.US
	}
	var lines []RefLine
	for _, b := range []struct {
		name string
		v    lots.Float
	}{{"B-basis", r.BBasis}, {"A-basis", r.ABasis}} {
		if isNum(b.v) {
			lines = append(lines, RefLine{Label: b.name, Value: du.ToInternal(float64(b.v))})
		}
	}
	blocks, err := PropertyFigures(d, pi, groups, PropertyOptions{By: string(by), System: sys, Minimum: math.NaN(), Lines: lines})
	if err != nil {
		return nil, fmt.Errorf("report: figures of %s: %w", r.Property, err)
	}
	if r.Condition != "" {
		for _, b := range blocks {
			if f, ok := b.(*Figure); ok {
				f.Title += " (" + r.Condition + ")"
			}
		}
	}
	return blocks, nil
}

// stepStatus marks the steps a reader must look at: a value that is not
// defined, and values flagged by a screen.
func stepStatus(s allowables.Step) Status {
	d := strings.ToLower(s.Decision)
	switch {
	case strings.HasPrefix(d, "no ") || strings.HasPrefix(d, "none"):
		return None
	case strings.Contains(d, "not defined"), strings.Contains(d, "flagged"):
		return Warn
	}
	return None
}

// numOrEmpty formats a step value, empty when there is none.
func numOrEmpty(f lots.Float, sig int) string {
	if !isNum(f) {
		return ""
	}
	return num(float64(f), sig)
}

func isNum(f lots.Float) bool { v := float64(f); return !math.IsNaN(v) && !math.IsInf(v, 0) }

// CampaignResolution is the resolution of a result's property in the
// campaign, in the unit the result is shown in (unknown without the
// campaign).
func CampaignResolution(campaign *lots.Dataset, r allowables.Result) render.Resolution {
	if campaign == nil {
		return render.Resolution{}
	}
	i := campaign.Property(r.Property)
	if i < 0 {
		return render.Resolution{}
	}
	for _, sys := range []units.System{units.SI, units.US} {
		if u := campaign.Properties[i].Unit.Display(sys); u.Symbol == r.Unit {
			res := &render.Resolution{}
			for _, s := range campaign.All() {
				if i < len(s.Values) {
					res.Add(u.FromInternal(s.Values[i]))
				}
			}
			return *res
		}
	}
	return render.Resolution{}
}

func basisCell(f lots.Float, r render.Resolution) Cell {
	if !isNum(f) {
		return Cell{Text: "-", Status: Undecided}
	}
	return Cell{Text: r.Stat(float64(f)).Text()}
}

func basisText(f lots.Float, unit string, r render.Resolution) string {
	if !isNum(f) {
		return "not defined"
	}
	return r.Stat(float64(f)).Text() + unitSuffix(unit)
}

func condText(c string) string {
	if c == "" {
		return "(none)"
	}
	return c
}

func condSuffix(c string) string {
	if c == "" {
		return ""
	}
	return " (" + c + ")"
}
