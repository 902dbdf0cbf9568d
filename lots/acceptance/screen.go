package acceptance

import (
	"math"

	"lotproof/stats"
)

// clearlyNoOutlier reports whether the largest normed residual
// max|x_i - mean|/SD of vals is below the critical value by a clear margin
// (a relative 1e-9, far beyond rounding), so that stats.ScreenOutliers
// would flag nothing. When it is not clear (near the critical value, zero
// spread, a failure) the caller runs the screen itself, which decides.
//
// The critical value comes from f (it depends on n only).
func clearlyNoOutlier(f *stats.Factors, vals []float64) bool {
	n := len(vals)
	c, err := f.MNRCritical(n, OutlierAlpha)
	if err != nil {
		return false
	}
	mean := 0.0
	for _, v := range vals {
		mean += v
	}
	mean /= float64(n)
	ss, dev := 0.0, 0.0
	for _, v := range vals {
		d := v - mean
		ss += d * d
		dev = math.Max(dev, math.Abs(d))
	}
	sd := math.Sqrt(ss / float64(n-1))
	if !(sd > 0) || math.IsInf(sd, 0) {
		return false
	}
	return dev/sd < c*(1-1e-9)
}
