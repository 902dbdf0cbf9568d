package campaign

import (
	"fmt"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"lotproof/lots/allowables"
)

// gridPopulation is a grid cell's population: within-lot CV 5% and a
// between/within SD ratio r, so the between-lot share of the variance
// (of the values, or of their logarithms) is r²/(1+r²) and the CV of
// individual values about 5% sqrt(1+r²).
func gridPopulation(dist string, r float64) Population {
	return Population{Dist: dist, Mean: 100, CV: 0.05 * math.Sqrt(1+r*r), BetweenShare: r * r / (1 + r*r)}
}

// gridCell simulates one distribution and SD ratio over the plans.
func gridCell(dist string, r float64, plans []Plan, runs int, method string, seed uint64) (*Result, error) {
	c := Config{Plans: plans, Population: gridPopulation(dist, r), Procedure: allowables.DefaultOptions(), Runs: runs, Seed: seed, CostSpecimen: 1}
	c.Procedure.Method = method
	return Run(c)
}

// The coverage grid at a reduced number of campaigns (150 a cell; a
// binomial SD of 0.018 at 0.95) for the default (lot-aware) procedure:
// coverage at least 0.95 - 3 SE (0.897) for A and B at nine plans of the
// grid, the handbook's 3 x 6 and 5 x 6 among them, including the cells
// where the handbook procedure falls short (3 lots with a lot effect;
// Weibull lots; 10 x 9 Weibull lots with SD ratio 0.5). The full grid with
// its standard errors comes from BenchmarkCoverageGrid; coverage-grid.md
// and the README record it.
func TestCoverageGridReduced(t *testing.T) {
	if testing.Short() {
		t.Skip("coverage simulation skipped with -short")
	}
	const runs = 150
	floor := 0.95 - 3*math.Sqrt(0.95*0.05/runs)
	for _, dist := range Distributions {
		for _, r := range []float64{0, 0.5, 2} {
			plans := []Plan{{3, 6}, {5, 6}, {10, 3}}
			if r == 0.5 {
				plans = []Plan{{4, 10}, {10, 9}}
			}
			res, err := gridCell(dist, r, plans, runs, "", 11)
			if err != nil {
				t.Fatal(err)
			}
			for _, p := range res.Plans {
				t.Logf("%s r=%g %dx%d: A %.3f B %.3f, median B ratio %.3f %v", dist, r, p.Lots, p.Specimens, float64(p.CoverageA), float64(p.CoverageB), float64(p.MedianBRatio), p.Methods)
				if float64(p.CoverageA) < floor || float64(p.CoverageB) < floor {
					t.Errorf("%s r=%g %dx%d: coverage A %.3f B %.3f below %.3f", dist, r, p.Lots, p.Specimens, float64(p.CoverageA), float64(p.CoverageB), floor)
				}
			}
		}
	}
}

func envInts(name string, def []int) []int {
	s := os.Getenv(name)
	if s == "" {
		return def
	}
	var out []int
	for _, f := range strings.Split(s, ",") {
		v, err := strconv.Atoi(strings.TrimSpace(f))
		if err == nil {
			out = append(out, v)
		}
	}
	return out
}

// BenchmarkCoverageGrid regenerates the coverage table of the README: the
// default (lot-aware) procedure, or the method in LOTPROOF_GRID_METHOD
// (handbook for the handbook procedure), on normal,
// lognormal and Weibull populations, lots 3-10, specimens 3-10, between/
// within SD ratio 0, 0.5, 1, 1.5, 2, LOTPROOF_GRID_RUNS campaigns a cell
// (default 1,000). LOTPROOF_GRID_LOTS, LOTPROOF_GRID_SPECIMENS,
// LOTPROOF_GRID_RATIOS (tenths: 0,10,20) and LOTPROOF_GRID_DISTS narrow it.
// Cells below 0.95 - 2 SE are marked with "!"; each row also gives the
// median A- and B-basis ratios to the true percentiles.
//
//	LOTPROOF_GRID_RUNS=1000 go test ./lots/campaign -run X -bench CoverageGrid -benchtime 1x
func BenchmarkCoverageGrid(b *testing.B) {
	runs := 1000
	if s := os.Getenv("LOTPROOF_GRID_RUNS"); s != "" {
		runs, _ = strconv.Atoi(s)
	}
	lotsList := envInts("LOTPROOF_GRID_LOTS", []int{3, 4, 5, 6, 7, 8, 9, 10})
	specs := envInts("LOTPROOF_GRID_SPECIMENS", []int{3, 4, 5, 6, 7, 8, 9, 10})
	ratios := envInts("LOTPROOF_GRID_RATIOS", []int{0, 5, 10, 15, 20})
	dists := Distributions
	if s := os.Getenv("LOTPROOF_GRID_DISTS"); s != "" {
		dists = strings.Split(s, ",")
	}
	method := os.Getenv("LOTPROOF_GRID_METHOD")
	var plans []Plan
	for _, k := range lotsList {
		for _, m := range specs {
			plans = append(plans, Plan{k, m})
		}
	}
	for i := 0; i < b.N; i++ {
		fmt.Printf("\ncoverage of the %s procedure, %d campaigns a cell (nominal 0.95; ! below 0.95 - 2 SE)\n", methodName(method), runs)
		fmt.Printf("| population | SD ratio | lots | per lot | A coverage | B coverage | median A ratio | median B ratio | methods |\n|---|---|---|---|---|---|---|---|---|\n")
		short, cells := 0, 0
		for _, d := range dists {
			for _, rt := range ratios {
				r := float64(rt) / 10
				res, err := gridCell(d, r, plans, runs, method, 2026)
				if err != nil {
					b.Fatal(err)
				}
				for _, p := range res.Plans {
					mark := func(c, se float64) string {
						s := fmt.Sprintf("%.3f ± %.3f", c, se)
						if c < 0.95-2*se {
							s += " !"
						}
						return s
					}
					ca, cb := float64(p.CoverageA), float64(p.CoverageB)
					sa, sb := float64(p.CoverageASE), float64(p.CoverageBSE)
					cells++
					if ca < 0.95-2*sa || cb < 0.95-2*sb {
						short++
					}
					fmt.Printf("| %s | %.1f | %d | %d | %s | %s | %.3f | %.3f | %s |\n", d, r, p.Lots, p.Specimens, mark(ca, sa), mark(cb, sb),
						float64(p.MedianARatio), float64(p.MedianBRatio), methodShares(p))
				}
			}
		}
		fmt.Printf("%d of %d cells below 0.95 - 2 SE\n", short, cells)
		b.ReportMetric(float64(short), "short-cells")
	}
}

func methodShares(p PlanResult) string {
	var parts []string
	for _, m := range allowables.BoundMethods {
		if n := p.Methods[m]; n > 0 {
			parts = append(parts, fmt.Sprintf("%s %.0f%%", m, 100*float64(n)/float64(p.Runs)))
		}
	}
	return strings.Join(parts, ", ")
}
