package allowables

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"lotproof/lots"
	"lotproof/lots/units"
)

// coverageCase is a lot-structured normal population: k lots of m
// specimens, lot means N(100, lotSD^2), values N(lot mean, 5^2).
type coverageCase struct {
	k, m  int
	lotSD float64
}

// procedureCoverage runs the whole procedure (the lot-aware default, or
// the method given, e.g. handbook) on reps simulated campaigns and returns the fraction of A- and B-basis values that lie
// below the true population quantiles (the population of individual
// values is N(100, lotSD^2 + 25)), and how often each method gave the
// B-basis value.
func procedureCoverage(c coverageCase, reps int, seed uint64, method string) (a, b float64, methods map[string]int) {
	const within = 5.0
	rng := rand.New(rand.NewPCG(seed, uint64(c.k*1000+c.m)))
	sd := math.Hypot(c.lotSD, within)
	qa := 100 + sd*distuv.UnitNormal.Quantile(0.01)
	qb := 100 + sd*distuv.UnitNormal.Quantile(0.10)
	opt := DefaultOptions()
	opt.Method = method
	u, _ := units.Parse("MPa")
	methods = map[string]int{}
	var okA, okB, defA, defB int
	for r := 0; r < reps; r++ {
		d := &lots.Dataset{Source: "sim", Properties: []lots.Property{{Name: "strength", Unit: u}}}
		for i := 0; i < c.k; i++ {
			mu := 100 + c.lotSD*rng.NormFloat64()
			for j := 0; j < c.m; j++ {
				d.Add(lots.Specimen{ID: fmt.Sprint(i, "-", j), Lot: fmt.Sprint("L", i),
					Values: []float64{mu + within*rng.NormFloat64()}})
			}
		}
		rep, err := Analyze(d, opt, "sim")
		if err != nil {
			continue
		}
		res := rep.Results[0]
		methods[res.B.Method]++
		if v := float64(res.ABasis); !math.IsNaN(v) {
			defA++
			if v <= qa {
				okA++
			}
		}
		if v := float64(res.BBasis); !math.IsNaN(v) {
			defB++
			if v <= qb {
				okB++
			}
		}
	}
	return float64(okA) / float64(defA), float64(okB) / float64(defB), methods
}

var coverageCases = []coverageCase{
	{5, 6, 0}, {5, 6, 2.5}, {5, 6, 5}, {10, 6, 0}, {10, 6, 2.5}, {10, 6, 5}, {10, 6, 10},
}

// The whole procedure, run on populations with and without a lot effect,
// holds roughly the stated confidence: a coarse test (200 campaigns a
// case) that fails on gross errors. BenchmarkProcedureCoverage prints the
// full table (2,000 campaigns a case) reported in the README.
func TestProcedureCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("coverage simulation skipped with -short")
	}
	for _, c := range []coverageCase{{10, 6, 0}, {10, 6, 5}} {
		a, b, m := procedureCoverage(c, 200, 42, "")
		t.Logf("k=%d m=%d lotSD=%g: A %.3f B %.3f methods %v", c.k, c.m, c.lotSD, a, b, m)
		// 200 campaigns: a binomial SD of about 0.015 at 0.95; a coverage
		// below 0.80 means the procedure is badly wrong.
		if a < 0.80 || b < 0.80 {
			t.Errorf("coverage A %.3f B %.3f below 0.80", a, b)
		}
	}
}

// BenchmarkProcedureCoverage prints the coverage of the default procedure,
// or of the method in LOTPROOF_COVERAGE_METHOD (handbook: the README's
// table), LOTPROOF_COVERAGE_REPS campaigns per case.
func BenchmarkProcedureCoverage(b *testing.B) {
	reps := 2000
	if s := os.Getenv("LOTPROOF_COVERAGE_REPS"); s != "" {
		fmt.Sscan(s, &reps)
	}
	method := os.Getenv("LOTPROOF_COVERAGE_METHOD")
	for i := 0; i < b.N; i++ {
		fmt.Printf("\nwhole-procedure coverage (%s), %d campaigns per case (nominal 0.95)\n", methodName(method), reps)
		fmt.Printf("%5s %5s %7s %8s %8s  methods\n", "lots", "per", "lotSD/sd", "A cover", "B cover")
		for _, c := range coverageCases {
			a, bb, m := procedureCoverage(c, reps, 2026, method)
			fmt.Printf("%5d %5d %8.2f %8.3f %8.3f  %v\n", c.k, c.m, c.lotSD/5, a, bb, m)
		}
	}
}
