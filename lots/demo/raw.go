package demo

import (
	"fmt"
	"math/rand/v2"
	"strings"

	"lotproof/lots/reduce"
)

// Raw tensile records of the scenario (invented): two lots of Lumen Flats
// Aluminium plate received in 2026-11 that are not yet in receipts.csv,
// five round specimens each (8 mm diameter, 40 mm gauge length), as files
// raw/<specimen>.rec. Reduce them with reduce.ReduceFS(FS(), "raw",
// reduce.Options{}).
var rawLots = []struct{ lot, heat string }{
	{"LF-2604-2", "LF-H26407"},
	{"LF-2604-3", "LF-H26408"},
}

// RawSpecs returns the specifications the raw records are synthesized
// from (for checking a reduction against them).
func RawSpecs(seed uint64) []reduce.SynthSpec {
	rng := rand.New(rand.NewPCG(seed, 0x7261772d72656373))
	var out []reduce.SynthSpec
	for li, l := range rawLots {
		for s := 1; s <= 5; s++ {
			sp := reduce.SynthSpec{
				ID: fmt.Sprintf("%s-%d", l.lot, s), Lot: l.lot, Heat: l.heat,
				Supplier: "Lumen Flats Aluminium", Material: plate,
				Tested:    fmt.Sprintf("2026-11-%02d", 4+7*li+s/3),
				Condition: "RT",
				Diameter:  8, Gauge: 40,
				E:               71000 + 600*rng.NormFloat64(),
				Rp:              278 + 4*rng.NormFloat64(),
				Rm:              318 + 4*rng.NormFloat64(),
				Uniform:         0.08 + 0.004*rng.NormFloat64(),
				Elongation:      0.125 + 0.009*rng.NormFloat64(),
				ReductionOfArea: 0.35 + 0.015*rng.NormFloat64(),
				Points:          1500,
				Noise:           0.4,
				Toe:             0.0002 + 0.0002*rng.Float64(),
				Seed:            seed + uint64(10*li+s),
			}
			if sp.Rm < sp.Rp+10 {
				sp.Rm = sp.Rp + 10
			}
			if sp.Elongation < sp.Uniform+0.01 {
				sp.Elongation = sp.Uniform + 0.01
			}
			out = append(out, sp)
		}
	}
	return out
}

// rawRecords makes the raw record files, keyed by their path in the data
// folder.
func rawRecords(seed uint64) map[string][]byte {
	m := map[string][]byte{}
	for _, sp := range RawSpecs(seed) {
		b, err := reduce.Synthesize(sp)
		if err != nil {
			panic(err) // the specifications above are always valid
		}
		m["raw/"+sp.ID+".rec"] = b
	}
	return m
}

// rawHardness makes the hardness results of the raw-record specimens
// (measured on the grip ends, as a separate test): specimen, lot and
// hardness [HBW], to be merged with the reduced tensile results.
func rawHardness(seed uint64) []byte {
	rng := rand.New(rand.NewPCG(seed, 0x68617264))
	var b strings.Builder
	b.WriteString("specimen,lot,hardness [HBW]\n")
	for _, sp := range RawSpecs(seed) {
		fmt.Fprintf(&b, "%s,%s,%.0f\n", sp.ID, sp.Lot, 96+2*rng.NormFloat64())
	}
	return []byte(b.String())
}
