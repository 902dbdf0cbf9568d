package stats

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// Summary holds descriptive statistics of a sample.
type Summary struct {
	N      int
	Mean   float64
	SD     float64 // sample standard deviation, divisor n-1
	CV     float64 // SD / Mean; NaN when Mean == 0 (see Warnings)
	Min    float64
	Max    float64
	Median float64
	// Warnings lists conditions the caller should know about (zero mean,
	// zero spread); the numbers above are still valid where not NaN.
	Warnings []string
}

// ErrTooFew is wrapped by errors for samples with too few values.
var ErrTooFew = errors.New("too few values")

// ErrNonFinite is wrapped by errors for samples holding NaN or ±Inf.
var ErrNonFinite = errors.New("non-finite value")

// ErrZeroSpread is wrapped by errors for samples whose values are all equal
// (or otherwise lack the spread a method needs).
var ErrZeroSpread = errors.New("no spread in the data")

// checkFinite returns an error naming the first non-finite value in x.
func checkFinite(x []float64) error {
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("value %d is %v: %w", i, v, ErrNonFinite)
		}
	}
	return nil
}

// meanVar returns the mean and the sample variance (divisor n-1) of x by the
// corrected two-pass algorithm of Chan, Golub and LeVeque ("Algorithms for
// computing the sample variance: analysis and recommendations", The American
// Statistician 37(3), 1983, eq. 1.7):
//
//	m  = (1/n) Σ x_i,  d_i = x_i - m
//	m' = m + (1/n) Σ d_i
//	s² = (Σ d_i² - (Σ d_i)²/n) / (n-1)
//
// The second term corrects the rounding error left in the first-pass mean.
// For n < 2 the variance is NaN.
func meanVar(x []float64) (mean, variance float64) {
	return meanVarRaw(x)
}

// meanSD returns the mean and sample SD of x (corrected two-pass, as in
// meanVar). If the sums overflow, the data are scaled by their largest
// magnitude and the results scaled back; the SD is +Inf only when it is
// not representable.
func meanSD(x []float64) (mean, sd float64) {
	m, v := meanVarRaw(x)
	if len(x) == 0 || (!math.IsNaN(m) && !math.IsInf(m, 0) && !math.IsInf(v, 0)) {
		return m, math.Sqrt(v)
	}
	var amax float64
	for _, v := range x {
		amax = math.Max(amax, math.Abs(v))
	}
	if amax == 0 || math.IsInf(amax, 0) || math.IsNaN(amax) {
		return m, math.Sqrt(v)
	}
	y := make([]float64, len(x))
	for i, v := range x {
		y[i] = v / amax
	}
	m, v = meanVarRaw(y)
	return m * amax, math.Sqrt(v) * amax
}

func meanVarRaw(x []float64) (mean, variance float64) {
	n := float64(len(x))
	var s float64
	for _, v := range x {
		s += v
	}
	m := s / n
	var sd, sd2 float64
	for _, v := range x {
		d := v - m
		sd += d
		sd2 += d * d
	}
	mean = m + sd/n
	if len(x) < 2 {
		return mean, math.NaN()
	}
	variance = (sd2 - sd*sd/n) / (n - 1)
	if variance < 0 {
		variance = 0
	}
	return mean, variance
}

// sortedCopy returns x sorted ascending, leaving x untouched.
func sortedCopy(x []float64) []float64 {
	s := append([]float64(nil), x...)
	sort.Float64s(s)
	return s
}

// medianSorted returns the median of an ascending sample: the middle order
// statistic for odd n, the mean of the two middle ones for even n.
func medianSorted(s []float64) float64 {
	n := len(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return s[n/2-1] + (s[n/2]-s[n/2-1])/2
}

// Describe returns the size, mean, sample standard deviation (divisor n-1),
// coefficient of variation SD/mean, minimum, maximum and median of x.
//
// Mean and SD use the corrected two-pass algorithm (Chan, Golub & LeVeque
// 1983), which reproduces the NIST StRD univariate certified values
// (NumAcc1-4) to the precision the double-precision inputs allow. The median
// is the middle order statistic (mean of the two middle ones for even n).
//
// It needs at least 2 finite values. A zero mean gives CV = NaN and a
// warning; equal values give SD = 0 and a warning.
func Describe(x []float64) (Summary, error) {
	if len(x) < 2 {
		return Summary{}, fmt.Errorf("describe: %d values, need at least 2: %w", len(x), ErrTooFew)
	}
	if err := checkFinite(x); err != nil {
		return Summary{}, fmt.Errorf("describe: %w", err)
	}
	m, sd := meanSD(x)
	if math.IsInf(sd, 0) || math.IsInf(m, 0) || math.IsNaN(m) || math.IsNaN(sd) {
		return Summary{}, fmt.Errorf("describe: values too large, sums overflow: %w", ErrNonFinite)
	}
	s := sortedCopy(x)
	out := Summary{N: len(x), Mean: m, SD: sd, Min: s[0], Max: s[len(s)-1], Median: medianSorted(s)}
	if out.SD == 0 {
		out.Warnings = append(out.Warnings, "all values are equal: SD is 0")
	}
	if m == 0 {
		out.CV = math.NaN()
		out.Warnings = append(out.Warnings, "mean is 0: CV is undefined (NaN)")
	} else {
		out.CV = out.SD / m
	}
	return out, nil
}

// MeanSD returns the mean and the sample standard deviation (divisor n-1)
// of x, the same values, bit for bit, as Describe's Mean and SD (and the
// same errors) without the sorted copy Describe makes for the median, for
// callers that need only these two (lot acceptance, once per lot and
// limit).
func MeanSD(x []float64) (mean, sd float64, err error) {
	if len(x) < 2 {
		return 0, 0, fmt.Errorf("describe: %d values, need at least 2: %w", len(x), ErrTooFew)
	}
	if err := checkFinite(x); err != nil {
		return 0, 0, fmt.Errorf("describe: %w", err)
	}
	m, s := meanSD(x)
	if math.IsInf(s, 0) || math.IsInf(m, 0) || math.IsNaN(m) || math.IsNaN(s) {
		return 0, 0, fmt.Errorf("describe: values too large, sums overflow: %w", ErrNonFinite)
	}
	return m, s, nil
}

// OrderStatistics returns the order statistics x_(1) <= ... <= x_(n) of x as
// a new slice (x is not modified). It returns an error for an empty sample
// or non-finite values.
func OrderStatistics(x []float64) ([]float64, error) {
	if len(x) == 0 {
		return nil, fmt.Errorf("order statistics: no values: %w", ErrTooFew)
	}
	if err := checkFinite(x); err != nil {
		return nil, fmt.Errorf("order statistics: %w", err)
	}
	return sortedCopy(x), nil
}
