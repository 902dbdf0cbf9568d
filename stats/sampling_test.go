package stats

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

type samplingRef struct {
	OC []struct {
		N        int
		K, P, Pa float64
	}
	Binom []struct {
		N, C  int
		P, Pa float64
	}
	Designs []struct {
		P1, P2, Alpha, Beta float64
		WallisN             float64 `json:"wallis_n"`
		WallisK             float64 `json:"wallis_k"`
		N                   int
		KMin, KMax          float64
		AttrN               int `json:"attr_n"`
		AttrC               int `json:"attr_c"`
	}
}

// Reference: testdata/acceptance/sampling_ref.json from
// make_sampling_ref.py (Debian python3-scipy 1.10.1: scipy.stats.nct.sf,
// scipy.stats.binom.cdf, and plans found by brute-force search with
// scipy.stats.nct.ppf / binom.cdf).
func TestSamplingAgainstScipy(t *testing.T) {
	var ref samplingRef
	loadJSON(t, "../testdata/acceptance/sampling_ref.json", &ref)
	if len(ref.OC) == 0 || len(ref.Binom) == 0 || len(ref.Designs) != 4 {
		t.Fatal("empty reference")
	}
	for _, r := range ref.OC {
		got, err := VariablesAcceptProb(r.N, r.K, r.P)
		if err != nil {
			t.Fatal(err)
		}
		// relative 1e-8 in the smaller tail (Boost nct is good to ~1e-10).
		tail := math.Min(r.Pa, 1-r.Pa)
		if math.Abs(got-r.Pa) > 1e-8*tail+1e-15 {
			t.Errorf("OC n=%d k=%g p=%g: got %.15g want %.15g", r.N, r.K, r.P, got, r.Pa)
		}
	}
	for _, r := range ref.Binom {
		got, err := AttributesAcceptProb(r.N, r.C, r.P)
		if err != nil {
			t.Fatal(err)
		}
		tail := math.Min(r.Pa, 1-r.Pa)
		if math.Abs(got-r.Pa) > 1e-11*tail+1e-15 {
			t.Errorf("binom n=%d c=%d p=%g: got %.15g want %.15g", r.N, r.C, r.P, got, r.Pa)
		}
	}
	for _, r := range ref.Designs {
		wn, wk, err := WallisPlan(r.P1, r.P2, r.Alpha, r.Beta)
		if err != nil || math.Abs(wn-r.WallisN) > 1e-12*wn || math.Abs(wk-r.WallisK) > 1e-13 {
			t.Errorf("Wallis %v: %g %g", r, wn, wk)
		}
		v, err := DesignVariablesPlan(r.P1, r.P2, r.Alpha, r.Beta)
		if err != nil {
			t.Fatal(err)
		}
		if v.N != r.N || math.Abs(v.KMin-r.KMin) > 1e-9 || math.Abs(v.KMax-r.KMax) > 1e-9 || v.K != v.KMax {
			t.Errorf("variables plan %v: got %+v", r, v)
		}
		// The plan meets both risks.
		if math.Abs(v.ProducerRisk-r.Alpha) > 1e-9 || v.ConsumerRisk > r.Beta {
			t.Errorf("risks %+v", v)
		}
		a, err := DesignAttributesPlan(r.P1, r.P2, r.Alpha, r.Beta)
		if err != nil {
			t.Fatal(err)
		}
		if a.N != r.AttrN || a.C != r.AttrC || a.ProducerRisk > r.Alpha || a.ConsumerRisk > r.Beta {
			t.Errorf("attributes plan %v: got %+v", r, a)
		}
	}
}

// Published worked examples (from memory), Montgomery, "Introduction to
// Statistical Quality Control", acceptance sampling chapters:
//   - variables plan, sigma unknown, p1 = 0.01, 1-alpha = 0.95, p2 = 0.06,
//     beta = 0.10, read from the Jacobson nomograph: n = 40, k = 1.9;
//   - attributes plan p1 = 0.02, 1-alpha = 0.95, p2 = 0.08, beta = 0.10,
//     from the binomial nomograph: n = 98, c = 4.
//
// Nomograph readings carry about one unit of n and 0.01 of k.
func TestSamplingTextbookExamples(t *testing.T) {
	n, k, err := WallisPlan(0.01, 0.06, 0.05, 0.10)
	if err != nil || math.Abs(n-40) > 1 || math.Abs(k-1.9) > 0.01 {
		t.Errorf("Wallis: n %g k %g", n, k)
	}
	a, err := DesignAttributesPlan(0.02, 0.08, 0.05, 0.10)
	if err != nil || a.N != 98 || a.C != 4 {
		t.Errorf("attributes: %+v %v", a, err)
	}
}

// The exact OC checked by simulation: draw n normal values with the
// fraction p below L = 0, accept when (xbar - L)/s >= k.
func TestVariablesOCBySimulation(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	const n, k, p, reps = 10, 1.5, 0.05, 40000
	mu := -normalQuantile(p)
	acc := 0
	x := make([]float64, n)
	for range reps {
		for i := range x {
			x[i] = mu + rng.NormFloat64()
		}
		m, s := meanSD(x)
		if m/s >= k {
			acc++
		}
	}
	got := float64(acc) / reps
	want, _ := VariablesAcceptProb(n, k, p)
	if se := math.Sqrt(want * (1 - want) / reps); math.Abs(got-want) > 4*se {
		t.Errorf("simulated %g, exact %g (se %g)", got, want, se)
	}
}

func TestSamplingErrors(t *testing.T) {
	if _, err := DesignVariablesPlan(0.06, 0.01, 0.05, 0.1); !errors.Is(err, ErrDomain) {
		t.Error("AQL above RQL accepted")
	}
	if _, err := DesignAttributesPlan(0.01, 0.06, 0.6, 0.5); !errors.Is(err, ErrDomain) {
		t.Error("risks summing to 1.1 accepted")
	}
	if _, err := VariablesAcceptProb(1, 1, 0.1); !errors.Is(err, ErrTooFew) {
		t.Error("n = 1 accepted")
	}
	if _, _, err := WallisPlan(0, 0.1, 0.05, 0.1); !errors.Is(err, ErrDomain) {
		t.Error("p1 = 0 accepted")
	}
}
