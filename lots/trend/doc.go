// Package trend follows supplier (or material) quality over time from the
// recorded lot history: per group, property and period (quarter or month)
// the lot and specimen counts, mean, SD, Ppk against the specification
// minimum with a lower confidence bound, the estimated fraction below the
// minimum and the lots rejected; and, per group and property, control
// charts of the lot means (individuals chart with moving-range limits) and
// of the lot SDs (S chart), the Western Electric run rules, an EWMA of the
// lot means and a test for a shift between consecutive periods. Every
// signal names the rule, the period and the lot where it fired.
//
// Why lot means as individuals: lots differ from each other (between-lot
// variation), so X-bar limits from within-lot sigma would flag almost every
// lot. Plotting each lot mean as one observation with limits from the
// moving range of consecutive lot means (Montgomery, Introduction to
// Statistical Quality Control, 7th ed., §6.4; ASTM MNL 7A, Part 3) puts
// the between-lot variation inside the limits.
//
// Main calls: Compute(ctx, st, opt) on an open history store;
// ComputeFrom on lot values already fetched; RecordAndCompute to record a
// dataset into a throw-away SQLite file and trend it in one call:
//
//	_, res, err := trend.RecordAndCompute(ctx, "history.db", d, nil, limits, meta, trend.Options{})
//	for _, s := range res.Signals {
//		fmt.Println(s.Rule, s.Group, s.Period, s.Lot)
//	}
package trend
