package main

import (
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots/allowables/factors"
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
		if err1 != nil || err2 != nil || a < 2 || b < a || b > factors.MaxN {
			return nil, usageError{fmt.Errorf("--n %q: expected sizes or ranges between 2 and %d, e.g. 2-30 or 5,10,20", s, factors.MaxN)}
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
	res, err := factors.Table(factors.Options{Sizes: ns, Contents: contents, Confidences: confs, Methods: methods,
		Simulations: o.Sims, Seed: o.Seed, Pivot: o.pivot})
	if err != nil {
		return err
	}
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
