package reduce_test

import (
	"fmt"

	"lotproof/lots/reduce"
)

// Reduce a raw tensile record to specimen properties. There is no raw
// record among the reference files, so the record is an analytic curve:
// Synthesize writes, in lotproof's record format, a Ramberg-Osgood curve
// strain = stress/E + 0.002 (stress/Rp)^m (Ramberg and Osgood, NACA TN 902,
// 1943), whose 0.2 % proof strength is Rp by construction. The reduction
// gives back the modulus, proof and tensile strength, elongation after
// fracture and reduction of area the curve was made from (71 GPa, 278 MPa,
// 318 MPa, 12.5 %, 35 %).
func ExampleReduce() {
	rec, err := reduce.Synthesize(reduce.SynthSpec{ID: "R1", Lot: "L1", Diameter: 8, Gauge: 40,
		E: 71000, Rp: 278, Rm: 318, Uniform: 0.08, Elongation: 0.125, ReductionOfArea: 0.35,
		Points: 3000, Seed: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	recs, err := reduce.ParseBytes(rec, "R1.rec")
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := reduce.Reduce(recs[0], reduce.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("specimen %s: modulus %.1f GPa\n", r.ID, r.Modulus/1000)
	fmt.Printf("proof strength %.0f MPa, tensile strength %.0f MPa\n", r.Proof, r.Tensile)
	fmt.Printf("elongation after fracture %.1f %%, reduction of area %.0f %%\n", 100*r.Elongation, 100*r.ReductionOfArea)
	// Output:
	// specimen R1: modulus 71.0 GPa
	// proof strength 278 MPa, tensile strength 318 MPa
	// elongation after fracture 12.5 %, reduction of area 35 %
}
