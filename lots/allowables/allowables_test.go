package allowables

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"lotproof/lots"
	"lotproof/stats"
)

// campaignCSV makes a campaign file: k lots of m values drawn as
// mu + lotSD*a_i + withinSD*e_ij (a, e standard normal), one condition.
func campaignCSV(seed uint64, k, m int, mu, lotSD, withinSD float64, cond string) string {
	rng := rand.New(rand.NewPCG(seed, 7))
	var b strings.Builder
	b.WriteString("specimen,lot,condition,strength [MPa]\n")
	for i := 0; i < k; i++ {
		a := rng.NormFloat64()
		for j := 0; j < m; j++ {
			fmt.Fprintf(&b, "S%s-%d-%d,L%d,%s,%.3f\n", cond, i, j, i, cond, mu+lotSD*a+withinSD*rng.NormFloat64())
		}
	}
	return b.String()
}

func read(t *testing.T, csv string) *lots.Dataset {
	t.Helper()
	d, err := lots.ReadCSV(strings.NewReader(csv), "c.csv")
	if err != nil {
		t.Fatal(err)
	}
	return d
}

func stepNamed(r Result, prefix string) *Step {
	for i := range r.Steps {
		if strings.HasPrefix(r.Steps[i].Step, prefix) {
			return &r.Steps[i]
		}
	}
	return nil
}

// The handbook procedure uses the ANOVA method when the lot effect is clear
// (lot SD three times the within-lot SD) and pools when there is none.
// Simulated populations: checks of the decision logic, not references.
func TestChoosesANOVAOnLotEffectAndPoolsWithout(t *testing.T) {
	opt := DefaultOptions()
	opt.Method = Handbook
	rep, err := Analyze(read(t, campaignCSV(3, 8, 6, 500, 30, 10, "RT")), opt, "2026-12-02")
	if err != nil {
		t.Fatal(err)
	}
	r := rep.Results[0]
	if r.Method != ANOVA {
		t.Errorf("clear lot effect: method %s, want anova; steps %+v", r.Method, r.Steps)
	}
	rep, err = Analyze(read(t, campaignCSV(4, 8, 6, 500, 0, 10, "RT")), opt, "2026-12-02")
	if err != nil {
		t.Fatal(err)
	}
	r = rep.Results[0]
	if r.Method == ANOVA || !r.pooled {
		t.Errorf("no lot effect: method %s, want a pooled method; steps %+v", r.Method, r.Steps)
	}
	if s := stepNamed(r, "lot comparison"); s == nil || !strings.Contains(s.Decision, "pooled") || !(float64(s.Statistic) < float64(s.Threshold)) {
		t.Errorf("lot comparison step %+v", s)
	}
	// A pooled normal B-basis is mean - k sd over all 48 values with the
	// exact factor (stats.NormalK, itself checked against published tables
	// and scipy in package stats).
	if r.Method == Normal {
		k := (float64(r.Mean) - float64(r.BBasis)) / float64(r.SD)
		want, _ := stats.NormalK(48, 0.90, 0.95)
		if math.Abs(k-want) > 1e-9*want {
			t.Errorf("normal B factor %.10f, want %.10f", k, want)
		}
	}
}

// Outliers are flagged and kept; an exclusion needs a reason and is recorded.
func TestOutlierFlaggedKeptAndExclusionRecorded(t *testing.T) {
	csv := campaignCSV(5, 5, 6, 400, 0, 5, "RT")
	lines := strings.Split(strings.TrimSpace(csv), "\n")
	for i, l := range lines {
		if strings.HasPrefix(l, "SRT-2-3,") {
			lines[i] = "SRT-2-3,L2,RT,350.0"
		}
	}
	d := read(t, strings.Join(lines, "\n")+"\n")
	rep, err := Analyze(d, DefaultOptions(), "2026-12-02")
	if err != nil {
		t.Fatal(err)
	}
	r := rep.Results[0]
	found := false
	for _, o := range r.Outliers {
		found = found || o.Specimen == "SRT-2-3"
	}
	if !found || r.N != 30 {
		t.Fatalf("outlier not flagged or not kept: n %d, outliers %+v", r.N, r.Outliers)
	}
	opt := DefaultOptions()
	opt.Exclude = map[string]string{"SRT-2-3": "machining mark at the fracture origin"}
	rep, err = Analyze(d, opt, "2026-12-02")
	if err != nil {
		t.Fatal(err)
	}
	r = rep.Results[0]
	if r.N != 29 || len(r.Excluded) != 1 || r.Excluded[0].Reason != "machining mark at the fracture origin" || float64(r.Excluded[0].Value) != 350 {
		t.Errorf("exclusion not recorded: n %d, %+v", r.N, r.Excluded)
	}
	opt.Exclude = map[string]string{"NOPE": "x"}
	if _, err := Analyze(d, opt, "2026-12-02"); err == nil || !strings.Contains(err.Error(), "NOPE") {
		t.Errorf("unknown excluded specimen: %v", err)
	}
	opt.Exclude = map[string]string{"SRT-2-3": " "}
	if _, err := Analyze(d, opt, "2026-12-02"); err == nil {
		t.Error("exclusion without a reason accepted")
	}
}

// A forced method is used and the automatic choice is still shown.
func TestForcedMethodShowsAutomaticChoice(t *testing.T) {
	d := read(t, campaignCSV(6, 6, 5, 300, 0, 6, "RT"))
	opt := DefaultOptions()
	opt.Method = Normal
	rep, err := Analyze(d, opt, "2026-12-02")
	if err != nil {
		t.Fatal(err)
	}
	r := rep.Results[0]
	if r.Method != Normal || r.AutoMethod == "" {
		t.Fatalf("method %s auto %s", r.Method, r.AutoMethod)
	}
	if r.AutoMethod != Normal && stepNamed(r, "method") == nil {
		t.Errorf("forced method without a step: %+v", r.Steps)
	}
}

// Pooling across two conditions with equal CVs: the pooled values sit
// beside the unpooled ones and use N - m degrees of freedom.
func TestPoolingAcrossConditions(t *testing.T) {
	a := campaignCSV(8, 6, 5, 500, 0, 10, "RT")
	b := campaignCSV(9, 6, 5, 440, 0, 8.8, "HOT")
	d := read(t, a+strings.SplitN(b, "\n", 2)[1])
	rep, err := Analyze(d, DefaultOptions(), "2026-12-02")
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Results) != 2 {
		t.Fatalf("%d results", len(rep.Results))
	}
	for _, r := range rep.Results {
		if r.Pooled == nil {
			t.Fatalf("%s: not pooled; steps %+v", r.Condition, r.Steps)
		}
		if r.Pooled.DF != 58 || r.Pooled.N != 60 {
			t.Errorf("pooled df %d n %d, want 58 and 60", r.Pooled.DF, r.Pooled.N)
		}
		// More degrees of freedom: the pooled B factor lies between the
		// single-condition normal factor k(30, 0.90, 0.95) and z_0.90.
		k30, _ := stats.NormalK(30, 0.90, 0.95)
		if !(float64(r.Pooled.BFactor) < k30 && float64(r.Pooled.BFactor) > 1.2815515655446004) {
			t.Errorf("pooled B factor %g", float64(r.Pooled.BFactor))
		}
	}
}

// Bad input: a clear message (exit status 2 in the command) or a result
// with an explicit warning where a bound is still defined.
func TestBadCampaigns(t *testing.T) {
	opt := DefaultOptions()
	one := read(t, "specimen,lot,strength [MPa]\nA,L1,100\nB,L2,110\n")
	one.Truncate(1)
	if _, err := Analyze(one, opt, "d"); err == nil || !strings.Contains(err.Error(), "a tolerance bound needs at least 2") {
		t.Errorf("one value: %v", err)
	}
	equal := read(t, "specimen,lot,strength [MPa]\nA,L1,100\nB,L1,100\nC,L2,100\n")
	if _, err := Analyze(equal, opt, "d"); err == nil || !strings.Contains(err.Error(), "all 3 values are equal") {
		t.Errorf("equal values: %v", err)
	}
	o2 := opt
	o2.Properties = []string{"modulus"}
	if _, err := Analyze(equal, o2, "d"); err == nil || !strings.Contains(err.Error(), `property "modulus" is not in the file`) {
		t.Errorf("missing property: %v", err)
	}
	var ie *lots.InputError
	_, err := Analyze(equal, o2, "d")
	if !errors.As(err, &ie) {
		t.Errorf("missing property is not an input error: %T", err)
	}
	single := read(t, campaignCSV(10, 1, 12, 200, 0, 5, "RT"))
	rep, err := Analyze(single, opt, "d")
	if err != nil {
		t.Fatal(err)
	}
	if w := strings.Join(rep.Results[0].Warnings, "|"); !strings.Contains(w, "all values come from one lot") {
		t.Errorf("single lot without warning: %s", w)
	}
	neg := read(t, "specimen,lot,strain [1]\nA,L1,-1\nB,L1,0.5\nC,L2,0.7\nD,L2,-0.2\nE,L3,0.1\n")
	o3 := opt
	o3.Method = Weibull
	if _, err := Analyze(neg, o3, "d"); err == nil {
		t.Error("Weibull on non-positive values accepted")
	}
}

// The same input and seed give byte-identical JSON.
func TestDeterministic(t *testing.T) {
	d := read(t, campaignCSV(11, 6, 5, 300, 3, 6, "RT"))
	opt := DefaultOptions()
	opt.Method = WeibullExact
	var outs [2]string
	for i := range outs {
		rep, err := Analyze(d, opt, "2026-12-02")
		if err != nil {
			t.Fatal(err)
		}
		var b bytes.Buffer
		fmt.Fprintf(&b, "%+v", rep.Results)
		outs[i] = b.String()
	}
	if outs[0] != outs[1] {
		t.Error("two runs with one seed differ")
	}
}

// A condition that cannot be analysed is reported as such with its reason,
// and the others are still analysed; with nothing analysable the first
// reason is the error.
func TestNotAnalysedConditionDoesNotStopTheRest(t *testing.T) {
	csv := campaignCSV(12, 5, 4, 500, 0, 8, "RT") + "H1,L0,HOT,420\n"
	rep, err := Analyze(read(t, csv), DefaultOptions(), "2026-12-02")
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Results) != 2 || rep.Results[0].Method == NotAnalysed || rep.Results[1].Method != NotAnalysed {
		t.Fatalf("results %+v", rep.Results)
	}
	if w := rep.Results[1].Warnings; len(w) != 1 || !strings.Contains(w[0], "a tolerance bound needs at least 2") {
		t.Errorf("warning %q", w)
	}
	if rep.Results[0].Pooled != nil {
		t.Error("pooled with a condition that was not analysed")
	}
}
