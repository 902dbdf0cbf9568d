package reduce

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/gonum/integrate"
	"gonum.org/v1/gonum/stat"

	"lotproof/lots"
	"lotproof/stats"
)

// DefaultOffset is the plastic strain of the offset method: 0.2 %
// (ISO 6892-1 Rp0.2; ASTM E8/E8M offset method).
const DefaultOffset = 0.002

// Options steer the reduction.
type Options struct {
	// ModulusFrom and ModulusTo, when ModulusTo > ModulusFrom >= 0, fix the
	// stress range [MPa] of the elastic fit instead of finding it.
	ModulusFrom, ModulusTo float64
	// Offset is the plastic strain of the proof strength (0: 0.002).
	Offset float64
	// Done, when set, is called after each record ReduceAll reduces (a
	// progress display).
	Done func()
}

// Fit is the least-squares elastic line stress = Slope*strain + Intercept.
type Fit struct {
	Slope      float64 // [MPa] per unit strain
	Intercept  float64 // [MPa]
	R2         float64 // coefficient of determination
	ResidualSD float64 // sqrt(SSE/(n-2)) [MPa]
	// SlopeRelSE is the relative standard error of the slope (the
	// modulus): for a straight line sqrt((1/R^2 - 1)/(n - 2)), the
	// coefficient of variation of the slope of ASTM E111 section 9 (the
	// least-squares standard error of the slope over the slope); for the
	// Ramberg-Osgood fit, from its covariance (gradual.go).
	SlopeRelSE float64
	N          int     // points used
	From, To   float64 // stress range of the points used [MPa]
	FirstLine  int     // file line of the first point used
	LastLine   int     // file line of the last point used
	Auto       bool    // range found automatically

	FromPercentProof, ToPercentProof float64 // the stress range as % of the proof strength
}

// Result is the reduction of one record. Stresses are in MPa, strains are
// fractions, energies per volume in MJ/m^3; NaN marks a value that could
// not be determined (a warning says why).
type Result struct {
	ID, Lot, Heat, Supplier, Material, Tested, Condition string
	Source                                               string // file:line of the record

	Modulus, Proof, UpperYield, LowerYield, Tensile float64
	Uniform, Elongation, ReductionOfArea            float64
	Toughness, Resilience                           float64
	ElongationMethod                                string  // how the elongation was found
	ExtensometerElongation                          float64 // plastic strain at fracture from the record (audit)
	Fit                                             Fit
	FitOK                                           bool
	ToeShift                                        float64 // strain origin shift (toe compensation)
	Offset                                          float64
	ProofStrain, TensileStrain, FractureStrain      float64 // on the toe-compensated curve
	Fractured                                       bool
	Noise                                           float64 // estimated stress noise SD of the working points [MPa]
	RawNoise                                        float64 // estimated stress noise SD of the raw points [MPa]
	StrainNoise                                     float64 // estimated strain noise SD of the raw points
	Bin                                             int     // raw points averaged per working point
	Glitches                                        []Glitch
	RepeatedPoints                                  int // points of repeated data blocks left out

	// TensileRaw is the highest raw stress (glitches left out); Tensile is
	// from the smoothed curve at the maximum and never above it.
	TensileRaw    float64
	TensileMethod string // how Rm was found from the points near the maximum
	TensileFrom   float64
	TensileTo     float64 // strain window of the Rm fit
	TensileN      int     // working points in the Rm fit
	FitMethod     string  // how the elastic window was chosen
	ProofMethod   string  // how the proof strength was found

	lin      window  // the straight window found automatically
	linErr   float64 // its combined relative error
	seed     window  // the lowest window, when none is straight
	fitSpan  int     // working points from the first to the last of the elastic fit
	noLinear string  // the warning when none is straight

	modInfo        modulusInfo // the information of the modulus fit taken
	fractureGlitch *Glitch     // a glitch left out where it decides the fracture point
	fractureLines  [2]int      // the last file line before the fracture's fall, the first after it

	left, steps                                                   []Glitch // raw point ranges left out; lone extension steps
	tooMany                                                       bool     // more than maxGlitches glitches
	Points, Duplicates, Backward, LoopPoints, PointsAfterFracture int
	Notes, Warnings                                               []string

	// Curve is the engineering stress-strain curve used: toe-compensated
	// strain and stress, loops and glitches left out, ending at fracture,
	// thinned to at most about 4,000 points.
	Strain, Stress []float64
}

func (r *Result) warn(format string, a ...any) {
	r.Warnings = append(r.Warnings, fmt.Sprintf(format, a...))
}
func (r *Result) note(format string, a ...any) { r.Notes = append(r.Notes, fmt.Sprintf(format, a...)) }

// Reduce computes the properties of one record:
//   - engineering stress F/S0 and strain (extension/Le);
//   - glitches (force spikes and dropouts, extension spikes, jumps and
//     back, repeated data blocks) found on the raw points against the
//     record's own noise and left out, each named by its line in a
//     warning; a lone extension step (the extensometer slipped) leaves
//     the properties measured beyond it empty (see findGlitches); a
//     glitch at the fracture leaves the elongation from the record empty
//     (glitchAtFracture), and one among the points that carry the modulus
//     leaves the modulus empty when, fitted, they could have moved it by
//     more than 0.5 % (glitchInModulus);
//   - a record of more than binTarget points is averaged in bins of
//     consecutive points, so that the noise of the working curve falls
//     with the sampling rate (see workingPoints);
//   - the modulus E as the least-squares slope over the straight stress
//     window (ASTM E111, see autoElastic and fitLine), or, where it is the
//     more precise or the straight window is not elastic, the tangent at
//     zero stress of a Ramberg-Osgood curve fitted in stress from just past
//     the proof strength to as far up the loading branch as it holds
//     (Ramberg and Osgood; Hill; see gradualFit, fitRO and refineRO),
//     with toe compensation
//     (the strain origin moved to the strain intercept of that line, as
//     in ASTM E111 and the ASTM E8/E8M offset-method figure);
//   - proof strength by the offset method (ISO 6892-1 clause 12; ASTM
//     E8/E8M offset method), ReH and ReL (ISO 6892-1 clauses 10, 11);
//   - tensile strength Rm = Fm/S0 (ISO 6892-1 clause 19) from a parabola
//     fitted to the points near the maximum, never above the highest raw
//     point, and the plastic extension at maximum force Ag = e(Fm) - Rm/E
//     (clause 16; the middle of a flat top), see peak;
//   - elongation after fracture A = (Lu - L0)/L0 from the final gauge
//     length, or from the record as the strain at fracture less the
//     elastic part stress/E (clause 20; ASTM E8/E8M elongation);
//   - reduction of area Z = (S0 - Su)/S0 (clause 21; ASTM E8/E8M);
//   - toughness (see toughness) and modulus of resilience Rp^2/(2E)
//     (the elastic strain energy per volume at Rp; handbook definition,
//     e.g. Dowling, Mechanical Behavior of Materials; from memory).
//
// ISO 6892-1:2019 and ASTM E8/E8M clause numbers are from memory; check
// the edition in force.
//
// It returns a
// *lots.InputError when the record cannot be used at all (stresses or
// strains that no metal tensile test gives, which usually means a wrong
// unit); a property that cannot be determined for this specimen is NaN
// with a warning.
func Reduce(rec *Record, opt Options) (*Result, error) {
	off := opt.Offset
	if off == 0 {
		off = DefaultOffset
	}
	nan := math.NaN()
	res := &Result{
		ID: rec.ID, Lot: rec.Lot, Heat: rec.Heat, Supplier: rec.Supplier, Material: rec.Material,
		Tested: rec.Tested, Condition: rec.Condition, Source: rec.Where(rec.Line),
		Modulus: nan, Proof: nan, UpperYield: nan, LowerYield: nan, Tensile: nan, Uniform: nan,
		Elongation: nan, ReductionOfArea: nan, Toughness: nan, Resilience: nan,
		ExtensometerElongation: nan, ToeShift: nan, Offset: off,
		ProofStrain: nan, TensileStrain: nan, FractureStrain: nan, Noise: nan,
		Points: rec.Len(), TensileRaw: nan,
	}
	n0 := rec.Len()
	if n0 < 3 {
		return nil, lots.Inputf(res.Source, "give force and strain for every point, at least 3 points", "record %q has %d data points", rec.ID, n0)
	}
	if !(rec.Area > 0) || !(rec.Gauge > 0) {
		return nil, lots.Inputf(res.Source, "give the original cross-section and gauge length", "record %q has no usable cross-section or gauge length", rec.ID)
	}
	if opt.Offset < 0 || opt.Offset > 0.05 {
		return nil, lots.Inputf("options", "use an offset such as 0.002 (0.2 %)", "offset %g is outside 0 to 0.05", opt.Offset)
	}
	// 1. One pass over the raw points: finite values, extremes, exact
	// repeats of the point before.
	stressAt := func(i int) float64 { f, _, _ := rec.Point(i); return f / rec.Area }
	strainAt := func(i int) float64 { _, x, _ := rec.Point(i); return x }
	fMax, fMin, xMax, xMin := math.Inf(-1), math.Inf(1), math.Inf(-1), math.Inf(1)
	var pf, px float64
	for i := 0; i < n0; i++ {
		f, x, line := rec.Point(i)
		if math.IsNaN(f) || math.IsInf(f, 0) || math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, lots.Inputf(rec.Where(line), "remove or correct the point", "record %q: point %d is not finite", rec.ID, i+1)
		}
		if i > 0 && f == pf && x == px {
			res.Duplicates++
		}
		pf, px = f, x
		fMax, fMin, xMax, xMin = math.Max(fMax, f), math.Min(fMin, f), math.Max(xMax, x), math.Min(xMin, x)
	}
	_, _, firstLine := rec.Point(0)
	// 2. Plausibility of signs and units: a metal tensile test gives a
	// maximum stress of 1 to 5000 MPa and strains below 200 % (common
	// practice), with tension positive.
	if fMin < 0 && -fMin > 10*math.Max(fMax, 0) {
		return nil, lots.Inputf(rec.Where(firstLine), "record tension as positive force (reverse the sign of the force column)",
			"record %q: the forces are negative (lowest %.4g %s, highest %.4g %s): the force sign is reversed", rec.ID, fMin/forceScale(rec.ForceUnit), rec.ForceUnit, fMax/forceScale(rec.ForceUnit), rec.ForceUnit)
	}
	if sm := fMax / rec.Area; !(sm >= 1 && sm <= 5000) {
		return nil, lots.Inputf(rec.Where(firstNonZero(rec.ForceUnitLine, rec.Line)), "check \"force unit\" (N, kN, lbf, kip), \"length unit\" and the cross-section dimensions",
			"record %q: maximum stress %.4g MPa is implausible for a metal tensile test (expected 1 to 5000 MPa): the force unit %q or the length unit %q is probably wrong", rec.ID, sm, rec.ForceUnit, rec.LengthUnit)
	}
	if xMin < 0 && -xMin > 10*math.Max(xMax, 0) {
		return nil, lots.Inputf(rec.Where(firstLine), "record elongation as positive extension (reverse the sign of the extension or strain column) and check that the columns are in the order stated",
			"record %q: the extensions are negative (lowest strain %.4g, highest %.4g): the extension sign is reversed", rec.ID, xMin, xMax)
	}
	if !(xMax > 0) || xMax > 2 {
		return nil, lots.Inputf(rec.Where(firstNonZero(rec.LengthUnitLine, rec.Line)), "check \"length unit\", \"extensometer gauge length\", \"strain unit\", the sign of the extension and that the columns are in the order stated",
			"record %q: largest strain %.4g is implausible (expected between 0 and 2, i.e. up to 200 %%)", rec.ID, xMax)
	}
	if res.Duplicates > 0 {
		res.note("%d repeated data points (same force and extension as the point before) left out", res.Duplicates)
	}
	// 3. Noise of the raw force and extension, and glitches.
	res.RawNoise = rawNoise(n0, stressAt)
	res.StrainNoise = rawNoise(n0, strainAt)
	smRaw := fMax / rec.Area
	res.glitches(rec, n0, stressAt, strainAt, smRaw, xMax)
	if res.tooMany {
		return nil, lots.Inputf(res.Source, "check the force and extension channels and the columns; a record whose points jump about this often cannot be reduced",
			"record %q has more than %d glitches (points that depart from their neighbours' trend by more than ten times the noise or 0.5 %% of the maximum stress)", rec.ID, maxGlitches)
	}
	// The force at the start: a negative force zero is an offset of the
	// load cell that shifts every stress (ISO 6892-1 asks for the force
	// zeroed before the test piece is gripped; from memory).
	if f0 := startForce(rec, n0, res.left); f0/rec.Area < -math.Max(0.005*smRaw, 5*res.RawNoise) {
		res.warn("the record starts at a force of %.2f %% of the maximum (line %d): the force zero is probably offset; every stress is off by about that much (not corrected); zero the force channel before gripping",
			100*f0/fMax, firstLine)
	}
	// 4. Working points: duplicates and glitches left out; dense records
	// averaged in bins of consecutive points (a bin mean of k points has
	// 1/sqrt(k) of the noise and keeps the curve's shape where the bin is
	// short against the curve's features).
	x, s, ln, lnLast := res.workingPoints(rec, n0)
	if len(x) < 3 {
		return nil, lots.Inputf(res.Source, "record the whole test from zero force to fracture", "record %q has only %d usable points", rec.ID, len(x))
	}
	iMax := argmax(s)
	sm := s[iMax]
	res.Noise = noiseSD(s)
	delta := math.Max(0.005*sm, 6*res.Noise)
	// 5. Fracture: the force falls to below 10 % of its maximum and stays
	// there; the fracture point is the last point before the steep fall.
	const tailFrac = 0.1
	f := len(s) - 1
	if s[f] < tailFrac*sm {
		for f > 0 && s[f] < tailFrac*sm {
			f--
		}
		for f > iMax && s[f-1]-s[f] > 0.05*sm {
			f--
		}
		res.Fractured = true
		res.PointsAfterFracture = len(s) - 1 - f
		res.fractureGlitch = res.glitchAtFracture(rec, lnLast[f], ln[f+1], tailFrac*sm*rec.Area)
	} else {
		res.warn("no fracture in the record (the force at the end is %.0f %% of the maximum): elongation from the record and toughness are not reported", 100*s[f]/sm)
	}
	x, s, ln, lnLast = x[:f+1], s[:f+1], ln[:f+1], lnLast[:f+1]
	// 6. Extension must increase: unload-reload loops and backward steps
	// are left out, so the curve is the monotonic loading envelope.
	x, s, ln, lnLast = res.monotonic(x, s, ln, lnLast, delta, rec)
	if len(x) < 10 {
		return nil, lots.Inputf(res.Source, "record the whole test from zero force to fracture",
			"record %q has only %d usable points with increasing extension (at least 10 needed)", rec.ID, len(x))
	}
	iMax = argmax(s)
	// 5. Loading branch: up to the first fall of the stress by more than
	// delta below its running maximum (yield drop, necking, fracture).
	iEnd := iMax
	if p := firstFall(s[:iMax+1], delta); p >= 0 {
		iEnd = p
	}
	// 6. Elastic fit.
	lo, hi, ok := res.elasticRange(x, s, iEnd, opt)
	// No straight window: the lowest window starts the Ramberg-Osgood
	// fit, which must then be taken.
	seedOnly := !ok && res.noLinear != "" && res.seed.hi > 0
	if seedOnly {
		lo, hi, ok = res.seed.lo, res.seed.hi, true
		res.lin, res.linErr = res.seed, math.Inf(1)
	}
	if ok {
		res.fitLine(x[lo:hi], s[lo:hi])
		res.Fit.FirstLine, res.Fit.LastLine = ln[lo], lnLast[hi-1]
		res.fitSpan = hi - lo
		auto := !(opt.ModulusTo > opt.ModulusFrom)
		if auto && res.Fit.Slope > 0 {
			// Replaces the fit in res when the fitted curve is taken; its
			// window starts where the toe compensation below starts (its
			// end is in the audit, not needed below).
			if l2, _, took := res.gradualFit(x, s, ln, lnLast, res.lin, res.linErr, iEnd, off); took {
				lo = l2
				seedOnly = false
			}
		}
		if seedOnly {
			res.warn("%s", res.noLinear)
			res.FitMethod = ""
			ok = false
		}
		res.Fit.Auto = auto
		if res.Fit.Slope <= 0 {
			res.warn("no linear region found: the fitted slope is not positive")
			ok = false
		}
	}
	res.FitOK = ok
	E := nan
	var cx, cs []float64
	if ok {
		E = res.Fit.Slope
		res.ToeShift = -res.Fit.Intercept / E
		if rec.Crosshead {
			res.warn("modulus not reported: crosshead travel includes the machine's compliance (ASTM E111 needs an extensometer); the fitted slope %.4g GPa is used only for the offset line", E/1000)
		} else {
			res.Modulus = E
			res.glitchInModulus(rec)
		}
		// Toe compensation: the strain origin moves to the intercept of the
		// elastic line; the curve before the fit range is replaced by that
		// line from the new origin.
		cx = append(make([]float64, 0, len(x)-lo+1), 0)
		cs = append(make([]float64, 0, len(x)-lo+1), 0)
		for i := lo; i < len(x); i++ {
			if xi := x[i] - res.ToeShift; xi > cx[len(cx)-1] {
				cx = append(cx, xi)
				cs = append(cs, s[i])
			}
		}
		if math.Abs(res.ToeShift) > 1e-5 {
			res.note("toe compensation: strain origin moved by %.4g %%", 100*res.ToeShift)
		}
	} else {
		cx, cs = x, s
		lo = 0
	}
	res.Strain, res.Stress = cx, cs
	last := len(cx) - 1
	// 7. Proof strength by the offset method.
	if ok {
		res.proof(cx, cs, E, off)
	} else {
		res.warn("no proof strength: no elastic line")
	}
	// 8. Upper and lower yield strength.
	if ok {
		res.yieldPoint(cx, cs, E, delta)
	}
	// 9. Tensile strength and uniform elongation.
	cMax := argmax(cs)
	if !res.Fractured && cMax >= last-2 {
		res.warn("tensile strength not reported: the force was still rising at the end of the record")
	} else {
		res.peak(cx, cs, cMax)
		if ok {
			res.Uniform = math.Max(0, res.TensileStrain-res.Tensile/E)
		} else {
			res.warn("uniform elongation not reported: no elastic line to subtract")
		}
	}
	// 10. Elongation after fracture.
	if res.Fractured {
		res.FractureStrain = cx[last]
		switch g := res.fractureGlitch; {
		case g != nil:
			res.warn("%s %s at %s sits at the fracture, between the last point before the fall (line %d) and the first after it: the fracture may lie before or after it, a strain step or more apart; elongation from the record not reported",
				g.Series, g.Kind, glitchWhere(*g), res.fractureLines[0])
		case ok:
			res.ExtensometerElongation = math.Max(0, cx[last]-cs[last]/E)
		}
	}
	switch {
	case !math.IsNaN(rec.FinalGauge):
		if rec.FinalGauge < rec.Gauge {
			res.warn("elongation not reported: final gauge length %.4g mm is shorter than the original %.4g mm", rec.FinalGauge, rec.Gauge)
		} else {
			res.Elongation = (rec.FinalGauge - rec.Gauge) / rec.Gauge
			res.ElongationMethod = "final gauge length"
			if !math.IsNaN(res.ExtensometerElongation) && math.Abs(res.ExtensometerElongation-res.Elongation) > 0.02 {
				res.warn("elongation from the final gauge length (%.1f %%) and from the record (%.1f %%) differ by more than 2 %% points: check the fracture position and the final measurement",
					100*res.Elongation, 100*res.ExtensometerElongation)
			}
		}
	case !math.IsNaN(res.ExtensometerElongation):
		res.Elongation = res.ExtensometerElongation
		res.ElongationMethod = "record at fracture less the elastic part"
		if rec.Crosshead {
			res.warn("elongation from crosshead travel includes deformation outside the gauge length; measure the final gauge length for a reportable value")
		}
	case res.Fractured:
		res.warn("elongation not reported: no final gauge length and no elastic line")
	}
	// 11. Reduction of area.
	if !math.IsNaN(rec.FinalArea) {
		if rec.FinalArea > rec.Area {
			res.warn("reduction of area not reported: final section %.4g mm^2 is larger than the original %.4g mm^2", rec.FinalArea, rec.Area)
		} else {
			res.ReductionOfArea = (rec.Area - rec.FinalArea) / rec.Area
		}
	}
	// 12. Toughness and modulus of resilience.
	if res.Fractured {
		res.Toughness = toughness(cx, cs)
		if !ok {
			res.warn("toughness without toe compensation (no elastic line)")
		}
	}
	if ok && !math.IsNaN(res.Proof) {
		res.Resilience = res.Proof * res.Proof / (2 * E)
	}
	if ok {
		res.Fit.FromPercentProof, res.Fit.ToPercentProof = 100*res.Fit.From/res.Proof, 100*res.Fit.To/res.Proof
	}
	res.afterSteps(x[lo:], ok)
	res.Strain, res.Stress = thin(res.Strain, res.Stress, keptCurve)
	return res, nil
}

// keptCurve is the most points of the curve a Result keeps (for plots;
// every property is computed before the curve is thinned).
const keptCurve = 4000

// thin keeps every k-th point of the curve, the highest point and the
// last, so that at most about max points remain.
func thin(x, s []float64, most int) ([]float64, []float64) {
	if len(x) <= most {
		return x, s
	}
	k := (len(x) + most - 1) / most
	im := argmax(s)
	ox, os := make([]float64, 0, most+2), make([]float64, 0, most+2)
	for i := range x {
		if i%k == 0 || i == im || i == len(x)-1 {
			ox, os = append(ox, x[i]), append(os, s[i])
		}
	}
	return ox, os
}

// afterSteps leaves out every property measured on strains beyond a lone
// extension step (the extensometer slipped and every later strain is
// shifted) or a lone force step (every later stress is shifted), with a
// warning naming the properties. After a force step the tensile strength
// goes too when its maximum lies beyond the step or the step lies where
// the curve is within twice the step of its highest point (the step may
// have made or unmade the maximum); after an extension step it stays
// (the force is right). fitX are the strains (before toe
// compensation) from the first point of the elastic fit.
func (res *Result) afterSteps(fitX []float64, fitOK bool) {
	if len(res.steps) == 0 {
		return
	}
	nan := math.NaN()
	stepX, forceX := math.Inf(1), math.Inf(1)
	nearTop := false // a force step where the curve is within the step of its top
	for _, g := range res.steps {
		stepX = math.Min(stepX, g.at)
		if g.Series == "force" {
			forceX = math.Min(forceX, g.at)
			nearTop = nearTop || g.atStress >= res.TensileRaw-2*math.Abs(g.Size)
		}
	}
	shift := 0.0
	if fitOK {
		shift = res.ToeShift
	}
	var gone []string
	drop := func(name string, v *float64) {
		if !math.IsNaN(*v) {
			*v = nan
			gone = append(gone, name)
		}
	}
	if fitOK && res.fitSpan > 0 && len(fitX) >= res.fitSpan && fitX[res.fitSpan-1] > stepX {
		drop("modulus", &res.Modulus)
		drop("proof strength", &res.Proof)
		drop("uniform elongation", &res.Uniform)
		drop("resilience", &res.Resilience)
		res.FitOK = false
	}
	if res.ProofStrain+shift > stepX {
		// The modulus of a gradually yielding material rests on the curve
		// up to the proof strength.
		drop("modulus", &res.Modulus)
		drop("proof strength", &res.Proof)
		drop("resilience", &res.Resilience)
	}
	if res.TensileStrain+shift > stepX {
		drop("uniform elongation", &res.Uniform)
	}
	if res.TensileStrain+shift > forceX || nearTop || (fitOK && res.fitSpan > 0 && len(fitX) >= res.fitSpan && fitX[res.fitSpan-1] > forceX) {
		drop("tensile strength", &res.Tensile)
		drop("uniform elongation", &res.Uniform)
	}
	if res.ElongationMethod == "record at fracture less the elastic part" {
		drop("elongation", &res.Elongation)
	}
	res.ExtensometerElongation = nan
	drop("toughness", &res.Toughness)
	if len(gone) > 0 {
		res.warn("not reported because of the step: %s", strings.Join(gone, ", "))
	}
}

// peak finds the tensile strength Rm = Fm/S0 (ISO 6892-1 clause 19) and
// the strain at maximum force from the points near the highest working
// point: those within a band of max(6 noise SD, 0.05 % of the maximum)
// below it, contiguous around it. Through them a least-squares parabola
// in strain is fitted on the window symmetric about the highest point; Rm is the parabola's vertex value and the
// strain its vertex, so that the noise does not lift Rm as the highest of
// many noisy points would. Rm is never above the highest raw value. When
// the top is flat (the parabola falls by less than a quarter of the band
// across the window, or has no maximum inside it), Rm is the mean stress
// of the band and the strain the middle of the flat, as ISO 6892-1 asks
// for Ag on a plateau (clause 3.6.4 note; from memory). With fewer than 5
// points in the band the highest point is taken. The smoothing is this
// package's choice; the standards define Fm on the record.
func (res *Result) peak(x, s []float64, iMax int) {
	top := s[iMax]
	band := math.Max(6*res.Noise, 0.0005*top)
	l, h := iMax, iMax
	for l > 0 && s[l-1] >= top-band {
		l--
	}
	for h < len(s)-1 && s[h+1] >= top-band {
		h++
	}
	res.TensileFrom, res.TensileTo, res.TensileN = x[l], x[h], h-l+1
	raw := res.TensileRaw
	if math.IsNaN(raw) {
		raw = top
	}
	set := func(v, strain float64, method string) {
		res.Tensile = math.Min(v, raw)
		res.TensileStrain = strain
		res.TensileMethod = method
	}
	if h-l+1 < 5 {
		set(top, x[iMax], "highest working point (fewer than 5 points within the band below it)")
		return
	}
	c := x[iMax]
	hw := math.Min(c-x[l], x[h]-c)
	if hw <= 0 {
		hw = (x[h] - x[l]) / 2
		c = (x[h] + x[l]) / 2
	}
	flat := func() {
		sum := 0.0
		for i := l; i <= h; i++ {
			sum += s[i]
		}
		set(sum/float64(h-l+1), (x[l]+x[h])/2, fmt.Sprintf("flat top: mean of the %d points within %.3g MPa of the highest, strain at the middle of the flat", h-l+1, band))
	}
	var v float64
	for it := 0; it < 1; it++ {
		cf, ok := quadFit(x, s, c, hw)
		if !ok {
			set(top, x[iMax], "highest working point (no fit possible)")
			return
		}
		if cf[2] > -0.25*band {
			flat()
			return
		}
		u := -cf[1] / (2 * cf[2])
		if u < -1 || u > 1 {
			flat()
			return
		}
		c = c + u*hw
		v = cf[0] - cf[1]*cf[1]/(4*cf[2])
		hw = math.Min(hw, math.Min(c-x[l], x[h]-c))
		if hw <= 0 {
			break
		}
	}
	set(v, c, fmt.Sprintf("vertex of a least-squares parabola in strain through the points within %.3g MPa of the highest (%d points, strain %.4g %% to %.4g %%)", band, h-l+1, 100*x[l], 100*x[h]))
}

// toughness is the area under the engineering stress-strain curve from the
// first point to fracture by the trapezoidal rule (gonum integrate.
// Trapezoidal): U_T = integral of sigma d(epsilon) [MPa = MJ/m^3]. The
// definition is that of the handbooks (e.g. Dowling, Mechanical Behavior
// of Materials, "tensile toughness"; from memory).
func toughness(x, s []float64) float64 { return integrate.Trapezoidal(x, s) }

// monotonic keeps only points whose strain exceeds every earlier kept
// point. A run of left-out points that repeats an earlier run point for
// point (same stress and strain) is a repeated data block (a warning); a
// run during which the stress fell by more than delta is an unload-reload
// loop (noted); a run without unloading is extension going backwards (a
// warning when it goes back by more than ten typical steps).
func (res *Result) monotonic(x, s []float64, ln, lnLast []int, delta float64, rec *Record) ([]float64, []float64, []int, []int) {
	steps := make([]float64, 0, len(x))
	for i := 1; i < len(x); i++ {
		if d := x[i] - x[i-1]; d > 0 {
			steps = append(steps, d)
		}
	}
	typ := 0.0
	if len(steps) > 0 {
		typ = stats.SelectKth(steps, len(steps)/2)
	}
	ox := append(make([]float64, 0, len(x)), x[0])
	os := append(make([]float64, 0, len(x)), s[0])
	ol := append(make([]int, 0, len(x)), ln[0])
	oll := append(make([]int, 0, len(x)), lnLast[0])
	back := 0
	for i := 1; i < len(x); {
		if x[i] > ox[len(ox)-1] {
			ox, os, ol, oll = append(ox, x[i]), append(os, s[i]), append(ol, ln[i]), append(oll, lnLast[i])
			i++
			continue
		}
		// A run of points at or behind the last kept strain.
		u := len(ox) - 1
		j := i
		minS, minX := s[i], x[i]
		for j < len(x) && x[j] <= ox[u] {
			minS, minX = math.Min(minS, s[j]), math.Min(minX, x[j])
			j++
		}
		cnt := j - i
		if p := repeatOf(x, s, i, j); p >= 0 {
			res.RepeatedPoints += cnt
			res.warn("lines %d to %d repeat lines %d to %d point for point (a data block written twice); the repeat is left out", ln[i], lnLast[j-1], ln[p], lnLast[p+cnt-1])
			i = j
			continue
		}
		switch {
		case os[u]-minS > delta:
			res.LoopPoints += cnt
			res.note("unload-reload loop from line %d to line %d (strain %.3g %%, unloaded to %.0f MPa) left out of the envelope", ol[u], lineAt(ln, j), 100*ox[u], minS)
		default:
			res.Backward += cnt
			back += cnt
			if ox[u]-minX > 10*typ && typ > 0 {
				res.warn("extension went backwards by %.3g %% strain at line %d without unloading; %d points left out (check the extensometer)", 100*(ox[u]-minX), ln[i], cnt)
			}
		}
		i = j
	}
	if back > 0 {
		res.note("%d points with extension not above the previous maximum left out", back)
	}
	return ox, os, ol, oll
}

// repeatOf returns the start p of an earlier run x[p:p+(j-i)], s[...]
// equal point for point to x[i:j], s[i:j] (at least 3 points), or -1.
func repeatOf(x, s []float64, i, j int) int {
	cnt := j - i
	if cnt < 3 {
		return -1
	}
	for p := i - cnt; p >= 0; p-- {
		if x[p] != x[i] || s[p] != s[i] {
			continue
		}
		same := true
		for t := 1; t < cnt && same; t++ {
			same = x[p+t] == x[i+t] && s[p+t] == s[i+t]
		}
		if same {
			return p
		}
	}
	return -1
}

func lineAt(ln []int, j int) int {
	if j < len(ln) {
		return ln[j]
	}
	return ln[len(ln)-1]
}

// elasticRange picks the index range [lo, hi) of the elastic fit on the
// loading branch x[0..iEnd]. With a stress range in opt, the range is the
// points within it; otherwise autoElastic finds the straight window.
func (res *Result) elasticRange(x, s []float64, iEnd int, opt Options) (lo, hi int, ok bool) {
	if opt.ModulusTo > opt.ModulusFrom {
		lo, hi = -1, -1
		for i := 0; i <= iEnd; i++ {
			if s[i] >= opt.ModulusFrom && s[i] <= opt.ModulusTo {
				if lo < 0 {
					lo = i
				}
				hi = i + 1
			} else if lo >= 0 && s[i] > opt.ModulusTo {
				break
			}
		}
		res.FitMethod = fmt.Sprintf("least squares over the stress range given, %.4g to %.4g MPa", opt.ModulusFrom, opt.ModulusTo)
		if lo < 0 || hi-lo < 3 {
			res.warn("no linear region found: the modulus range %.4g to %.4g MPa holds %d points of the loading branch (3 needed)", opt.ModulusFrom, opt.ModulusTo, max(0, hi-lo))
			return 0, 0, false
		}
		return lo, hi, true
	}
	w, ok := res.autoElastic(x, s, iEnd)
	return w.lo, w.hi, ok
}

// fitLine fits stress = beta*strain + alpha by ordinary least squares
// (gonum stat.LinearRegression; ASTM E111 section 9, least-squares fit of
// stress on strain, from memory) and records R^2 (gonum stat.RSquared)
// and the residual standard deviation sqrt(SSE/(n-2)).
func (res *Result) fitLine(x, s []float64) {
	alpha, beta := stat.LinearRegression(x, s, nil, false)
	r2 := stat.RSquared(x, s, nil, alpha, beta)
	sse := 0.0
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := range x {
		e := s[i] - (alpha + beta*x[i])
		sse += e * e
		lo, hi = math.Min(lo, s[i]), math.Max(hi, s[i])
	}
	res.Fit = Fit{Slope: beta, Intercept: alpha, R2: r2, ResidualSD: math.Sqrt(sse / float64(len(x)-2)), N: len(x), From: lo, To: hi,
		SlopeRelSE: math.NaN()}
	mi := modulusInfo{dim: 2, k: 1, v: sse / float64(len(x)-2), scale: beta, xlo: math.Inf(1), xhi: math.Inf(-1),
		row: func(xs float64) ([4]float64, bool) { return [4]float64{1, xs}, true }}
	for _, xi := range x {
		mi.a[0][0]++
		mi.a[0][1] += xi
		mi.a[1][1] += xi * xi
		mi.xlo, mi.xhi = math.Min(mi.xlo, xi), math.Max(mi.xhi, xi)
	}
	mi.a[1][0] = mi.a[0][1]
	res.modInfo = mi
	if len(x) > 2 && r2 > 0 {
		res.Fit.SlopeRelSE = math.Sqrt(math.Max(0, 1/r2-1) / float64(len(x)-2))
	}
}

// proof finds the offset proof strength Rp (ISO 6892-1 clause 12 and
// 3.10.3, "plastic extension" proof strength; ASTM E8/E8M offset method,
// section 7.7.1, from memory): the stress where the curve meets the line
// of slope E through strain = offset, found as the first sign change of
// g = stress - E (strain - offset) and interpolated linearly between the
// two points around it.
func (res *Result) proof(x, s []float64, E, off float64) {
	prev := s[0] - E*(x[0]-off)
	for i := 1; i < len(x); i++ {
		g := s[i] - E*(x[i]-off)
		if g <= 0 {
			t := prev / (prev - g)
			res.Proof = s[i-1] + t*(s[i]-s[i-1])
			res.ProofStrain = x[i-1] + t*(x[i]-x[i-1])
			res.ProofMethod = "interpolated between the two points around the first crossing of the offset line"
			if res.Noise > 1e-4*res.Proof {
				res.smoothProof(x, s, E, off)
			}
			return
		}
		prev = g
	}
	if res.Fractured {
		res.warn("no proof strength: fractured before %.3g %% offset", 100*off)
	} else {
		res.warn("no proof strength: the record ends before %.3g %% offset", 100*off)
	}
}

// smoothProof refines the offset intersection on a noisy curve. The first
// sign change is found where the noise happens to pull a point below the
// offset line, which biases the plain interpolation low, the more so the
// flatter the curve is there. Instead the stress is fitted, by least
// squares, as a parabola in the plastic strain (strain less stress over
// the modulus) to every point whose plastic strain lies within half the
// offset of it (0.1 % to 0.3 % for Rp0.2), and the proof strength is the
// parabola's value at the offset: the point where the curve meets the
// offset line, as ISO 6892-1 defines it, from a local least-squares
// smoothing (Savitzky and Golay, Analytical Chemistry 36, 1964, fit a
// low-order polynomial by least squares over a window and take its value
// at the centre; here the window is set in plastic strain). The plastic
// strain carries the stress noise divided by the modulus, far below the
// width of the window. The smoothed value is kept when at least 5 points
// lie on each side of the offset.
func (res *Result) smoothProof(x, s []float64, E, off float64) {
	var q quadSums
	below, above := 0, 0
	for i := range x {
		p := x[i] - s[i]/E
		if p < off/2 || p > 1.5*off {
			continue
		}
		if p < off {
			below++
		} else {
			above++
		}
		q.add((p-off)/(off/2), s[i])
	}
	if below < 5 || above < 5 {
		return
	}
	S, T := &q.S, &q.T
	m := [3][]float64{{S[0], S[1], S[2], T[0]}, {S[1], S[2], S[3], T[1]}, {S[2], S[3], S[4], T[2]}}
	if !gaussJordan3(&m) {
		return
	}
	rp := m[0][3] / m[0][0]
	if !(rp > 0) {
		return
	}
	res.Proof = rp
	res.ProofStrain = rp/E + off
	res.ProofMethod = fmt.Sprintf("value at %.3g %% plastic strain of a least-squares parabola of the stress in the plastic strain through the %d points between %.3g %% and %.3g %% plastic strain (a local smoothing after Savitzky and Golay)",
		100*off, below+above, 50*off, 150*off)
}

// yieldPoint finds discontinuous yielding (ISO 6892-1 3.10.2.1 upper
// yield strength ReH: the stress at the first fall of force; 3.10.2.2
// lower yield strength ReL: the lowest stress during plastic yielding,
// ignoring any initial transient effect; clauses 10 and 11; from memory).
// A fall counts when the stress drops more than delta below its running
// maximum while the plastic strain is below 1 % and the curve continues
// for at least another 1 % strain (so necking and fracture do not count).
// The yielding ends where the stress first regains ReH or, when it never
// does, at the last point within delta of the highest stress after the
// fall; the initial transient is the first dip below the median of the
// yielding stresses, which is left out of the minimum.
func (res *Result) yieldPoint(x, s []float64, E, delta float64) {
	p := firstFall(s, delta)
	if p < 0 || x[p]-s[p]/E > 0.01 || x[len(x)-1]-x[p] < 0.01 {
		return
	}
	q := len(s)
	for i := p + 1; i < len(s); i++ {
		if s[i] >= s[p] {
			q = i
			break
		}
	}
	// Without later hardening above ReH, the yielding ends at the last
	// point within delta of the highest stress after the fall, before any
	// necking.
	if q == len(s) {
		top := s[p+1+argmax(s[p+1:])]
		for q = len(s) - 1; q > p+1 && s[q] < top-delta; q-- {
		}
		q++
	}
	if q-p < 3 {
		return
	}
	plateau := append([]float64(nil), s[p+1:q]...)
	sort.Float64s(plateau)
	med := plateau[len(plateau)/2]
	k := p + 1
	for k < q && s[k] >= med { // falling towards the dip
		k++
	}
	for k < q && s[k] < med { // the dip
		k++
	}
	if k >= q {
		k = p + 1
	}
	rel := math.Inf(1)
	for i := k; i < q; i++ {
		rel = math.Min(rel, s[i])
	}
	res.UpperYield = s[p]
	res.LowerYield = rel
	res.note("discontinuous yielding: upper yield at strain %.3g %%, yielding up to strain %.3g %%", 100*x[p], 100*x[q-1])
}

// fallSide is the number of points on each side of the centred moving
// average that firstFall looks at.
const fallSide = 2

// firstFall returns the index of the highest point before the first fall
// of the stress by more than delta below its running maximum, or -1 when
// it never falls so far. The fall is judged on the centred moving average
// of 2 fallSide + 1 points (fewer at the ends), so that two noise
// extremes, a high point and a later low one, do not make a fall on a
// flat stretch of a noisy curve; a yield drop or necking, which lasts,
// does. The point returned is the highest raw point within fallSide
// points of the moving average's running maximum.
func firstFall(s []float64, delta float64) int {
	n := len(s)
	avg := func(i int) float64 {
		a, b := max(0, i-fallSide), min(n, i+fallSide+1)
		sum := 0.0
		for j := a; j < b; j++ {
			sum += s[j]
		}
		return sum / float64(b-a)
	}
	run, top := 0, avg(0)
	for i := 1; i < n; i++ {
		v := avg(i)
		if v > top {
			run, top = i, v
		}
		if v < top-delta {
			a, b := max(0, run-fallSide), min(n, run+fallSide+1)
			return a + argmax(s[a:b])
		}
	}
	return -1
}

// quadFit fits stress = c0 + c1 u + c2 u^2, u = (strain - xc)/w, by least
// squares through the points with strain in [xc-w, xc+w] (3x3 normal
// equations in the centred, scaled variable, Gauss-Jordan elimination with
// partial pivoting). ok is false with fewer than 5 points.
func quadFit(x, s []float64, xc, w float64) (c [3]float64, ok bool) {
	if !(w > 0) {
		return c, false
	}
	var q quadSums
	n := 0
	for i := range x {
		if x[i] < xc-w || x[i] > xc+w {
			continue
		}
		n++
		q.add((x[i]-xc)/w, s[i])
	}
	if n < 5 {
		return c, false
	}
	S, T := &q.S, &q.T
	m := [3][]float64{{S[0], S[1], S[2], T[0]}, {S[1], S[2], S[3], T[1]}, {S[2], S[3], S[4], T[2]}}
	if !gaussJordan3(&m) {
		return c, false
	}
	for k := 0; k < 3; k++ {
		c[k] = m[k][3] / m[k][k]
	}
	return c, true
}

// quadSums are the sums of the normal equations of the least-squares
// parabola y = c0 + c1 u + c2 u^2: S[k] is the sum of u^k (k = 0..4), T[k]
// that of u^k y (k = 0..2).
type quadSums struct {
	S [5]float64
	T [3]float64
}

// add adds the point (u, y).
func (q *quadSums) add(u, y float64) {
	p := 1.0
	for k := 0; k < 5; k++ {
		q.S[k] += p
		if k < 3 {
			q.T[k] += p * y
		}
		p *= u
	}
}

// gaussJordan3 reduces the augmented 3-row matrix *m (the 3x3 system in
// its first three columns) to diagonal form in place by Gauss-Jordan
// elimination with partial pivoting (Press et al., Numerical Recipes,
// 3rd ed., section 2.1): afterwards row r solves as m[r][k]/m[r][r] for
// each right-hand-side column k >= 3. It is false at a zero pivot.
func gaussJordan3(m *[3][]float64) bool {
	for col := 0; col < 3; col++ {
		piv := col
		for r := col + 1; r < 3; r++ {
			if math.Abs(m[r][col]) > math.Abs(m[piv][col]) {
				piv = r
			}
		}
		m[col], m[piv] = m[piv], m[col]
		if m[col][col] == 0 {
			return false
		}
		for r := 0; r < 3; r++ {
			if r != col {
				f := m[r][col] / m[col][col]
				for k := col; k < len(m[r]); k++ {
					m[r][k] -= f * m[col][k]
				}
			}
		}
	}
	return true
}

// parabolaVertex returns the strain of the vertex of the least-squares
// parabola through the points with strain in [a, b] when it is a maximum
// inside [a, b].
func parabolaVertex(x, s []float64, a, b float64) (float64, bool) {
	xc, w := (a+b)/2, (b-a)/2
	c, ok := quadFit(x, s, xc, w)
	if !ok || !(c[2] < 0) {
		return 0, false
	}
	u := -c[1] / (2 * c[2])
	if u < -1 || u > 1 {
		return 0, false
	}
	return xc + u*w, true
}

func argmax(v []float64) int {
	k := 0
	for i, x := range v {
		if x > v[k] {
			k = i
		}
	}
	return k
}

// noiseSD estimates the standard deviation of the stress noise from the
// second differences d_i = s_{i-1} - 2 s_i + s_{i+1}: for independent noise
// of SD sigma, Var d = 6 sigma^2, and the median absolute value of a normal
// variable is 0.6745 SD, so sigma = median|d| / (0.6745 sqrt 6) (a robust
// scale estimate; Hampel's MAD, e.g. NIST/SEMATECH e-Handbook 1.3.5.6).
func noiseSD(s []float64) float64 {
	const normQ75 = 0.6744897501960817 // standard normal 75 % quantile
	if len(s) < 3 {
		return 0
	}
	d := make([]float64, len(s)-2)
	for i := 1; i < len(s)-1; i++ {
		d[i-1] = math.Abs(s[i-1] - 2*s[i] + s[i+1])
	}
	return stats.SelectKth(d, len(d)/2) / (normQ75 * math.Sqrt(6))
}

// forceScale is the factor from the record's force unit to N (1 when
// unknown).
func forceScale(unit string) float64 {
	if v, ok := forceUnits[strings.ToLower(unit)]; ok {
		return v
	}
	return 1
}

func firstNonZero(a, b int) int {
	if a != 0 {
		return a
	}
	return b
}
