// Package acceptance judges incoming lots against purchase specifications
// (package spec): per lot and property the mean, SD, extreme individual,
// a confidence bound on the mean, the one-sided normal tolerance bound at
// the specification's content and confidence, the estimated fraction
// beyond the limit with confidence bounds, a verdict with its reasons, and
// the maximum-normed-residual screen of the lot's values.
//
// Judge is the domain call used by the accept command, the history store
// and the demo report.
//
// Main call:
//
//	res, err := acceptance.Judge(d, specs, lots.ByLot)
//	res = res.Display(units.SI) // values in display units
//	for _, l := range res.Lots {
//		fmt.Println(l.Lot, l.Verdict, l.Reasons)
//	}
package acceptance
