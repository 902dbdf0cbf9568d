package lots_test

import (
	"fmt"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/allowables"
	"lotproof/lots/units"
	"lotproof/spec"
)

// Read a results file, group it by lot and print each lot's size and mean
// tensile strength. The file is a test input made up for the tests
// (testdata/acceptance/lots.csv).
func ExampleDataset_Group() {
	d, err := lots.ReadFile("../testdata/acceptance/lots.csv", lots.ReadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	groups, err := d.Group(lots.ByLot, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, g := range lots.Summarize(d, groups, units.SI) {
		p := g.Properties[0]
		fmt.Printf("lot %s: n = %d, %s mean %.1f %s\n", g.Key, g.Specimens, p.Property, float64(p.Mean), p.Unit)
	}
	// Output:
	// lot A: n = 6, tensile mean 1012.5 MPa
	// lot B: n = 5, tensile mean 958.6 MPa
	// lot C: n = 5, tensile mean 980.0 MPa
	// lot D: n = 1, tensile mean 1000.0 MPa
	// lot E: n = 3, tensile mean 1000.0 MPa
	// lot F: n = 2, tensile mean 1005.0 MPa
}

// The whole job: read the results, judge every lot against the purchase
// specification, then derive design values from the specimens of that
// material as if they were a qualification campaign (the package
// documentation shows the same steps). The files are test inputs made up
// for the tests.
func Example() {
	d, err := lots.ReadFile("../testdata/acceptance/lots.csv", lots.ReadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	s, err := spec.ReadFile("../testdata/acceptance/spec-test.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	judged, err := acceptance.Judge(d, []*spec.Spec{s}, lots.ByLot)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, l := range judged.Lots {
		fmt.Printf("lot %s: %s\n", l.Lot, l.Verdict)
	}
	opt := allowables.DefaultOptions()
	opt.Properties = []string{"tensile"}
	opt.Exclude = map[string]string{}
	for _, sp := range d.All() {
		if sp.Material != s.Material {
			opt.Exclude[sp.ID] = "not " + s.Material
		}
	}
	rep, err := allowables.Analyze(d, opt, "2026-01-01")
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, r := range rep.Results {
		fmt.Printf("%s at %s: %s (handbook choice %s), A-basis %.1f, B-basis %.1f %s\n", r.Property, r.Condition, r.Method, r.AutoMethod, float64(r.ABasis), float64(r.BBasis), r.Unit)
	}
	// Output:
	// lot A: conforming
	// lot B: undecided
	// lot C: nonconforming
	// lot D: undecided
	// lot E: undecided
	// lot F: not judged
	// tensile at RT: lot-aware (handbook choice anova), A-basis 846.6, B-basis 904.6 MPa
}
