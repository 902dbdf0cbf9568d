package trend

import (
	"sort"
	"strconv"

	"lotproof/lots"
)

// checkBaseline refuses a baseline range (--baseline) in which no series
// has a recorded period: control limits from nothing are no limits, and
// the range is most likely mistyped. The error names the range and the
// periods that do hold lots.
func checkBaseline(res *Result, o Options) error {
	if o.Baseline == "" || len(res.Series) == 0 {
		return nil
	}
	for _, s := range res.Series {
		if s.BaselineFrom != "" {
			return nil
		}
	}
	seen := map[string]bool{}
	for _, p := range res.Periods {
		seen[p.Period] = true
	}
	var ps []string
	for p := range seen {
		ps = append(ps, p)
	}
	sort.Strings(ps)
	have := "none"
	if len(ps) > 0 {
		have = ps[0] + ".." + ps[len(ps)-1]
	}
	return lots.Inputf("--baseline", "choose a baseline among the recorded periods ("+have+"), or leave --baseline out for each series' first "+strconv.Itoa(DefaultBaseline)+" periods",
		"the baseline %s holds no recorded lots", o.Baseline)
}
