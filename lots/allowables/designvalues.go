package allowables

import (
	"fmt"
	"math"

	"lotproof/lots"

	"lotproof/stats"
)

// Outcome is what the procedure gives for one property and condition,
// without the audit trail: the design values and the method used.
type Outcome struct {
	A, B       float64 // NaN when not defined
	Method     string  // the method asked for: lot-aware (the default), a forced method, or the handbook procedure's choice
	Used       string  // the method that gave the B-basis value (for lot-aware: the handbook choice or a lot-aware bound)
	AutoMethod string  // the handbook procedure's choice
}

// DesignValues runs the same steps as Analyze for one property at one
// condition on values already grouped by lot (display units, after any
// exclusions): the lot comparison, the choice of distribution (or the
// forced opt.Method) and the A- and B-basis bounds. The outlier screen is
// left out because it only flags values and never changes a design value;
// pooling across conditions is left out because there is one condition.
// It is the procedure a simulation of whole campaigns repeats (the
// campaign planner, the coverage tests).
func DesignValues(values [][]float64, opt Options) (Outcome, error) {
	out := Outcome{A: math.NaN(), B: math.NaN()}
	if err := checkOptions(opt); err != nil {
		return out, err
	}
	r := &Result{Parameters: map[string]lots.Float{}}
	for _, v := range values {
		if len(v) > 0 {
			r.values = append(r.values, v)
		}
	}
	all := flatten(r.values)
	r.N, r.Lots = len(all), len(r.values)
	if r.N < 2 {
		return out, fmt.Errorf("%d value(s); a tolerance bound needs at least 2", r.N)
	}
	sum, err := stats.Describe(all)
	if err != nil {
		return out, err
	}
	if sum.SD == 0 {
		return out, fmt.Errorf("all %d values are equal; no distribution can be fitted", r.N)
	}
	r.Mean, r.SD, r.Min, r.Max = lots.Float(sum.Mean), lots.Float(sum.SD), lots.Float(sum.Min), lots.Float(sum.Max)
	auto, err := chooseMethod(r, opt)
	if err != nil {
		return out, err
	}
	r.AutoMethod, r.Method = auto, procedureMethod(opt.Method, auto)
	out.Method, out.AutoMethod = r.Method, auto
	if err := computeBasis(r, opt); err != nil {
		return out, err
	}
	out.Used = out.Method
	if r.usedB != "" {
		out.Used = r.usedB
	}
	out.A, out.B = float64(r.ABasis), float64(r.BBasis)
	return out, nil
}

// Check reports whether the options can be used (levels strictly between
// 0 and 1, a known method, enough Monte Carlo samples).
func (opt Options) Check() error { return checkOptions(opt) }

// procedureMethod is the method a result is computed by: the lot-aware
// method by default, the handbook's automatic choice for Handbook, else
// the forced method.
func procedureMethod(forced, auto string) string {
	switch forced {
	case "":
		return LotAware
	case Handbook:
		return auto
	}
	return forced
}
