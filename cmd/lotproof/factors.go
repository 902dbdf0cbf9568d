package main

import (
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots/render"
	"lotproof/stats"
)

type factorsOptions struct {
	N          string // sample sizes: "2-30", "5,10,20", "2-10,50"
	Content    string // comma list of fractions (0.90 or 90%)
	Confidence string // comma list of fractions
	Methods    string // comma list: normal, weibull-approx, weibull-mc, nonparametric
	Sims       int    // Monte Carlo simulations for weibull-mc
	Seed       uint64 // Monte Carlo seed for weibull-mc
	Out        output

	pivot func(n int, p, gamma float64, opt stats.WeibullMCOptions) (stats.WeibullFactor, error) // tests only: replaces stats.WeibullPivotFactor
}

func init() { register(newFactorsCmd) }

func newFactorsCmd(g *globalOptions, st streams) *cobra.Command {
	o := factorsOptions{N: "2-30", Content: "0.90,0.99", Confidence: "0.95", Methods: "normal,weibull-approx,nonparametric", Sims: 10000, Seed: 1}
	cmd := &cobra.Command{
		Use:   "factors [--n 2-30] [--content 0.90,0.99] [--confidence 0.95] [--method normal,...]",
		Short: "Print one-sided lower tolerance factors for a range of sample sizes",
		Long: `factors prints the factors behind one-sided lower tolerance bounds (with
confidence C, at least a fraction P of the population lies above the bound;
A-basis is P = 0.99, B-basis P = 0.90, both at C = 0.95):

  normal          k in  mean - k s, exact (noncentral t; Owen 1968,
                  CMH-17-1G 8.3.4.3.1); n from 2 to 100,000
  weibull-approx  V in  q exp(-V/(shape sqrt n)) as the allowables command
                  applies it: exact (built-in table) up to n = 100, the
                  handbook closed form (CMH-17-1G 8.3.4.3.2) above; only
                  P = 0.90 or 0.99 at C = 0.95
  weibull-exact   the same V, exact from the pivotal quantities of the
                  maximum-likelihood estimates (Thoman, Bain and Antle 1970)
                  by seeded Monte Carlo (--simulations, --seed); shows its standard error
  nonparametric   the rank r of the order statistic x(r) when n is large
                  enough (CMH-17-1G 8.3.4.5.1), otherwise the Hanson-Koopmans
                  factor k in  x(r) (x(1)/x(r))^k  (Hanson and Koopmans 1964)
                  with the rank r shown, the one allowables applies

--n takes ranges and lists (2-30 or 5,10,20 or 2-10,50); fractions may be
written as 0.9 or 90%.`,
		Example: `  lotproof factors
  lotproof factors --n 2-10,20,50,100 --content 99% --method normal,nonparametric
  lotproof factors --n 10,30 --method weibull-exact --simulations 20000 --seed 7 --format json`,
		Args: exactArgs(0, "no arguments"),
		RunE: withOutput(g, st, &o.Out, func(args []string) error {
			return runFactors(o, st)
		}),
	}
	f := cmd.Flags()
	f.StringVar(&o.N, "n", o.N, "sample sizes: ranges and lists, e.g. 2-30 or 5,10,20")
	f.StringVar(&o.Content, "content", o.Content, "population fractions above the bound (comma list)")
	f.StringVar(&o.Confidence, "confidence", o.Confidence, "confidence levels (comma list)")
	f.StringVar(&o.Methods, "method", o.Methods, "methods: normal, weibull-approx, weibull-exact, nonparametric (comma list)")
	f.IntVar(&o.Sims, "simulations", o.Sims, "weibull-exact: simulated samples per factor (at least 1000)")
	f.IntVar(&o.Sims, "sims", o.Sims, "old name of --simulations")
	f.MarkHidden("sims")
	f.Uint64Var(&o.Seed, "seed", o.Seed, "weibull-exact: random seed (same seed, same output)")
	return cmd
}

// factorRow is one factor. JSON keys n, content, confidence, method, factor
// are always present; rank and mc_std_error where they apply.
type factorRow struct {
	N          int      `json:"n"`
	Content    float64  `json:"content"`
	Confidence float64  `json:"confidence"`
	Method     string   `json:"method"`
	Factor     float64  `json:"factor"`
	Rank       int      `json:"rank,omitempty"`
	MCStdErr   *float64 `json:"mc_std_error,omitempty"`
	FailedFits *int     `json:"failed_fits,omitempty"` // weibull-exact: simulated fits that failed
}

type factorsResult struct {
	Rows     []factorRow `json:"rows"`
	Notes    []string    `json:"notes"`
	Cautions []string    `json:"cautions"`
}

const (
	factorsMaxN    = 100000
	factorsMaxRows = 1000000
	factorsMaxMCN  = 1000
)

// parseSizes reads "2-30", "5,10,20" or a mix into increasing unique sizes.
func parseSizes(s string) ([]int, error) {
	seen := map[int]bool{}
	var out []int
	for _, part := range strings.Split(s, ",") {
		part = strings.TrimSpace(part)
		if part == "" {
			continue
		}
		lo, hi := part, part
		if i := strings.Index(part, "-"); i > 0 {
			lo, hi = part[:i], part[i+1:]
		}
		a, err1 := strconv.Atoi(strings.TrimSpace(lo))
		b, err2 := strconv.Atoi(strings.TrimSpace(hi))
		if err1 != nil || err2 != nil || a < 2 || b < a || b > factorsMaxN {
			return nil, usageError{fmt.Errorf("--n %q: expected sizes or ranges between 2 and %d, e.g. 2-30 or 5,10,20", s, factorsMaxN)}
		}
		for n := a; n <= b; n++ {
			if !seen[n] {
				seen[n] = true
				out = append(out, n)
			}
		}
	}
	if len(out) == 0 {
		return nil, usageError{fmt.Errorf("--n %q: no sample sizes", s)}
	}
	// Insertion order may interleave ranges; sort for a readable table.
	for i := 1; i < len(out); i++ {
		for j := i; j > 0 && out[j-1] > out[j]; j-- {
			out[j-1], out[j] = out[j], out[j-1]
		}
	}
	return out, nil
}

func parseFractions(flag, s string) ([]float64, error) {
	var out []float64
	for _, part := range strings.Split(s, ",") {
		if strings.TrimSpace(part) == "" {
			continue
		}
		v, err := parseFraction(flag, part)
		if err != nil {
			return nil, err
		}
		out = append(out, v)
	}
	if len(out) == 0 {
		return nil, usageError{fmt.Errorf("--%s is empty", flag)}
	}
	return out, nil
}

func runFactors(o factorsOptions, st streams) error {
	ns, err := parseSizes(o.N)
	if err != nil {
		return err
	}
	contents, err := parseFractions("content", o.Content)
	if err != nil {
		return err
	}
	confs, err := parseFractions("confidence", o.Confidence)
	if err != nil {
		return err
	}
	var methods []string
	for _, m := range strings.Split(o.Methods, ",") {
		m = strings.ToLower(strings.TrimSpace(m))
		switch m {
		case "":
			continue
		case "normal", "weibull-approx", "weibull-mc", "nonparametric":
			methods = append(methods, m)
		case "weibull-exact": // the name allowables uses; weibull-mc is the old name
			methods = append(methods, "weibull-mc")
		default:
			return usageError{fmt.Errorf("--method %q: expected normal, weibull-approx, weibull-exact or nonparametric", m)}
		}
	}
	if len(methods) == 0 {
		return usageError{fmt.Errorf("--method is empty")}
	}
	if len(ns)*len(contents)*len(confs)*len(methods) > factorsMaxRows {
		return usageError{fmt.Errorf("too many factors requested (more than %d rows): narrow --n or the lists", factorsMaxRows)}
	}
	for _, m := range methods {
		if m != "weibull-mc" {
			continue
		}
		if o.Sims < 1000 || o.Sims > 10000000 {
			return usageError{fmt.Errorf("--simulations %d: expected 1000 to 10,000,000", o.Sims)}
		}
		if ns[len(ns)-1] > factorsMaxMCN {
			return usageError{fmt.Errorf("weibull-exact: n up to %d (asked for %d)", factorsMaxMCN, ns[len(ns)-1])}
		}
	}
	res := factorsResult{Cautions: []string{stats.DesignValueCaution}}
	noteSet := map[string]bool{}
	note := func(s string) {
		if !noteSet[s] {
			noteSet[s] = true
			res.Notes = append(res.Notes, s)
		}
	}
	for _, m := range methods {
		for _, p := range contents {
			for _, g := range confs {
				var ks []float64 // normal: the whole column at once (faster for long tables)
				if m == "normal" {
					if ks, err = stats.NormalKTable(ns, p, g); err != nil {
						return err
					}
				}
				for i, n := range ns {
					row := factorRow{N: n, Content: p, Confidence: g, Method: m}
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
						pivot := o.pivot
						if pivot == nil {
							pivot = stats.WeibullPivotFactor
						}
						f, err := pivot(n, p, g, stats.WeibullMCOptions{Sims: o.Sims, Seed: o.Seed})
						if err != nil {
							return err
						}
						row.Factor = f.V
						se, nf := f.StdErrV, f.Failures
						row.MCStdErr, row.FailedFits = &se, &nf
						if nf > 0 {
							note(fmt.Sprintf("weibull-mc: %d of %d simulated fits failed at n = %d (content %g, confidence %g); each was counted as the largest value, which errs on the safe side; more than %g%% failed fits would stop the command", nf, o.Sims, n, p, g, 100*stats.WeibullMCMaxFailFraction))
						}
						note(fmt.Sprintf("weibull-mc: %d simulations per factor, seed %d", o.Sims, o.Seed))
						note("weibull: bound = alpha (-ln P)^(1/beta) exp(-V/(beta sqrt n)) from the maximum-likelihood fit")
					case "nonparametric":
						if n >= stats.OrderStatisticMinN(p, g) {
							r, _, err := stats.OrderStatisticRank(n, p, g)
							if err != nil {
								return err
							}
							row.Method, row.Factor, row.Rank = "order-statistic", float64(r), r
							note("order-statistic: bound = x(r), the r-th smallest value (factor = r)")
						} else {
							// The rank the allowables procedure applies.
							r := stats.HansonKoopmansRank(n, p, g)
							k, err := stats.HansonKoopmansK(n, r, p, g)
							if err != nil {
								return err
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
	return emit(st.Out, func(w io.Writer) error {
		if o.Out.Format == render.JSON {
			return render.WriteJSON(w, res)
		}
		cols := []string{"n", ">content", ">confidence", "method", ">factor", ">rank", ">Monte Carlo standard error"}
		withFails := slices.Contains(methods, "weibull-mc")
		if withFails {
			cols = append(cols, ">failed fits")
		}
		t := render.NewTable("", cols...)
		for _, r := range res.Rows {
			var rank, se, factor any = "", "", render.N(r.Factor, 8)
			if r.Rank > 0 {
				rank = strconv.Itoa(r.Rank)
			}
			if r.MCStdErr != nil {
				se = render.N(*r.MCStdErr, 3)
			}
			if r.Method == "order-statistic" {
				factor = strconv.Itoa(int(math.Round(r.Factor)))
			}
			cells := []any{strconv.Itoa(r.N), render.N(r.Content, 4), render.N(r.Confidence, 4), r.Method, factor, rank, se}
			if withFails {
				fails := ""
				if r.FailedFits != nil {
					fails = strconv.Itoa(*r.FailedFits)
				}
				cells = append(cells, fails)
			}
			t.Add(cells...)
		}
		if o.Out.Format == render.Text {
			t.Title = "One-sided lower tolerance factors"
			for _, n := range res.Notes {
				t.Note("%s", n)
			}
			for _, c := range res.Cautions {
				t.Note("Note: %s", c)
			}
		}
		return writeTables(w, o.Out.Format, t)
	})
}
