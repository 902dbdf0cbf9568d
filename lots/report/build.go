package report

import (
	"fmt"
	"math"
	"strconv"

	"lotproof/lots"
	"lotproof/lots/reduce"
	"lotproof/lots/trend"
	"lotproof/lots/units"
)

// Caution is shown at the top of every report built by Build.
const Caution = "Statistical values support, and never replace, the governing specification, regulations, local codes and licensed engineering judgement."

// Inputs are what Build puts in a report; a nil or empty part is left out.
type Inputs struct {
	Title    string // default "Lot report"
	Subtitle string
	Date     string // shown as given (the caller decides; Build never reads the clock)
	Seed     string
	Extra    []KV // further run facts (spec files, database, options)

	Data   *lots.Dataset
	By     lots.GroupBy
	System units.System
	// Minimums are the specification minimums by property name, in the
	// internal unit (drawn on the property figures).
	Minimums map[string]float64
	// Lines are further reference values by property name, in the internal
	// unit (for example A- and B-basis values).
	Lines map[string][]RefLine
	// Marked are group keys drawn as rejected on the dot plots.
	Marked []string

	// Summary items go to the box at the top after the data counts.
	Summary []KV
	// Cautions are added after Caution.
	Cautions []string
	// Sections made by the caller (for example from acceptance or design
	// value results) go after the data overview, in order.
	Sections []Section

	Trend   *trend.Result
	Reduced []*reduce.Result
	// MaxCurves limits the stress-strain curves shown (0: 12).
	MaxCurves int
}

// Build makes the standard report: the summary and cautions, the caller's
// sections, a section per property of the data (dot plot by group,
// histogram with fitted densities, probability plots), the trend and the
// reduced records.
func Build(in Inputs) (*Document, error) {
	d := &Document{Title: in.Title, Subtitle: in.Subtitle, Cautions: append([]string{Caution}, in.Cautions...)}
	if d.Title == "" {
		d.Title = "Lot report"
	}
	d.Meta = Meta{Version: lots.Version, Date: in.Date, Seed: in.Seed, Extra: in.Extra}
	if in.Data != nil {
		d.Meta.Inputs = append(d.Meta.Inputs, Input{Name: in.Data.Source, Digest: in.Data.Digest, Bytes: in.Data.Bytes})
	}
	d.Sections = append(d.Sections, in.Sections...)
	if in.Data != nil {
		by := in.By
		if by == "" {
			by = lots.ByLot
		}
		groups, err := in.Data.Group(by, nil)
		if err != nil {
			return nil, err
		}
		d.Summary = append(d.Summary,
			KV{Key: "Specimens", Value: strconv.Itoa(len(in.Data.Specimens))},
			KV{Key: string(by) + "s", Value: strconv.Itoa(len(groups))})
		for pi, p := range in.Data.Properties {
			min := math.NaN()
			if v, ok := in.Minimums[p.Name]; ok {
				min = v
			}
			all, _ := in.Data.Values(pi, allIndexes(len(in.Data.Specimens)))
			if len(all) < 3 {
				continue
			}
			blocks, err := PropertyFigures(in.Data, pi, groups, PropertyOptions{By: string(by), System: in.System, Minimum: min, Lines: in.Lines[p.Name], Marked: in.Marked})
			if err != nil {
				return nil, fmt.Errorf("report: %s: %w", p.Name, err)
			}
			d.Sections = append(d.Sections, Section{Title: "Distribution of " + p.Name, Blocks: blocks})
		}
	}
	d.Summary = append(d.Summary, in.Summary...)
	if in.Trend != nil && len(in.Trend.Periods) > 0 {
		sec, err := TrendSection(in.Trend)
		if err != nil {
			return nil, err
		}
		d.Sections = append(d.Sections, sec)
		d.Summary = append(d.Summary, KV{Key: "Trend signals", Value: strconv.Itoa(len(in.Trend.Signals)), Status: statusIf(len(in.Trend.Signals) > 0, Warn, OK)})
	}
	if len(in.Reduced) > 0 {
		max := in.MaxCurves
		if max == 0 {
			max = 12
		}
		sec, err := ReduceSection(in.Reduced, in.System, max)
		if err != nil {
			return nil, err
		}
		d.Sections = append(d.Sections, sec)
	}
	return d, nil
}

func allIndexes(n int) []int {
	out := make([]int, n)
	for i := range out {
		out[i] = i
	}
	return out
}

func statusIf(cond bool, yes, no Status) Status {
	if cond {
		return yes
	}
	return no
}
