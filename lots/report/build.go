package report

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"lotproof/lots"
	"lotproof/lots/reduce"
	"lotproof/lots/render"
	"lotproof/lots/trend"
	"lotproof/lots/units"
)

// Caution is shown at the top of every report built by Build.
const Caution = lots.Caution

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
	// Minimums are the specification minimums in the internal unit, keyed
	// by MinimumKey(material, property); drawn on the property figures.
	Minimums map[string]float64
	// OnlyLimited leaves out the figures of properties without a minimum.
	OnlyLimited bool
	// Marked are group keys drawn as rejected on the dot plots.
	Marked []string

	// Summary items go to the box at the top after the data counts.
	Summary []KV
	// Cautions are added after Caution.
	Cautions []string
	// Sections made by the caller (for example from acceptance or design
	// value results) go after the data overview, in order.
	Sections []Section

	// Appendices go last, after everything Build makes.
	Appendices []Section

	Trend *trend.Result
	// TrendResolutions are the resolutions of the trend's values in the
	// units it is shown in (nil: unknown; see render.Resolution).
	TrendResolutions render.Resolutions
	// AllTrendCharts draws the control and EWMA charts of every trend
	// series; by default only of the series with a signal.
	AllTrendCharts bool
	Reduced        []*reduce.Result
	// MaxCurves limits the stress-strain curves shown (0: 12).
	MaxCurves int
}

// Build makes the standard report: the summary and cautions, the caller's
// sections, a section per material and property of the data (dot plot by
// group, histogram with fitted densities, probability plots), the trend and
// the reduced records.
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
			KV{Key: "Specimens", Value: strconv.Itoa(in.Data.Len())},
			KV{Key: strings.ToUpper(string(by[:1])) + string(by[1:]) + "s", Value: strconv.Itoa(len(groups))})
		// One section per material and property: values of different
		// materials are never mixed in a figure.
		var materials []string
		byMaterial := map[string][]lots.Group{}
		for _, g := range groups {
			if _, ok := byMaterial[g.Material]; !ok {
				materials = append(materials, g.Material)
			}
			byMaterial[g.Material] = append(byMaterial[g.Material], g)
		}
		for _, m := range materials {
			gs := byMaterial[m]
			var idx []int
			for _, g := range gs {
				idx = append(idx, g.Specimens...)
			}
			for pi, p := range in.Data.Properties {
				min, ok := in.Minimums[MinimumKey(m, p.Name)]
				if !ok {
					if in.OnlyLimited {
						continue
					}
					min = math.NaN()
				}
				if vals, _ := in.Data.Values(pi, idx); len(vals) < 3 {
					continue
				}
				blocks, err := PropertyFigures(in.Data, pi, gs, PropertyOptions{By: string(by), System: in.System, Minimum: min, Marked: in.Marked})
				if err != nil {
					return nil, fmt.Errorf("report: %s of %s: %w", p.Name, m, err)
				}
				title := "Distribution of " + p.Name
				if m != "" {
					title += ", " + m
				}
				d.Sections = append(d.Sections, Section{Title: title, Blocks: blocks})
			}
		}
	}
	d.Summary = append(d.Summary, in.Summary...)
	if in.Trend != nil && len(in.Trend.Periods) > 0 {
		sec, err := TrendSection(in.Trend, in.AllTrendCharts, in.TrendResolutions)
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
	d.Sections = append(d.Sections, in.Appendices...)
	return d, nil
}

// MinimumKey is the key of Inputs.Minimums (case is ignored).
func MinimumKey(material, property string) string {
	return strings.ToLower(material) + "\x00" + strings.ToLower(property)
}

func statusIf(cond bool, yes, no Status) Status {
	if cond {
		return yes
	}
	return no
}
