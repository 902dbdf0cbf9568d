package spec_test

import (
	"fmt"

	"lotproof/spec"
)

// Read a purchase specification (testdata/acceptance/spec-test.yaml, made
// up for the tests) and print its limits, in the units it was written in,
// and its acceptance rule.
func ExampleReadFile() {
	s, err := spec.ReadFile("../testdata/acceptance/spec-test.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(s.Label(), "for", s.Material)
	for _, l := range s.Limits {
		fmt.Printf("%s [%s]:", l.Property, l.Unit.Symbol)
		if l.HasMin() {
			fmt.Printf(" min %g", l.Unit.FromInternal(l.Min))
		}
		if l.HasMax() {
			fmt.Printf(" max %g", l.Unit.FromInternal(l.Max))
		}
		fmt.Println()
	}
	r := s.Acceptance
	fmt.Printf("content %.2f at confidence %.2f, at least %d specimens\n", r.Content, r.Confidence, r.MinSpecimens)
	// Output:
	// TEST-1 rev A for Alloy T
	// tensile [MPa]: min 930
	// hardness [HBW]: min 269 max 331
	// content 0.90 at confidence 0.95, at least 5 specimens
}
