package campaign

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sort"
	"sync"
	"sync/atomic"

	"lotproof/lots"
	"lotproof/lots/allowables"
)

// Plan is a candidate campaign: Lots lots of Specimens specimens each.
type Plan struct {
	Lots      int `json:"lots"`
	Specimens int `json:"specimens"`
}

// Limits of a plan and of the simulation.
const (
	MaxLots      = 100
	MaxSpecimens = 1000
	MaxRuns      = 1000000
)

// Config is one planning question.
type Config struct {
	Plans        []Plan
	Population   Population
	CostSpecimen float64             // cost of one specimen
	CostLot      float64             // cost of procuring one lot (heat or batch)
	Procedure    allowables.Options  // levels and, when set, a forced method
	Runs         int                 // campaigns simulated per plan
	Seed         uint64              // seed of the simulation
	Workers      int                 // 0: all cores
	TargetRatio  float64             // 0: no target; else the median ratio a plan must reach
	TargetBasis  string              // "a" or "b" (default "b"): the basis the target applies to
	Done         func(campaigns int) // progress: called as simulated campaigns finish
}

// PlanResult is the simulated behaviour of one plan.
type PlanResult struct {
	Lots      int     `json:"lots"`
	Specimens int     `json:"specimens"`
	N         int     `json:"n"`
	Runs      int     `json:"runs"`
	Cost      float64 `json:"cost"`

	DefinedA    int        `json:"defined_a"` // campaigns that gave an A-basis value
	DefinedB    int        `json:"defined_b"`
	CoverageA   lots.Float `json:"coverage_a"` // fraction of A-basis values at or below the true 1st percentile
	CoverageASE lots.Float `json:"coverage_a_se"`
	CoverageB   lots.Float `json:"coverage_b"`
	CoverageBSE lots.Float `json:"coverage_b_se"`

	MedianARatio lots.Float `json:"median_a_ratio"` // median of A-basis value / true percentile
	P10ARatio    lots.Float `json:"p10_a_ratio"`
	P90ARatio    lots.Float `json:"p90_a_ratio"`
	MedianBRatio lots.Float `json:"median_b_ratio"`
	P10BRatio    lots.Float `json:"p10_b_ratio"`
	P90BRatio    lots.Float `json:"p90_b_ratio"`

	Methods map[string]int `json:"methods"` // campaigns per method that gave the B-basis value (under lot-aware: the handbook choice or a lot-aware bound)
	Failed  int            `json:"failed"`  // campaigns that gave no design value at all
}

// Result answers a planning question.
type Result struct {
	Population   Population       `json:"population"`
	TrueA        float64          `json:"true_a_percentile"` // the population's percentile the A-basis value estimates
	TrueB        float64          `json:"true_b_percentile"`
	A            allowables.Level `json:"a_level"`
	B            allowables.Level `json:"b_level"`
	Method       string           `json:"method"`
	Runs         int              `json:"runs"`
	Seed         uint64           `json:"seed"`
	CostSpecimen float64          `json:"cost_per_specimen"`
	CostLot      float64          `json:"cost_per_lot"`
	TargetRatio  float64          `json:"target_ratio"`
	TargetBasis  string           `json:"target_basis"`
	Cheapest     *Plan            `json:"cheapest_plan"` // nil when no plan reaches the target (or none was set)
	Plans        []PlanResult     `json:"plans"`
	Cautions     []string         `json:"cautions"`
}

// Cautions accompany every plan.
var Cautions = []string{
	lots.Caution,
	"The simulation assumes the population you describe (shape, spread, lot-to-lot share); real material may differ, so treat the results as a comparison of plans, not a prediction of the design value.",
}

// Check validates a configuration (an error names what to change).
func (c Config) Check() error {
	if len(c.Plans) == 0 {
		return errors.New("give at least one plan (lots and specimens per lot)")
	}
	for _, p := range c.Plans {
		if p.Lots < 1 || p.Lots > MaxLots {
			return fmt.Errorf("plan %dx%d: the number of lots must lie from 1 to %d", p.Lots, p.Specimens, MaxLots)
		}
		if p.Specimens < 1 || p.Specimens > MaxSpecimens {
			return fmt.Errorf("plan %dx%d: the specimens per lot must lie from 1 to %d", p.Lots, p.Specimens, MaxSpecimens)
		}
		if p.Lots*p.Specimens < 2 {
			return fmt.Errorf("plan %dx%d: a tolerance bound needs at least 2 specimens", p.Lots, p.Specimens)
		}
	}
	if c.Runs < 10 || c.Runs > MaxRuns {
		return fmt.Errorf("the number of simulated campaigns must lie from 10 to %d (got %d)", MaxRuns, c.Runs)
	}
	for _, v := range []float64{c.CostSpecimen, c.CostLot} {
		if !(v >= 0) || math.IsInf(v, 0) {
			return fmt.Errorf("costs must be finite and not negative (got %g)", v)
		}
	}
	if !(c.TargetRatio >= 0 && c.TargetRatio < 10) {
		return fmt.Errorf("the target ratio must lie from 0 (none) to 10 (got %g)", c.TargetRatio)
	}
	if c.TargetBasis != "" && c.TargetBasis != "a" && c.TargetBasis != "b" {
		return fmt.Errorf("the target basis must be a or b (got %q)", c.TargetBasis)
	}
	if err := c.Procedure.Check(); err != nil {
		return err
	}
	return c.Population.check()
}

// outcome of one simulated campaign.
type outcome struct {
	a, b   float64 // ratios to the true percentiles, NaN when not defined
	method string
}

// Run simulates every plan. The result does not depend on Workers.
func Run(c Config) (*Result, error) {
	if err := c.Check(); err != nil {
		return nil, err
	}
	if c.TargetBasis == "" {
		c.TargetBasis = "b"
	}
	m, err := c.Population.newModel()
	if err != nil {
		return nil, err
	}
	opt := c.Procedure
	qa, qb := m.quantile(1-opt.A.Content), m.quantile(1-opt.B.Content)
	outs := make([][]outcome, len(c.Plans))
	for i := range outs {
		outs[i] = make([]outcome, c.Runs)
	}
	// Work in blocks of runs, taken in order by the workers; each run has
	// its own generator, so the outcome does not depend on who ran it.
	const block = 16
	blocksPer := (c.Runs + block - 1) / block
	total := int64(len(c.Plans) * blocksPer)
	var next atomic.Int64
	workers := c.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	var wg sync.WaitGroup
	var mu sync.Mutex // serializes Done
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				j := next.Add(1) - 1
				if j >= total {
					return
				}
				pi, bi := int(j)/blocksPer, int(j)%blocksPer
				p := c.Plans[pi]
				lo, hi := bi*block, min((bi+1)*block, c.Runs)
				for r := lo; r < hi; r++ {
					rng := rand.New(rand.NewPCG(c.Seed, uint64(pi)<<32|uint64(r)))
					o, err := allowables.DesignValues(m.sample(rng, p.Lots, p.Specimens), opt)
					if err != nil {
						outs[pi][r] = outcome{a: math.NaN(), b: math.NaN(), method: o.Used}
						continue
					}
					outs[pi][r] = outcome{a: o.A / qa, b: o.B / qb, method: o.Used}
				}
				if c.Done != nil {
					mu.Lock()
					c.Done(hi - lo)
					mu.Unlock()
				}
			}
		}()
	}
	wg.Wait()
	res := &Result{Population: c.Population, TrueA: qa, TrueB: qb, A: opt.A, B: opt.B, Method: methodName(opt.Method),
		Runs: c.Runs, Seed: c.Seed, CostSpecimen: c.CostSpecimen, CostLot: c.CostLot, TargetRatio: c.TargetRatio, TargetBasis: c.TargetBasis,
		Cautions: Cautions}
	for i, p := range c.Plans {
		res.Plans = append(res.Plans, summarize(p, outs[i], c))
	}
	res.Cheapest = cheapest(res)
	return res, nil
}

func methodName(m string) string {
	if m == "" {
		return allowables.LotAware
	}
	return m
}

// summarize turns one plan's outcomes into its result. Coverage is the
// fraction of defined values at or below the true percentile (ratio <= 1)
// with the binomial standard error sqrt(c (1 - c) / runs); the ratio
// percentiles are sample quantiles (Hyndman and Fan 1996 type 7).
func summarize(p Plan, outs []outcome, c Config) PlanResult {
	pr := PlanResult{Lots: p.Lots, Specimens: p.Specimens, N: p.Lots * p.Specimens, Runs: len(outs),
		Cost: float64(p.Lots)*c.CostLot + float64(p.Lots*p.Specimens)*c.CostSpecimen, Methods: map[string]int{}}
	var ra, rb []float64
	for _, o := range outs {
		if o.method != "" && !(math.IsNaN(o.a) && math.IsNaN(o.b)) {
			pr.Methods[o.method]++
		}
		if math.IsNaN(o.a) && math.IsNaN(o.b) {
			pr.Failed++
		}
		if !math.IsNaN(o.a) {
			ra = append(ra, o.a)
		}
		if !math.IsNaN(o.b) {
			rb = append(rb, o.b)
		}
	}
	pr.DefinedA, pr.DefinedB = len(ra), len(rb)
	pr.CoverageA, pr.CoverageASE = coverage(ra)
	pr.CoverageB, pr.CoverageBSE = coverage(rb)
	sort.Float64s(ra)
	sort.Float64s(rb)
	pr.MedianARatio, pr.P10ARatio, pr.P90ARatio = lots.Float(Quantile(ra, 0.5)), lots.Float(Quantile(ra, 0.1)), lots.Float(Quantile(ra, 0.9))
	pr.MedianBRatio, pr.P10BRatio, pr.P90BRatio = lots.Float(Quantile(rb, 0.5)), lots.Float(Quantile(rb, 0.1)), lots.Float(Quantile(rb, 0.9))
	return pr
}

func coverage(r []float64) (lots.Float, lots.Float) {
	if len(r) == 0 {
		return lots.NaN, lots.NaN
	}
	k := 0
	for _, v := range r {
		if v <= 1 {
			k++
		}
	}
	f := float64(k) / float64(len(r))
	return lots.Float(f), lots.Float(math.Sqrt(f * (1 - f) / float64(len(r))))
}

// Quantile is the type-7 sample quantile of sorted values (Hyndman and Fan
// 1996, "Sample quantiles in statistical packages", The American
// Statistician 50(4); the default of R and numpy): with h = (n-1) q,
// x[⌊h⌋] + (h - ⌊h⌋)(x[⌊h⌋+1] - x[⌊h⌋]). NaN for no values.
func Quantile(sorted []float64, q float64) float64 {
	n := len(sorted)
	if n == 0 {
		return math.NaN()
	}
	h := float64(n-1) * q
	i := int(math.Floor(h))
	if i >= n-1 {
		return sorted[n-1]
	}
	return sorted[i] + (h-float64(i))*(sorted[i+1]-sorted[i])
}

// cheapest is the lowest-cost plan whose median ratio of the target basis
// reaches the target (ties: fewer specimens, then the order given).
func cheapest(r *Result) *Plan {
	if r.TargetRatio == 0 {
		return nil
	}
	var best *PlanResult
	for i := range r.Plans {
		p := &r.Plans[i]
		med := float64(p.MedianBRatio)
		if r.TargetBasis == "a" {
			med = float64(p.MedianARatio)
		}
		if math.IsNaN(med) || med < r.TargetRatio {
			continue
		}
		if best == nil || p.Cost < best.Cost || (p.Cost == best.Cost && p.N < best.N) {
			best = p
		}
	}
	if best == nil {
		return nil
	}
	return &Plan{Lots: best.Lots, Specimens: best.Specimens}
}
