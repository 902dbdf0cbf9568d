package reduce

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
)

// SynthSpec describes a synthetic round specimen for Synthesize.
type SynthSpec struct {
	ID, Lot, Heat, Supplier, Material, Tested, Condition string

	Diameter, Gauge float64 // original diameter and gauge length [mm]
	E, Rp, Rm       float64 // modulus, 0.2 % proof strength, tensile strength [MPa]
	// Uniform is the plastic strain at maximum force (Ag), Elongation the
	// plastic strain at fracture (A), ReductionOfArea the fraction Z.
	Uniform, Elongation, ReductionOfArea float64
	Points                               int     // data rows (at least 50)
	Noise                                float64 // SD of normal noise added to the stress [MPa]
	StrainNoise                          float64 // SD of normal noise added to the strain (extensometer noise)
	Toe                                  float64 // initial slack as a strain (0: none)
	// ConstantRate samples at a constant logging rate under the strain
	// rates of ISO 6892-1 method A instead of evenly in strain (see
	// Synthesize).
	ConstantRate bool
	Seed         uint64
}

// Synthesize makes a raw record in lotproof's format from an analytic
// curve with the given properties. Up to maximum force the curve is the
// Ramberg-Osgood form strain = stress/E + 0.002 (stress/Rp)^m (Ramberg and
// Osgood, NACA TN 902, 1943), whose 0.2 % offset proof strength is Rp by
// construction, with m = ln(Ag/0.002) / ln(Rm/Rp) so that the plastic
// strain at Rm is Ag. Beyond it the stress falls as
// Rm - k (ep - Ag)^2 to 0.8 Rm at the plastic strain A, where the specimen
// breaks and the force drops to near zero. A toe of slack s0 replaces the
// curve below stress E s0 by the parabola stress = E strain^2 / (4 s0),
// tangent to the shifted elastic line. A quarter of the points lie in the
// elastic and early plastic range, up to a strain 0.4 % past the elastic
// strain at Rp, evenly in strain, the rest evenly in strain beyond. With
// ConstantRate the points are instead evenly spaced in time, as a frame
// logs them, with the strain rates ISO 6892-1 method A recommends
// (clause 10.3, from memory): range 2, 0.00025 per second, up to that
// same strain (past the proof strength), and range 4, 0.0067 per second,
// after it. The final gauge length L0 (1 + A) and
// the final diameter d sqrt(1 - Z) are written in the metadata. The same
// spec and seed give the same bytes. Noise (stress) and StrainNoise are
// added as independent normal deviates.
func Synthesize(sp SynthSpec) ([]byte, error) {
	for _, v := range []float64{sp.Diameter, sp.Gauge, sp.E, sp.Rp, sp.Rm, sp.Uniform, sp.Elongation} {
		if !(v > 0) || math.IsInf(v, 0) {
			return nil, errors.New("synthesize: diameter, gauge length, E, Rp, Rm, uniform elongation and elongation must be positive and finite")
		}
	}
	switch {
	case sp.ID == "" || sp.Lot == "":
		return nil, errors.New("synthesize: a specimen id and a lot are needed")
	case !(sp.Rm > sp.Rp):
		return nil, errors.New("synthesize: Rm must exceed Rp")
	case !(sp.Uniform > 0.002):
		return nil, errors.New("synthesize: uniform elongation must exceed 0.2 %")
	case sp.Elongation < sp.Uniform:
		return nil, errors.New("synthesize: elongation must not be below uniform elongation")
	case !(sp.ReductionOfArea >= 0 && sp.ReductionOfArea < 1):
		return nil, errors.New("synthesize: reduction of area must be in [0, 1)")
	case sp.Points < 50 || sp.Points > 10_000_000:
		return nil, errors.New("synthesize: points must be between 50 and 10,000,000")
	case !(sp.Noise >= 0) || math.IsInf(sp.Noise, 0) || !(sp.StrainNoise >= 0) || sp.StrainNoise > 0.001 || !(sp.Toe >= 0) || sp.Toe*sp.E > 0.5*sp.Rp:
		return nil, errors.New("synthesize: noise and toe must be non-negative, the toe below half the proof strength")
	}
	m := math.Log(sp.Uniform/0.002) / math.Log(sp.Rm/sp.Rp)
	ro := func(sig float64) float64 { return sig/sp.E + 0.002*math.Pow(sig/sp.Rp, m) }
	ag, a := sp.Uniform, sp.Elongation
	k := 0.0
	if a > ag {
		k = 0.2 * sp.Rm / ((a - ag) * (a - ag))
	}
	neck := func(ep float64) float64 { return sp.Rm - k*(ep-ag)*(ep-ag) }
	eu := sp.Rm/sp.E + ag
	ef := neck(a)/sp.E + a
	// stress at total strain e (true curve, no toe): the root of the
	// increasing function g by Newton's method kept inside a bracket that
	// each step narrows (a step that leaves it bisects; e.g. Press et al.,
	// Numerical Recipes, 3rd ed., section 9.4, rtsafe), to the last bits.
	root := func(g, dg func(float64) float64, lo, hi float64) float64 {
		v := (lo + hi) / 2
		for it := 0; it < 200; it++ {
			f := g(v)
			if f == 0 {
				return v
			}
			if f < 0 {
				lo = v
			} else {
				hi = v
			}
			nv := v - f/dg(v)
			if !(nv > lo && nv < hi) {
				nv = (lo + hi) / 2
			}
			if nv == v || hi-lo <= 4e-16*math.Abs(hi) {
				return nv
			}
			v = nv
		}
		return v
	}
	stress := func(e float64) float64 {
		if e <= eu {
			return root(func(v float64) float64 { return ro(v) - e },
				func(v float64) float64 { return 1/sp.E + 0.002*m/sp.Rp*math.Pow(v/sp.Rp, m-1) }, 0, sp.Rm)
		}
		ep := root(func(v float64) float64 { return v + neck(v)/sp.E - e },
			func(v float64) float64 { return 1 - 2*k*(v-ag)/sp.E }, ag, a)
		return neck(ep)
	}
	const after = 3
	n := sp.Points - after
	n1 := n / 4
	e1 := math.Min(sp.Rp/sp.E+0.004, eu/2)
	strain := make([]float64, 0, sp.Points)
	if sp.ConstantRate {
		const slow, fast = 0.00025, 0.0067 // strain per second
		t1 := e1 / slow
		total := t1 + (ef-e1)/fast
		for i := 0; i < n; i++ {
			tm := total * float64(i) / float64(n-1)
			e := tm * slow
			if tm > t1 {
				e = math.Min(ef, e1+(tm-t1)*fast)
			}
			strain = append(strain, e)
		}
	} else {
		for i := 0; i < n1; i++ {
			strain = append(strain, e1*float64(i)/float64(n1))
		}
		n2 := n - n1
		for i := 0; i < n2; i++ {
			strain = append(strain, e1+(ef-e1)*float64(i+1)/float64(n2))
		}
	}
	rng := rand.New(rand.NewPCG(sp.Seed, 0x72656475636521))
	area := math.Pi * sp.Diameter * sp.Diameter / 4
	force := make([]float64, 0, sp.Points)
	ext := make([]float64, 0, sp.Points)
	for _, e := range strain {
		sig := stress(e)
		em := e + sp.Toe
		if sp.Toe > 0 && sig < sp.E*sp.Toe {
			em = math.Sqrt(4 * sp.Toe * sig / sp.E)
		}
		sig += sp.Noise * rng.NormFloat64()
		if sp.StrainNoise > 0 {
			em += sp.StrainNoise * rng.NormFloat64()
		}
		force = append(force, sig*area/1000)
		ext = append(ext, em*sp.Gauge)
	}
	sf := neck(a)
	for i := 1; i <= after; i++ {
		force = append(force, sf*area/1000*0.02/float64(i))
		ext = append(ext, (ef+sp.Toe+0.0005*float64(i))*sp.Gauge)
	}
	meta := [][2]string{
		{"specimen", sp.ID}, {"lot", sp.Lot}, {"heat", sp.Heat}, {"supplier", sp.Supplier},
		{"material", sp.Material}, {"tested", sp.Tested}, {"condition", sp.Condition},
		{"shape", "round"},
		{"diameter", num(sp.Diameter, 3)},
		{"gauge length", num(sp.Gauge, 3)},
		{"final gauge length", num(sp.Gauge*(1+a), 3)},
		{"final diameter", num(sp.Diameter*math.Sqrt(1-sp.ReductionOfArea), 3)},
		{"force unit", "kN"}, {"length unit", "mm"}, {"extension", "extensometer"},
		{"columns", "force extension"},
	}
	var b bytes.Buffer
	writeRecord(&b, meta, force, ext, 5, 6)
	return b.Bytes(), nil
}

func num(v float64, dec int) string { return strconv.FormatFloat(v, 'f', dec, 64) }

// writeRecord writes one record: the metadata (empty values left out),
// then the two data columns with the given decimals.
func writeRecord(b *bytes.Buffer, meta [][2]string, c1, c2 []float64, d1, d2 int) {
	b.WriteString("@record\n")
	for _, kv := range meta {
		if kv[1] != "" {
			fmt.Fprintf(b, "%s: %s\n", kv[0], kv[1])
		}
	}
	b.WriteString("@data\n")
	var buf []byte
	for i := range c1 {
		buf = strconv.AppendFloat(buf[:0], c1[i], 'f', d1, 64)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, c2[i], 'f', d2, 64)
		buf = append(buf, '\n')
		b.Write(buf)
	}
	b.WriteString("@end\n")
}
