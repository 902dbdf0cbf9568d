// Package lots is the domain of lotproof: specimens, properties with
// units, lots and heats, test conditions and suppliers. It reads specimen
// results files (CSV or xlsx), validates them and groups specimens by lot
// or heat. Analyses that serve the domain (reduction of raw records,
// acceptance, design values, history and trend, rendering, the demo
// scenario) live in sub-packages and share the result types defined here:
// plain structs that carry their own warnings and audit steps.
//
// The whole job in Go (see Example): read a results file, judge every lot
// against a purchase specification, derive design values.
//
//	d, err := lots.ReadFile("results.csv", lots.ReadOptions{})
//	if err != nil { ... }
//	s, err := spec.ReadFile("spec.yaml")
//	if err != nil { ... }
//	groups, err := d.Group(lots.ByLot, nil) // lots in file order
//	summaries := lots.Summarize(d, groups, units.SI)
//	judged, err := acceptance.Judge(d, []*spec.Spec{s}, lots.ByLot)
//	for _, l := range judged.Lots {
//		fmt.Println(l.Lot, l.Verdict, l.Reasons)
//	}
//	rep, err := allowables.Analyze(d, allowables.DefaultOptions(), "2026-01-01")
//	for _, r := range rep.Results {
//		fmt.Println(r.Property, r.Condition, r.Method, r.ABasis, r.BBasis)
//	}
package lots
