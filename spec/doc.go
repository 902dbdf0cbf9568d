// Package spec reads and validates purchase-specification files (YAML):
// the specification id and revision, the material, per-property minimums
// and maximums with their units, and the acceptance rule. It knows units
// and limits, not statistics. Errors are located as file:line:column.
//
// Main call:
//
//	s, err := spec.ReadFile("spec.yaml") // a *lots.InputError on bad input
//	l, ok := s.Limit("tensile")          // Min and Max in internal units
//	fmt.Println(s.Label(), l.Unit.FromInternal(l.Min), s.Acceptance.Content)
package spec
