package demo

import (
	"math"
	"testing"

	"lotproof/lots/reduce"
)

// TestRawRecordsReduceToTheirSpecs: reducing the embedded raw records
// gives back the properties they were synthesized from (analytic
// Ramberg-Osgood curves with 0.4 MPa noise), within: E 1 %, Rp 1 MPa, Rm
// 1.5 MPa (noise lifts the highest point), Ag 1 % strain, A and Z 0.1 %
// (from the final dimensions, written to 3 decimals).
func TestRawRecordsReduceToTheirSpecs(t *testing.T) {
	rs, err := reduce.ReduceFS(FS(), "raw", reduce.Options{})
	if err != nil {
		t.Fatal(err)
	}
	specs := RawSpecs(Seed)
	if len(rs) != len(specs) {
		t.Fatalf("%d results for %d records", len(rs), len(specs))
	}
	byID := map[string]reduce.SynthSpec{}
	for _, sp := range specs {
		byID[sp.ID] = sp
	}
	check := func(id, what string, got, want, tol float64) {
		if math.IsNaN(got) || math.Abs(got-want) > tol {
			t.Errorf("%s %s = %.5g, want %.5g +- %g", id, what, got, want, tol)
		}
	}
	for _, r := range rs {
		sp, ok := byID[r.ID]
		if !ok {
			t.Fatalf("unexpected specimen %q", r.ID)
		}
		if r.Lot != sp.Lot || r.Heat != sp.Heat || r.Supplier != "Lumen Flats Aluminium" || r.Material != plate {
			t.Errorf("%s identity %q %q %q %q", r.ID, r.Lot, r.Heat, r.Supplier, r.Material)
		}
		check(r.ID, "modulus", r.Modulus, sp.E, 0.01*sp.E)
		check(r.ID, "proof", r.Proof, sp.Rp, 1)
		check(r.ID, "tensile", r.Tensile, sp.Rm+0.5, 1.5)
		check(r.ID, "uniform", r.Uniform, sp.Uniform, 0.01)
		check(r.ID, "elongation", r.Elongation, sp.Elongation, 0.001)
		check(r.ID, "reduction of area", r.ReductionOfArea, sp.ReductionOfArea, 0.001)
		if len(r.Warnings) > 0 {
			t.Errorf("%s warnings %q", r.ID, r.Warnings)
		}
	}
}
