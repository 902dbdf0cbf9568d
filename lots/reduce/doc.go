// Package reduce turns raw tensile test records (force against extension
// or strain, in lotproof's own record format described in FORMAT.md) into
// the specimen properties the rest of lotproof reads: modulus, proof
// strength, upper and lower yield strength, tensile strength, uniform
// elongation, elongation after fracture, reduction of area, toughness and
// modulus of resilience, each with an audit of how it was found.
//
// Internally stresses are in MPa, strains are fractions and energies per
// volume are in MJ/m^3 (1 MPa = 1 MJ/m^3).
//
// Main call:
//
//	recs, err := reduce.Parse(f, "R1.rec")
//	res, err := reduce.ReduceAll(recs, reduce.Options{})
//	fmt.Println(res[0].Modulus, res[0].Proof, res[0].Tensile)
//	csv := reduce.ResultsCSV(res, units.SI) // the results file lots reads
package reduce
