package stats

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// LowerCapability is the one-sided process performance of a sample against
// a lower limit.
type LowerCapability struct {
	N     int
	Mean  float64
	SD    float64 // sample SD, divisor n-1
	Index float64 // (mean - lower)/(3·SD)
	// Bound is the lower confidence bound on the index at the requested
	// confidence (Bissell's approximation, see PerformanceLower).
	Bound float64
	// FractionBelow is the normal-model estimate of the fraction below the
	// lower limit, Φ((lower - mean)/SD) = Φ(-3·Index).
	FractionBelow float64
}

// PerformanceLower computes the lower one-sided index of a sample x
// against the lower limit lower,
//
//	index = (x̄ - lower) / (3·s)
//
// (Ppk when s is the overall SD of all values, as here, and only a lower
// limit exists; Montgomery, Introduction to Statistical Quality Control,
// 7th ed., §8.3.1 and §8.3.6), its approximate lower 100·conf % confidence
// bound by Bissell (1990, "How reliable is your capability index?",
// Applied Statistics 39, 331-340, eq. for Ĉpk):
//
//	bound = index - z_conf · sqrt( 1/(9n) + index²/(2(n-1)) )
//
// and the normal-model fraction below the limit Φ(-3·index).
//
// Bissell derived the variance 1/(9n) + C²/(2(n-1)) for Ĉpk = min(Ĉpu,
// Ĉpl) away from the middle of the tolerance; it is the delta-method
// variance of each one-sided index, so it applies unchanged to the lower
// index alone. The bound assumes the n values are independent draws from
// one normal distribution: values clustered in lots with lot-to-lot
// variation carry less information than n independent values, and the
// bound is then optimistic.
func PerformanceLower(x []float64, lower, conf float64) (LowerCapability, error) {
	n := len(x)
	if n < 2 {
		return LowerCapability{}, fmt.Errorf("a capability index needs at least 2 values, got %d: %w", n, ErrTooFew)
	}
	if err := checkFinite(x); err != nil {
		return LowerCapability{}, err
	}
	if math.IsNaN(lower) || math.IsInf(lower, 0) {
		return LowerCapability{}, fmt.Errorf("lower limit %v is not a finite number: %w", lower, errCtlDomain)
	}
	if !(conf > 0 && conf < 1) {
		return LowerCapability{}, fmt.Errorf("confidence %v not in (0, 1): %w", conf, errCtlDomain)
	}
	mean, sd := meanSD(x)
	if sd == 0 {
		return LowerCapability{N: n, Mean: mean, SD: 0, Index: math.NaN(), Bound: math.NaN(), FractionBelow: math.NaN()},
			fmt.Errorf("all %d values are equal: %w", n, ErrZeroSpread)
	}
	idx := (mean - lower) / (3 * sd)
	z := distuv.UnitNormal.Quantile(conf)
	bound := idx - z*math.Sqrt(1/(9*float64(n))+idx*idx/(2*float64(n-1)))
	return LowerCapability{N: n, Mean: mean, SD: sd, Index: idx, Bound: bound, FractionBelow: distuv.UnitNormal.CDF(-3 * idx)}, nil
}

// BissellLowerBound is Bissell's (1990) approximate lower confidence bound
// on a capability index estimated as c from n values:
//
//	c - z_conf · sqrt( 1/(9n) + c²/(2(n-1)) )
func BissellLowerBound(c float64, n int, conf float64) (float64, error) {
	if n < 2 {
		return math.NaN(), fmt.Errorf("n = %d: %w", n, ErrTooFew)
	}
	if math.IsNaN(c) || math.IsInf(c, 0) || !(conf > 0 && conf < 1) {
		return math.NaN(), fmt.Errorf("index %v or confidence %v invalid: %w", c, conf, errCtlDomain)
	}
	z := distuv.UnitNormal.Quantile(conf)
	return c - z*math.Sqrt(1/(9*float64(n))+c*c/(2*float64(n-1))), nil
}
