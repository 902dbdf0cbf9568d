// Package stats holds the numerical methods behind lotproof: descriptive
// statistics, distribution fits, goodness-of-fit and lot-difference tests,
// outlier screening, one-sided tolerance bounds, sampling-plan operating
// characteristics and control-chart limits.
//
// Everything here is a pure function over []float64 and small option
// structs: no I/O, no globals, no domain words. Functions return an error
// for data they cannot handle (too few values, zero variance, non-finite
// values) and panic only on programmer mistakes such as mismatched slice
// lengths. Each exported function states its formula and the published
// source it follows in its doc comment.
//
// Typical calls:
//
//	k, err := stats.NormalK(10, 0.90, 0.95)       // 2.355 (Natrella, Table A-7)
//	b, err := stats.NormalLowerBound(x, 0.90, 0.95) // b.Value = mean - k sd
package stats
