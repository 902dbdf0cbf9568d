// Package sampling designs acceptance sampling plans for a lot from an
// acceptable and a rejectable quality level and the two risks: the
// variables plan with sigma unknown (exact, noncentral t), the Wallis
// (1947) approximation, the attributes (binomial) plan, and their
// operating characteristic curves.
package sampling

import (
	"fmt"
	"math"
	"sort"
	"strconv"

	"lotproof/lots"
	"lotproof/stats"
)

// Result holds the plans for one AQL and RQL and their OC curves.
type Result struct {
	AQL          float64    `json:"aql"`
	RQL          float64    `json:"rql"`
	ProducerRisk float64    `json:"producer_risk"`
	ConsumerRisk float64    `json:"consumer_risk"`
	Variables    Variables  `json:"variables"`
	Wallis       Wallis     `json:"wallis"`
	Attributes   Attributes `json:"attributes"`
	OC           []OCPoint  `json:"oc"`
	Method       string     `json:"method"`
	Cautions     []string   `json:"cautions"`
}

// Variables is the variables plan, sigma unknown (exact).
type Variables struct {
	N            int     `json:"n"`
	K            float64 `json:"k"`
	KMin         float64 `json:"k_min"`
	KMax         float64 `json:"k_max"`
	ProducerRisk float64 `json:"producer_risk"`
	ConsumerRisk float64 `json:"consumer_risk"`
}

// Wallis is the Wallis (1947) approximation of the variables plan.
type Wallis struct {
	N float64 `json:"n"`
	K float64 `json:"k"`
}

// Attributes is the attributes (binomial) plan.
type Attributes struct {
	N            int     `json:"n"`
	C            int     `json:"c"`
	ProducerRisk float64 `json:"producer_risk"`
	ConsumerRisk float64 `json:"consumer_risk"`
}

// OCPoint is the probability of acceptance at one fraction nonconforming.
type OCPoint struct {
	P            float64    `json:"p"`
	PaVariables  lots.Float `json:"pa_variables"`
	PaAttributes lots.Float `json:"pa_attributes"`
}

// Caution is the statement every plan carries.
const Caution = "A sampling plan and its OC curve support, and never replace, the governing specification, contract terms and the inspector's judgement; the variables plan assumes a normal distribution of the property in the lot."

// Design finds the plans meeting the producer's risk at the AQL p1 and
// the consumer's risk at the RQL p2, and their OC curves.
func Design(p1, p2, producer, consumer float64) (Result, error) {
	for _, r := range []struct {
		name string
		v    float64
	}{{"producer-risk", producer}, {"consumer-risk", consumer}} {
		if !(r.v > 0 && r.v < 0.5) {
			return Result{}, fmt.Errorf("--%s %g: expected a probability between 0 and 0.5", r.name, r.v)
		}
	}
	if !(p1 < p2) {
		return Result{}, fmt.Errorf("--aql %g must be below --rql %g", p1, p2)
	}
	v, err := stats.DesignVariablesPlan(p1, p2, producer, consumer)
	if err != nil {
		return Result{}, lots.Inputf("plan", "choose AQL and RQL further apart", "%v", err)
	}
	wn, wk, err := stats.WallisPlan(p1, p2, producer, consumer)
	if err != nil {
		return Result{}, err
	}
	a, err := stats.DesignAttributesPlan(p1, p2, producer, consumer)
	if err != nil {
		return Result{}, lots.Inputf("plan", "choose AQL and RQL further apart", "%v", err)
	}
	res := Result{AQL: p1, RQL: p2, ProducerRisk: producer, ConsumerRisk: consumer,
		Variables:  Variables{N: v.N, K: v.K, KMin: v.KMin, KMax: v.KMax, ProducerRisk: v.ProducerRisk, ConsumerRisk: v.ConsumerRisk},
		Wallis:     Wallis{N: wn, K: wk},
		Attributes: Attributes{N: a.N, C: a.C, ProducerRisk: a.ProducerRisk, ConsumerRisk: a.ConsumerRisk},
		Method:     "variables plan, sigma unknown: Pa(p) = P(T >= k sqrt(n)), T noncentral t with n-1 df and noncentrality sqrt(n) z_(1-p), exact; smallest n meeting both risks, k holding the producer's risk; Wallis (1947) approximation for comparison; attributes plan: binomial, smallest c then smallest n",
		Cautions:   []string{Caution},
	}
	for _, p := range ocGrid(p1, p2) {
		pv, err := stats.VariablesAcceptProb(v.N, v.K, p)
		if err != nil {
			return Result{}, err
		}
		pa, err := stats.AttributesAcceptProb(a.N, a.C, p)
		if err != nil {
			return Result{}, err
		}
		res.OC = append(res.OC, OCPoint{P: p, PaVariables: lots.Float(pv), PaAttributes: lots.Float(pa)})
	}
	return res, nil
}

// ocGrid returns fractions nonconforming for the OC table: a logarithmic
// grid from p1/10 to min(0.5, 4 p2) plus p1 and p2, sorted, rounded to 3
// significant digits.
func ocGrid(p1, p2 float64) []float64 {
	lo, hi := p1/10, math.Min(0.5, 4*p2)
	const m = 14
	set := map[float64]bool{p1: true, p2: true}
	for i := 0; i <= m; i++ {
		p := lo * math.Pow(hi/lo, float64(i)/m)
		r, _ := strconv.ParseFloat(strconv.FormatFloat(p, 'g', 3, 64), 64)
		set[r] = true
	}
	out := make([]float64, 0, len(set))
	for p := range set {
		out = append(out, p)
	}
	sort.Float64s(out)
	return out
}
