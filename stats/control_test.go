package stats

import (
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"testing"
)

// controlRef is testdata/trend/control_ref.json, made by
// testdata/trend/make_control_ref.py with Debian's scipy (versions inside).
type controlRef struct {
	Constants []struct {
		N                          int
		C4, D2, A2, A3, B3, B4, E2 float64
	} `json:"constants"`
	Welch []struct {
		A, B     []float64
		T, P, DF float64
	} `json:"welch"`
	Capability []struct {
		X                                     []float64
		Lower, Conf, Mean, SD, Index, Bissell float64
		ExactNCT                              float64 `json:"exact_nct"`
		FractionBelow                         float64 `json:"fraction_below"`
	} `json:"capability"`
	Individuals struct {
		X                              []float64
		Center, MRBar, Sigma, LCL, UCL float64
	} `json:"individuals"`
	MedianMR struct {
		D4              float64
		D4Simulated     float64 `json:"d4_simulated"`
		MedianMR        float64 `json:"median_mr"`
		Sigma, LCL, UCL float64
	} `json:"median_mr"`
	EWMA struct {
		X                     []float64
		Lambda, L, Mu0, Sigma float64
		Points                [][3]float64
	} `json:"ewma"`
}

func loadControlRef(t *testing.T) controlRef {
	t.Helper()
	b, err := os.ReadFile("../testdata/trend/control_ref.json")
	if err != nil {
		t.Fatal(err)
	}
	var r controlRef
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return r
}

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.Abs(got-want) > tol || math.IsNaN(got) != math.IsNaN(want) {
		t.Errorf("%s = %.12g, want %.12g (tolerance %g)", what, got, want, tol)
	}
}

// Control-chart factors against the printed table of Montgomery,
// Introduction to Statistical Quality Control, Appendix VI (identical to
// ASTM MNL 7A Table 49); values typed in from memory, rounded as printed
// (4 decimals for c4, 3 for the others), so the tolerance is half a unit
// in the last printed place.
func TestChartFactorsMontgomeryTable(t *testing.T) {
	table := []struct {
		n                      int
		a2, a3, c4, b3, b4, d2 float64
	}{
		{2, 1.880, 2.659, 0.7979, 0, 3.267, 1.128},
		{3, 1.023, 1.954, 0.8862, 0, 2.568, 1.693},
		{4, 0.729, 1.628, 0.9213, 0, 2.266, 2.059},
		{5, 0.577, 1.427, 0.9400, 0, 2.089, 2.326},
		{6, 0.483, 1.287, 0.9515, 0.030, 1.970, 2.534},
		{7, 0.419, 1.182, 0.9594, 0.118, 1.882, 2.704},
		{8, 0.373, 1.099, 0.9650, 0.185, 1.815, 2.847},
		{9, 0.337, 1.032, 0.9693, 0.239, 1.761, 2.970},
		{10, 0.308, 0.975, 0.9727, 0.284, 1.716, 3.078},
		{15, 0.223, 0.789, 0.9823, 0.428, 1.572, 3.472},
		{20, 0.180, 0.680, 0.9869, 0.510, 1.490, 3.735},
		{25, 0.153, 0.606, 0.9896, 0.565, 1.435, 3.931},
	}
	for _, r := range table {
		c, err := ChartFactors(r.n)
		if err != nil {
			t.Fatal(err)
		}
		near(t, "A2", c.A2, r.a2, 0.0005+1e-9)
		near(t, "A3", c.A3, r.a3, 0.0005+1e-9)
		near(t, "c4", c.C4, r.c4, 0.00005+1e-9)
		near(t, "B3", c.B3, r.b3, 0.0005+1e-9)
		near(t, "B4", c.B4, r.b4, 0.0005+1e-9)
		near(t, "d2", c.D2, r.d2, 0.0005+1e-9)
	}
	// E2 = 3/d2(2), printed as 2.66 (Montgomery §6.4, from 3/1.128).
	c, _ := ChartFactors(2)
	near(t, "E2", c.E2, 2.66, 0.005)
}

// Against scipy: c4 from log-gamma, d2 from adaptive quadrature of the
// range integral, and the factors derived from them (relative 1e-10).
func TestChartFactorsAgainstScipy(t *testing.T) {
	ref := loadControlRef(t)
	if len(ref.Constants) < 30 {
		t.Fatalf("only %d reference rows", len(ref.Constants))
	}
	for _, r := range ref.Constants {
		c, err := ChartFactors(r.N)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range []struct {
			name      string
			got, want float64
		}{{"c4", c.C4, r.C4}, {"d2", c.D2, r.D2}, {"A2", c.A2, r.A2}, {"A3", c.A3, r.A3}, {"B3", c.B3, r.B3}, {"B4", c.B4, r.B4}, {"E2", c.E2, r.E2}} {
			near(t, p.name, p.got, p.want, 1e-10*math.Max(1, math.Abs(p.want)))
		}
	}
	if _, err := C4(1); !errors.Is(err, ErrTooFew) {
		t.Errorf("C4(1): %v", err)
	}
	if _, err := D2(1); err == nil {
		t.Error("D2(1) accepted")
	}
}

// Individuals chart limits and the S chart against independent numpy
// arithmetic; S chart limits are B3·sbar and B4·sbar.
func TestIndividualsAndSLimits(t *testing.T) {
	ref := loadControlRef(t).Individuals
	l, mr, err := IndividualsLimits(ref.X)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "centre", l.Center, ref.Center, 1e-10)
	near(t, "MRbar", mr, ref.MRBar, 1e-12)
	near(t, "sigma", l.Sigma, ref.Sigma, 1e-12)
	near(t, "LCL", l.Lower, ref.LCL, 1e-10)
	near(t, "UCL", l.Upper, ref.UCL, 1e-10)
	if _, _, err := IndividualsLimits([]float64{1}); !errors.Is(err, ErrTooFew) {
		t.Errorf("one value: %v", err)
	}
	if _, _, err := IndividualsLimits([]float64{2, 2, 2}); !errors.Is(err, ErrZeroSpread) {
		t.Errorf("constant: %v", err)
	}
	if _, _, err := IndividualsLimits([]float64{2, math.NaN()}); !errors.Is(err, ErrNonFinite) {
		t.Errorf("NaN: %v", err)
	}
	// Median moving range (Montgomery §6.4): d4 against scipy's
	// √2·Φ⁻¹(0.75) and a 10^6-pair simulation (0.001), limits against numpy.
	mm := loadControlRef(t).MedianMR
	near(t, "d4", MedianMRConstant(), mm.D4, 1e-12)
	near(t, "d4 simulated", MedianMRConstant(), mm.D4Simulated, 0.002)
	near(t, "d4 printed 0.954 (common practice)", MedianMRConstant(), 0.954, 0.0005)
	lm, med, err := IndividualsLimitsMedianMR(ref.X)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "median MR", med, mm.MedianMR, 1e-12)
	near(t, "median-MR sigma", lm.Sigma, mm.Sigma, 1e-10)
	near(t, "median-MR LCL", lm.Lower, mm.LCL, 1e-9)
	near(t, "median-MR UCL", lm.Upper, mm.UCL, 1e-9)
	if _, _, err := IndividualsLimitsMedianMR([]float64{1, 1, 1, 5}); !errors.Is(err, ErrZeroSpread) {
		t.Errorf("zero median MR: %v", err)
	}
	// S chart, n = 5 (Montgomery Appendix VI: B3 = 0, B4 = 2.089).
	s, err := SChartLimits(10, 5)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "S LCL", s.Lower, 0, 0)
	near(t, "S UCL", s.Upper, 20.89, 0.005)
	if _, err := SChartLimits(0, 5); err == nil {
		t.Error("zero sbar accepted")
	}
	// Pooled sbar, Montgomery eq. 6.31, by hand: sqrt((4·4 + 2·9)/(4+2)).
	p, err := PooledSBar([]float64{2, 3, 7}, []int{5, 3, 1})
	if err != nil {
		t.Fatal(err)
	}
	near(t, "pooled sbar", p, math.Sqrt(34.0/6), 1e-12)
	m, _ := MeanSBar([]float64{2, 3, 7})
	near(t, "mean sbar", m, 4, 1e-12)
}

// EWMA: Montgomery, 7th ed., Example 9.2 (λ = 0.1, L = 2.7, μ0 = 10,
// σ = 1; data of Table 9.1 begin 9.45, 7.99): z1 = 9.945, z2 = 9.7495;
// limits 9.73/10.27 at i = 1 and 9.64/10.36 at i = 2 (printed to two
// decimals; from memory). Then against the formula evaluated by numpy.
func TestEWMA(t *testing.T) {
	p, err := EWMA([]float64{9.45, 7.99}, 10, 1, 0.1, 2.7)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "z1", p[0].Z, 9.945, 1e-12)
	near(t, "z2", p[1].Z, 9.7495, 1e-12)
	near(t, "LCL1", p[0].Lower, 9.73, 0.005)
	near(t, "UCL1", p[0].Upper, 10.27, 0.005)
	near(t, "LCL2", p[1].Lower, 9.64, 0.005)
	near(t, "UCL2", p[1].Upper, 10.36, 0.005)
	ref := loadControlRef(t).EWMA
	q, err := EWMA(ref.X, ref.Mu0, ref.Sigma, ref.Lambda, ref.L)
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range ref.Points {
		near(t, "z", q[i].Z, r[0], 1e-10)
		near(t, "lower", q[i].Lower, r[1], 1e-10)
		near(t, "upper", q[i].Upper, r[2], 1e-10)
	}
	// The limits approach the asymptotic μ0 ± Lσ·sqrt(λ/(2-λ)).
	w := ref.L * ref.Sigma * math.Sqrt(ref.Lambda/(2-ref.Lambda))
	near(t, "asymptote", q[len(q)-1].Upper, ref.Mu0+w, 1e-3*w)
	for _, bad := range [][4]float64{{10, 1, 0, 3}, {10, 1, 1.5, 3}, {10, 0, 0.2, 3}, {10, 1, 0.2, 0}, {math.NaN(), 1, 0.2, 3}} {
		if _, err := EWMA([]float64{1}, bad[0], bad[1], bad[2], bad[3]); err == nil {
			t.Errorf("EWMA accepted %v", bad)
		}
	}
}

// Welch's t-test against scipy.stats.ttest_ind(equal_var=False).
func TestWelchAgainstScipy(t *testing.T) {
	for _, r := range loadControlRef(t).Welch {
		w, err := WelchT(r.A, r.B)
		if err != nil {
			t.Fatal(err)
		}
		near(t, "t", w.T, r.T, 1e-10*math.Max(1, math.Abs(r.T)))
		near(t, "df", w.DF, r.DF, 1e-9*r.DF)
		near(t, "p", w.P, r.P, 1e-9*math.Max(r.P, 1e-3))
	}
	if _, err := WelchT([]float64{1}, []float64{1, 2}); !errors.Is(err, ErrTooFew) {
		t.Errorf("one value: %v", err)
	}
	if _, err := WelchT([]float64{1, 1}, []float64{2, 2}); !errors.Is(err, ErrZeroSpread) {
		t.Errorf("no spread: %v", err)
	}
}

// The lower performance index, Bissell's bound and the normal tail against
// scipy; Bissell's approximation against the exact bound from the
// noncentral t distribution (scipy.stats.nct; 3√n·Ĉ is noncentral t with
// n-1 df and noncentrality 3√n·C): within 0.012 at n >= 5. By simulation
// (100000 samples, recorded in the JSON) the approximate bound covers
// 94.6 % (n = 10, C = 1, 95 %), 94.7 % (n = 30, C = 1.33, 95 %) and
// 89.3 % (n = 50, C = 1, 90 %): close to nominal, slightly below.
func TestPerformanceLowerAgainstScipy(t *testing.T) {
	for _, r := range loadControlRef(t).Capability {
		c, err := PerformanceLower(r.X, r.Lower, r.Conf)
		if err != nil {
			t.Fatal(err)
		}
		near(t, "mean", c.Mean, r.Mean, 1e-10*math.Abs(r.Mean))
		near(t, "sd", c.SD, r.SD, 1e-10*r.SD)
		near(t, "index", c.Index, r.Index, 1e-10)
		near(t, "Bissell bound", c.Bound, r.Bissell, 1e-10)
		near(t, "exact bound", c.Bound, r.ExactNCT, 0.012)
		near(t, "fraction below", c.FractionBelow, r.FractionBelow, 1e-12+1e-9*r.FractionBelow)
		b, _ := BissellLowerBound(c.Index, c.N, r.Conf)
		near(t, "BissellLowerBound", b, r.Bissell, 1e-10)
	}
	if _, err := PerformanceLower([]float64{5, 5, 5}, 1, 0.95); !errors.Is(err, ErrZeroSpread) {
		t.Errorf("constant sample: %v", err)
	}
	if _, err := PerformanceLower([]float64{5}, 1, 0.95); !errors.Is(err, ErrTooFew) {
		t.Errorf("one value: %v", err)
	}
	if _, err := PerformanceLower([]float64{5, 6}, 1, 1); err == nil {
		t.Error("confidence 1 accepted")
	}
	if _, err := PerformanceLower([]float64{5, math.Inf(1)}, 1, 0.9); !errors.Is(err, ErrNonFinite) {
		t.Errorf("Inf: %v", err)
	}
}

// Western Electric rules (Statistical Quality Control Handbook, 1956):
// series built to trip each rule exactly at a known point, and series that
// just miss it.
func TestWesternElectric(t *testing.T) {
	type sig struct{ rule, index, side int }
	cases := []struct {
		name string
		z    []float64
		want []sig
	}{
		{"rule 1 above and below", []float64{0, 3.01, 0, -3.2, 0, 2.99}, []sig{{1, 1, 1}, {1, 3, -1}}},
		{"rule 2", []float64{0, 2.1, 0.5, 2.2, 0}, []sig{{2, 3, 1}}},
		{"rule 2 misses on opposite sides", []float64{0, 2.1, -2.1, 0.5, 0}, nil},
		{"rule 3", []float64{-1.1, -1.2, 0, -1.3, -1.5, 0}, []sig{{3, 4, -1}}},
		{"rule 3 misses with three", []float64{-1.1, -1.2, 0, -0.3, -1.5, 0}, nil},
		{"rule 4", []float64{0.1, 0.2, 0.1, 0.3, 0.1, 0.2, 0.1, 0.4, -0.1}, []sig{{4, 7, 1}}},
		{"rule 4 broken by a zero", []float64{0.1, 0.2, 0.1, 0, 0.1, 0.2, 0.1, 0.4, 0.1}, nil},
	}
	for _, c := range cases {
		// Scale: centre 100, sigma 5.
		x := make([]float64, len(c.z))
		for i, v := range c.z {
			x[i] = 100 + 5*v
		}
		got, err := WesternElectric(x, 100, 5)
		if err != nil {
			t.Fatal(err)
		}
		if len(got) != len(c.want) {
			t.Errorf("%s: got %+v, want %+v", c.name, got, c.want)
			continue
		}
		for i, g := range got {
			if g.Rule != c.want[i].rule || g.Index != c.want[i].index || g.Side != c.want[i].side {
				t.Errorf("%s: got %+v, want %+v", c.name, got, c.want)
			}
		}
	}
	if _, err := WesternElectric([]float64{1}, 0, 0); err == nil {
		t.Error("zero sigma accepted")
	}
}

// Coverage of Bissell's bound by simulation in Go (20000 normal samples of
// n = 10, true index 1, 95 %), against the 100000-sample scipy simulation
// recorded in control_ref.json (0.94632): within four binomial standard
// errors of the two simulations combined.
func TestBissellCoverageBySimulation(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	const reps, n = 20000, 10
	x := make([]float64, n)
	covered := 0
	for r := 0; r < reps; r++ {
		for i := range x {
			x[i] = rng.NormFloat64()
		}
		c, err := PerformanceLower(x, -3, 0.95) // true index (0 - (-3))/(3·1) = 1
		if err != nil {
			t.Fatal(err)
		}
		if c.Bound <= 1 {
			covered++
		}
	}
	got := float64(covered) / reps
	const scipyCoverage = 0.94632
	se := math.Sqrt(0.95*0.05/reps + 0.95*0.05/100000)
	if math.Abs(got-scipyCoverage) > 4*se {
		t.Errorf("coverage %.4f, scipy simulation %.4f (4 SE = %.4f)", got, scipyCoverage, 4*se)
	}
}
