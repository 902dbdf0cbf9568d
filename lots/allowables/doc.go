// Package allowables derives statistically based design values (A- and
// B-basis one-sided lower tolerance bounds) from a multi-lot test
// campaign, per property and test condition, by a documented automatic
// procedure, and records every step of it.
//
// The procedure follows the structure of the composite-materials handbook
// procedure (CMH-17-1G Vol. 1, chapter 8, sections 8.3.1 to 8.3.7): screen
// for outliers, compare lots with the k-sample Anderson-Darling test, then
// either pool the lots and choose a distribution by Anderson-Darling OSL,
// or use the ANOVA (variance-components) method when the lots differ. The
// thresholds and their sources are listed in DefaultOptions.
//
// Main calls:
//
//	rep, err := allowables.Analyze(d, allowables.DefaultOptions(), date)
//	for _, r := range rep.Results {
//		fmt.Println(r.Property, r.Condition, r.Method, r.ABasis, r.BBasis)
//	}
//
// or, for values already split into lots (one slice per lot), without the
// audit trail: out, err := allowables.DesignValues(values, opt).
package allowables
