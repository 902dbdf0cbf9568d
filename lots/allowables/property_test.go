package allowables

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"lotproof/lots"
)

// TestBasisOrderSmallSamples: over random small campaigns (n = 2..10
// values in 1 to 3 lots, several populations, some with ties) and every
// method (automatic and each forced one), the A-basis value is never above
// the B-basis value (an A-basis bound covers 99% of the population, a
// B-basis bound 90%, at the same confidence: CMH-17-1G Vol. 1 section 1.5
// definitions), and every outcome is one of the documented ones with its
// reason: a design value with its audit steps (each with a decision and a
// reason), a missing value with a note, or a refusal (not analysed) that
// says why.
func TestBasisOrderSmallSamples(t *testing.T) {
	rng := rand.New(rand.NewPCG(16, 1))
	methods := append([]string{""}, AllMethods...)
	known := map[string]bool{NotAnalysed: true}
	for _, m := range AllMethods {
		known[m] = true
	}
	compared, refused := 0, 0
	for rep := range 45 {
		n := 2 + rep%9
		kind := rng.IntN(5)
		shape := 2 + 28*rng.Float64()
		vals := make([]float64, n)
		for i := range vals {
			switch kind {
			case 0:
				vals[i] = 100 + 5*rng.NormFloat64()
			case 1:
				vals[i] = 100 * math.Pow(rng.ExpFloat64(), 1/shape)
			case 2:
				vals[i] = math.Exp(4.6 + 0.2*rng.NormFloat64())
			case 3:
				vals[i] = 50 + 10*rng.Float64()
			case 4:
				vals[i] = math.Round(200 + 2*rng.NormFloat64())
			}
		}
		nLots := 1 + rep%3
		d := dataset(vals, func(i int) string { return fmt.Sprint("L", i%nLots) })
		for _, m := range methods {
			opt := DefaultOptions()
			opt.Method, opt.Sims = m, 1000
			rep, err := Analyze(d, opt, "2026-12-02")
			if err != nil {
				var ie *lots.InputError
				if !errors.As(err, &ie) || len(ie.Problems) == 0 || ie.Problems[0].What == "" {
					t.Errorf("method %q, %v: error without a located reason: %v", m, vals, err)
				}
				refused++
				continue
			}
			for _, r := range rep.Results {
				what := fmt.Sprintf("method %q (%s), n %d, %d lots, %v", m, r.Method, n, nLots, vals)
				if !known[r.Method] {
					t.Errorf("%s: undocumented method %q", what, r.Method)
				}
				if r.Method == NotAnalysed {
					refused++
					if len(r.Warnings) == 0 || len(r.Steps) == 0 || r.Steps[0].Reason == "" {
						t.Errorf("%s: not analysed without a reason", what)
					}
					continue
				}
				for _, s := range r.Steps {
					if s.Decision == "" || s.Reason == "" {
						t.Errorf("%s: step %+v lacks a decision or reason", what, s)
					}
				}
				a, b := float64(r.ABasis), float64(r.BBasis)
				if math.IsNaN(a) && r.A.Note == "" || math.IsNaN(b) && r.B.Note == "" {
					t.Errorf("%s: a missing basis value without a note: %+v %+v", what, r.A, r.B)
				}
				if !math.IsNaN(a) && !math.IsNaN(b) {
					compared++
					if a > b {
						t.Errorf("%s: A-basis %.6g above B-basis %.6g (A %s, B %s)", what, a, b, r.A.Note, r.B.Note)
					}
				}
			}
		}
	}
	if compared < 200 {
		t.Errorf("only %d A/B pairs compared (%d refused)", compared, refused)
	}
	t.Logf("%d A/B pairs compared, %d refusals", compared, refused)
}
