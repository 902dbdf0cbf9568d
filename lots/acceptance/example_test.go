package acceptance_test

import (
	"fmt"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/units"
	"lotproof/spec"
)

// Judge the lots of a results file against a purchase specification and
// print each lot's verdict and, for tensile strength, the tolerance factor
// and bound. Both files are test inputs made up for the tests
// (testdata/acceptance); the k factors and bounds agree with scipy's in
// lots_ref.json (A: 989.31, B: 903.64).
func ExampleJudge() {
	d, err := lots.ReadFile("../../testdata/acceptance/lots.csv", lots.ReadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	s, err := spec.ReadFile("../../testdata/acceptance/spec-test.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := acceptance.Judge(d, []*spec.Spec{s}, lots.ByLot)
	if err != nil {
		fmt.Println(err)
		return
	}
	res = res.Display(units.SI)
	for _, l := range res.Lots {
		fmt.Printf("lot %s (n=%d): %s", l.Lot, l.N, l.Verdict)
		for _, p := range l.Properties {
			if p.Property == "tensile" && p.N > 1 && p.SD > 0 {
				fmt.Printf("; tensile k %.3f, bound %.1f %s", float64(p.K), float64(p.ToleranceBound), p.Unit)
			}
		}
		fmt.Println()
	}
	// Output:
	// lot A (n=6): conforming; tensile k 3.006, bound 989.3 MPa
	// lot B (n=5): undecided; tensile k 3.407, bound 903.6 MPa
	// lot C (n=5): nonconforming; tensile k 3.407, bound 873.4 MPa
	// lot D (n=1): undecided
	// lot E (n=3): undecided
	// lot F (n=2): not judged
}
