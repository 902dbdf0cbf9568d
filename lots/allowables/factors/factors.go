// Package factors tabulates the one-sided lower tolerance factors the
// design values use (normal k, the Weibull V by the handbook approximation
// or the exact pivotal simulation, the nonparametric ranks and
// Hanson-Koopmans factors) over sample sizes, contents and confidences;
// the formulas and sources are in the stats functions it calls.
package factors

import (
	"fmt"
	"strings"

	"lotproof/stats"
)

// Options of a table. Methods are normal, weibull-approx, weibull-mc
// (written weibull-exact) and nonparametric.
type Options struct {
	Sizes                 []int
	Contents, Confidences []float64
	Methods               []string
	Simulations           int    // weibull-mc: simulated samples per factor
	Seed                  uint64 // weibull-mc: random seed
	// Pivot replaces stats.WeibullPivotFactor when not nil (tests).
	Pivot func(n int, p, gamma float64, opt stats.WeibullMCOptions) (stats.WeibullFactor, error)
}

// Row is one factor. JSON keys n, content, confidence, method, factor
// are always present; rank and mc_std_error where they apply.
type Row struct {
	N          int      `json:"n"`
	Content    float64  `json:"content"`
	Confidence float64  `json:"confidence"`
	Method     string   `json:"method"`
	Factor     float64  `json:"factor"`
	Rank       int      `json:"rank,omitempty"`
	MCStdErr   *float64 `json:"mc_std_error,omitempty"`
	FailedFits *int     `json:"failed_fits,omitempty"` // weibull-exact: simulated fits that failed
}

// Result is a table of factors with notes on the methods.
type Result struct {
	Rows     []Row    `json:"rows"`
	Notes    []string `json:"notes"`
	Cautions []string `json:"cautions"`
}

// Limits of a table.
const (
	MaxN    = 100000  // largest sample size
	MaxRows = 1000000 // most rows
	MaxMCN  = 1000    // largest sample size of the exact Weibull factor
)

// Table computes the factors, one row per method, content, confidence and
// sample size.
func Table(o Options) (Result, error) {
	if len(o.Sizes)*len(o.Contents)*len(o.Confidences)*len(o.Methods) > MaxRows {
		return Result{}, fmt.Errorf("too many factors requested (more than %d rows): narrow --n or the lists", MaxRows)
	}
	for _, m := range o.Methods {
		if m != "weibull-mc" {
			continue
		}
		if o.Simulations < 1000 || o.Simulations > 10000000 {
			return Result{}, fmt.Errorf("--simulations %d: expected 1000 to 10,000,000", o.Simulations)
		}
		if o.Sizes[len(o.Sizes)-1] > MaxMCN {
			return Result{}, fmt.Errorf("weibull-exact: n up to %d (asked for %d)", MaxMCN, o.Sizes[len(o.Sizes)-1])
		}
	}
	res := Result{Cautions: []string{stats.DesignValueCaution}}
	noteSet := map[string]bool{}
	note := func(s string) {
		if !noteSet[s] {
			noteSet[s] = true
			res.Notes = append(res.Notes, s)
		}
	}
	for _, m := range o.Methods {
		for _, p := range o.Contents {
			for _, g := range o.Confidences {
				var ks []float64 // normal: the whole column at once (faster for long tables)
				if m == "normal" {
					var err error
					if ks, err = stats.NormalKTable(o.Sizes, p, g); err != nil {
						return Result{}, err
					}
				}
				for i, n := range o.Sizes {
					row := Row{N: n, Content: p, Confidence: g, Method: m}
					switch m {
					case "normal":
						row.Factor = ks[i]
						note("normal: bound = mean - k s (exact for normal data)")
					case "weibull-approx":
						f, err := stats.WeibullBasisV(n, p, g)
						if err != nil {
							if n < 3 {
								note("weibull-approx: needs n >= 3")
							} else {
								note(fmt.Sprintf("weibull-approx: no handbook approximation at content %g, confidence %g (use weibull-mc)", p, g))
							}
							continue
						}
						if f.Exact {
							se := f.StdErr
							row.MCStdErr = &se
							note(fmt.Sprintf("weibull-approx: up to n = 100 the exact factor from the built-in table (seeded simulation, seed %d; MC s.e. is each factor's standard error), above it the handbook closed form; these are the factors the allowables command applies", f.Seed))
						}
						row.Factor = f.V
						note("weibull: bound = alpha (-ln P)^(1/beta) exp(-V/(beta sqrt n)) from the maximum-likelihood fit")
					case "weibull-mc":
						if n < 3 {
							note("weibull-mc: needs n >= 3")
							continue
						}
						pivot := o.Pivot
						if pivot == nil {
							pivot = stats.WeibullPivotFactor
						}
						f, err := pivot(n, p, g, stats.WeibullMCOptions{Sims: o.Simulations, Seed: o.Seed})
						if err != nil {
							return Result{}, err
						}
						row.Factor = f.V
						se, nf := f.StdErrV, f.Failures
						row.MCStdErr, row.FailedFits = &se, &nf
						if nf > 0 {
							note(fmt.Sprintf("weibull-mc: %d of %d simulated fits failed at n = %d (content %g, confidence %g); each was counted as the largest value, which errs on the safe side; more than %g%% failed fits would stop the command", nf, o.Simulations, n, p, g, 100*stats.WeibullMCMaxFailFraction))
						}
						note(fmt.Sprintf("weibull-mc: %d simulations per factor, seed %d", o.Simulations, o.Seed))
						note("weibull: bound = alpha (-ln P)^(1/beta) exp(-V/(beta sqrt n)) from the maximum-likelihood fit")
					case "nonparametric":
						if n >= stats.OrderStatisticMinN(p, g) {
							r, _, err := stats.OrderStatisticRank(n, p, g)
							if err != nil {
								return Result{}, err
							}
							row.Method, row.Factor, row.Rank = "order-statistic", float64(r), r
							note("order-statistic: bound = x(r), the r-th smallest value (factor = r)")
						} else {
							// The rank the allowables procedure applies.
							r := stats.HansonKoopmansRank(n, p, g)
							k, err := stats.HansonKoopmansK(n, r, p, g)
							if err != nil {
								return Result{}, err
							}
							row.Method, row.Factor, row.Rank = "hanson-koopmans", k, r
							note("hanson-koopmans: bound = x(r) (x(1)/x(r))^k for n below the order-statistic minimum, with the rank r the allowables command applies (CMH-17-1G Table 8.5.14 for the B-basis up to n = 28, otherwise the largest value, r = n)")
						}
					}
					res.Rows = append(res.Rows, row)
				}
			}
		}
	}
	renameWeibullExact(&res)
	return res, nil
}

// renameWeibullExact gives the exact Weibull factor the name allowables
// uses for the same method (weibull-exact; weibull-mc was its old name in
// factors), in rows and notes.
func renameWeibullExact(r *Result) {
	for i := range r.Rows {
		if r.Rows[i].Method == "weibull-mc" {
			r.Rows[i].Method = "weibull-exact"
		}
	}
	for i, n := range r.Notes {
		r.Notes[i] = strings.ReplaceAll(n, "weibull-mc", "weibull-exact")
	}
}
