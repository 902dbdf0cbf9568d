package reduce

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// roMaterial is an analytic Ramberg-Osgood material (Ramberg and Osgood,
// NACA TN 902, 1943): strain = stress/E + 0.002 (stress/Rp)^m up to Rm,
// with Rm/Rp = (Ag/0.002)^(1/m) so that the hardening exponent is m and
// the plastic strain at Rm is Ag. The values are inputs of the analytic
// curves (invented, in the ranges of the handbooks for the alloys named;
// common practice), not reference results.
type roMaterial struct {
	name       string
	E, Rp      float64
	m          float64 // hardening exponent
	Ag, A      float64
	diam, gage float64
}

func (mt roMaterial) spec(points int, noiseFrac float64, seed uint64) SynthSpec {
	return mt.sampled(points, noiseFrac, seed, false)
}

// sampled is spec, with the points evenly in time under the strain rates
// of ISO 6892-1 method A when rate is set (see Synthesize).
func (mt roMaterial) sampled(points int, noiseFrac float64, seed uint64, rate bool) SynthSpec {
	rm := mt.Rp * math.Pow(mt.Ag/0.002, 1/mt.m)
	return SynthSpec{ID: fmt.Sprintf("%s-%d", mt.name, points), Lot: "L", Diameter: mt.diam, Gauge: mt.gage,
		E: mt.E, Rp: mt.Rp, Rm: rm, Uniform: mt.Ag, Elongation: mt.A, ReductionOfArea: 0.5,
		Points: points, Noise: noiseFrac * rm, Seed: seed, ConstantRate: rate}
}

// roMaterials span hardening exponents 5 to 30 and moduli 70 to 210 GPa.
var roMaterials = []roMaterial{
	{"austenitic-n5", 193000, 260, 5, 0.30, 0.45, 10, 50},
	{"annealed-al-n6", 69000, 60, 6, 0.20, 0.30, 8, 40},
	{"copper-n8", 117000, 120, 8, 0.25, 0.35, 10, 50},
	{"al-alloy-n15", 71000, 278, 15, 0.08, 0.125, 8, 40},
	{"steel-n20", 205000, 880, 20, 0.06, 0.14, 10, 50},
	{"ti-alloy-n30", 114000, 900, 30, 0.05, 0.12, 6, 30},
}

// errRow collects the largest absolute relative errors [%] of a case.
type errRow struct {
	E, Rp, Rm, Ag, A float64
	missing          []string
}

func (e *errRow) add(what string, got, want float64, to *float64) {
	if math.IsNaN(got) {
		e.missing = append(e.missing, what)
		return
	}
	*to = math.Max(*to, 100*math.Abs(got-want)/math.Abs(want))
}

// reduceErrors reduces one synthetic specimen and records its errors.
// A is the elongation from the record (the final gauge length would give
// it exactly).
func reduceErrors(t *testing.T, sp SynthSpec, row *errRow) *Result {
	t.Helper()
	r := reduceSpec(t, sp, Options{})
	row.add("E", r.Modulus, sp.E, &row.E)
	row.add("Rp0.2", r.Proof, sp.Rp, &row.Rp)
	row.add("Rm", r.Tensile, sp.Rm, &row.Rm)
	row.add("Ag", r.Uniform, sp.Uniform, &row.Ag)
	row.add("A", r.ExtensometerElongation, sp.Elongation, &row.A)
	return r
}

type accCase struct {
	points int
	noise  float64 // fraction of Rm
	seeds  int
}

// accCases are the point counts and noise levels of the accuracy grid.
// The cases of 200,000 points and more are heavy (see accHeavy).
var accCases = []accCase{
	{500, 0, 1}, {2000, 0, 1}, {20000, 0, 1}, {200000, 0, 1}, {1000000, 0, 1},
	{500, 0.001, 5}, {2000, 0.001, 5}, {20000, 0.001, 3}, {200000, 0.001, 1}, {1000000, 0.001, 1},
	{500, 0.002, 5}, {2000, 0.002, 5}, {20000, 0.002, 3}, {200000, 0.002, 1}, {1000000, 0.002, 1},
}

// accHeavy says whether a heavy case runs: with -short none; by default
// the 1,000,000-point records sampled evenly in time (as a frame logs)
// clean and with noise of 0.2 % of Rm, and the 200,000-point records
// sampled evenly in strain with that noise, for every material (18
// records); with LOTPROOF_ACCURACY_FULL=1 all of them (72 records).
func accHeavy(c accCase, rate bool) bool {
	switch {
	case c.points < 200000:
		return true
	case testing.Short():
		return false
	case os.Getenv("LOTPROOF_ACCURACY_FULL") != "":
		return true
	case c.points == 1000000:
		return rate && c.noise != 0.001
	}
	return !rate && c.noise == 0.002
}

// limits are the largest errors [%] a case may show.
type limits struct{ E, Rp, Rm, A float64 }

// accLimits are the targets of the issue: on clean curves E within 0.5 %,
// Rp0.2 within 0.2 %, Rm within 0.1 % and A within 0.2 %; with force noise
// up to 0.2 % of Rm, E within 1 %, Rp0.2 and Rm within 0.5 % (A: 0.5 %,
// this package's own limit; the issue names none).
func accLimits(noise float64) limits {
	if noise == 0 {
		return limits{0.5, 0.2, 0.1, 0.2}
	}
	return limits{1, 0.5, 0.5, 0.5}
}

// accRow is one line of the accuracy table.
type accRow struct {
	sampling string
	mt       roMaterial
	c        accCase
	errRow
}

// TestAccuracyTable reduces analytic Ramberg-Osgood curves (roMaterials:
// hardening exponents 5, 6, 8, 15, 20 and 30) with 500 to 1,000,000
// points and normal force noise of 0, 0.1 % and 0.2 % of Rm, sampled two
// ways: evenly in strain, and evenly in time under the strain rates of
// ISO 6892-1 method A (range 2, 0.00025 per second, to just past the
// proof strength, range 4, 0.0067 per second, after; clause 10.3, from
// memory), and checks the largest error of every case against the
// targets (accLimits); nothing may be missing. The checks and the rules
// they stand for: E, the modulus, against ASTM E111 (least squares over
// the elastic range, or the tangent modulus of a fitted curve); Rp0.2
// against ISO 6892-1 clause 12 and ASTM E8/E8M 7.7 (offset proof
// strength); Rm against ISO 6892-1 clause 19 (from the maximum force); A
// against clause 20 (elongation after fracture, here from the record at
// fracture less the elastic part); Ag (clause 16, plastic extension at
// maximum force) is shown, with no target. Clause numbers from memory.
// The heavy cases are chosen by accHeavy. With LOTPROOF_ACCURACY_TABLE=1
// the table is written to accuracy.md (run it with
// LOTPROOF_ACCURACY_FULL=1 for the whole grid).
func TestAccuracyTable(t *testing.T) {
	var rows []accRow
	for _, rate := range []bool{false, true} {
		smp := "strain"
		if rate {
			smp = "time"
		}
		for _, mt := range roMaterials {
			for _, c := range accCases {
				if !accHeavy(c, rate) {
					continue
				}
				row := accRow{sampling: smp, mt: mt, c: c}
				for seed := 1; seed <= c.seeds; seed++ {
					reduceErrors(t, mt.sampled(c.points, c.noise, uint64(seed), rate), &row.errRow)
				}
				rows = append(rows, row)
				l := accLimits(c.noise)
				where := fmt.Sprintf("%s, exponent %g, %d points, noise %.1f %% of Rm", smp, mt.m, c.points, 100*c.noise)
				if len(row.missing) > 0 {
					t.Errorf("%s: missing %q", where, row.missing)
				}
				if row.E > l.E {
					t.Errorf("%s: modulus off by %.3f %% (ASTM E111; target %.1f %%)", where, row.E, l.E)
				}
				if row.Rp > l.Rp {
					t.Errorf("%s: Rp0.2 off by %.3f %% (ISO 6892-1 clause 12, ASTM E8/E8M 7.7; target %.1f %%)", where, row.Rp, l.Rp)
				}
				if row.Rm > l.Rm {
					t.Errorf("%s: Rm off by %.3f %% (ISO 6892-1 clause 19; target %.1f %%)", where, row.Rm, l.Rm)
				}
				if row.A > l.A {
					t.Errorf("%s: A off by %.3f %% (ISO 6892-1 clause 20; target %.1f %%)", where, row.A, l.A)
				}
			}
		}
	}
	if os.Getenv("LOTPROOF_ACCURACY_TABLE") != "" {
		if err := os.WriteFile("accuracy.md", accuracyMarkdown(rows), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// accuracyMarkdown is the table of TestAccuracyTable as the markdown of
// accuracy.md.
func accuracyMarkdown(rows []accRow) []byte {
	var b strings.Builder
	b.WriteString(`# Accuracy of reduce on analytic Ramberg-Osgood records

Written by ` + "`LOTPROOF_ACCURACY_TABLE=1 LOTPROOF_ACCURACY_FULL=1 go test ./lots/reduce -run TestAccuracyTable`" + ` (about three CPU-minutes); do not edit by hand.

Each row is the largest absolute error, in % of the value the record was made with, over the seeds of one case: analytic curves strain = stress/E + 0.002 (stress/Rp0.2)^n up to Rm, a neck to fracture (` + "`Synthesize`" + `), with normal noise added to the force (its SD in % of Rm), sampled evenly in strain or evenly in time under the ISO 6892-1 method A strain rates. E: modulus (ASTM E111); Rp0.2: 0.2 % offset proof strength (ISO 6892-1, ASTM E8/E8M); Rm: tensile strength (ISO 6892-1); Ag: plastic extension at maximum force (no target); A: elongation after fracture from the record. Targets: clean E 0.5 %, Rp0.2 0.2 %, Rm 0.1 %, A 0.2 %; with noise up to 0.2 % of Rm E 1 %, Rp0.2 and Rm 0.5 % (A 0.5 %). Nothing was missing in any case unless the last column says so.

| material | E [GPa] | Rp0.2 [MPa] | exponent n |
|---|---:|---:|---:|
`)
	for _, mt := range roMaterials {
		fmt.Fprintf(&b, "| %s | %.0f | %.0f | %g |\n", mt.name, mt.E/1000, mt.Rp, mt.m)
	}
	b.WriteString("\n| sampling | n | points | noise % of Rm | seeds | E % | Rp0.2 % | Rm % | Ag % | A % | missing |\n|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---|\n")
	for _, r := range rows {
		fmt.Fprintf(&b, "| %s | %g | %d | %.1f | %d | %.3f | %.3f | %.3f | %.3f | %.3f | %s |\n",
			r.sampling, r.mt.m, r.c.points, 100*r.c.noise, r.c.seeds, r.E, r.Rp, r.Rm, r.Ag, r.A, strings.Join(r.missing, " "))
	}
	return []byte(b.String())
}

// TestDenseWithExtensometerNoise: a record of 200,000 points with force
// noise of 0.2 % of Rm and extensometer noise of 2e-6 strain (0.1 um on a
// 50 mm gauge length; ISO 9513 class 0.5 allows 1.5 um of resolution, so
// this is a quiet extensometer, from memory) keeps every property: E
// within 1 % (ASTM E111), Rp0.2 within 0.5 % (ISO 6892-1 clause 12), Rm
// within 0.5 % (clause 19). Points whose binned extension steps back are
// left out as before; the bins keep them few. Left out with -short.
func TestDenseWithExtensometerNoise(t *testing.T) {
	if testing.Short() {
		t.Skip("200,000-point records: left out with -short")
	}
	for _, mt := range []roMaterial{roMaterials[3], roMaterials[4]} {
		sp := mt.spec(200000, 0.002, 11)
		sp.StrainNoise = 2e-6
		var row errRow
		r := reduceErrors(t, sp, &row)
		if row.E > 1 || row.Rp > 0.5 || row.Rm > 0.5 || len(row.missing) > 0 {
			t.Errorf("%s: E %.3f %% Rp0.2 %.3f %% Rm %.3f %% missing %q warnings %q", mt.name, row.E, row.Rp, row.Rm, row.missing, r.Warnings)
		}
		if r.Bin != 10 {
			t.Errorf("%s: %d points a bin, want 10", mt.name, r.Bin)
		}
	}
}

// TestGradualOtherForm: a curve that yields gradually but is not of the
// Ramberg-Osgood form, stress = sy tanh(E strain / sy) + H strain (its
// tangent at zero stress is E + H, hand-derived), is not forced into the
// Ramberg-Osgood fit: the fit leaves residuals above the noise, so the
// straight window gives the modulus, within 0.5 % on the clean curve
// (ASTM E111 least squares over the straight range) and within 2.5 % with
// noise of 0.1 % of the top stress on 500 and 2,000 points (where the
// straight part is short).
func TestGradualOtherForm(t *testing.T) {
	const E, sy, H = 200000.0, 300.0, 1000.0
	for _, nz := range []float64{0, 0.5} {
		for _, npts := range []int{500, 2000} {
			rng := rand.New(rand.NewPCG(1, 2))
			var x, s []float64
			for i := 0; i < npts; i++ {
				e := 0.2 * math.Pow(float64(i)/float64(npts-1), 2)
				x = append(x, e)
				s = append(s, sy*math.Tanh(E*e/sy)+H*e+nz*rng.NormFloat64())
			}
			x, s = append(x, 0.2005), append(s, 1)
			r := reduceBytes(t, record("T", x, s))
			tol := 0.005
			if nz > 0 {
				tol = 0.025
			}
			relNear(t, fmt.Sprintf("modulus, noise %g MPa, %d points", nz, npts), r.Modulus, E+H, tol)
			if strings.Contains(r.FitMethod, "Ramberg-Osgood") {
				t.Errorf("noise %g, %d points: method %q", nz, npts, r.FitMethod)
			}
		}
	}
}

// twoStageStrain is the strain at stress sg of the two-stage curve of
// stainless steel (Rasmussen, Journal of Constructional Steel Research
// 59, 2003, from memory) with strain offset e0, modulus E, 0.2 % proof
// strength rp, first power n, and second multiple k and power m: below
// rp strain = e0 + sg/E + 0.002 (sg/rp)^n; above it strain = e0 + rp/E
// + 0.002 + (sg - rp)/E2 + k (sg - rp)^m with E2 = E/(1 + 0.002 n E/rp),
// the tangent at rp.
func twoStageStrain(e0, E, rp, n, k, m, sg float64) float64 {
	if sg <= rp {
		return e0 + sg/E + 0.002*math.Pow(sg/rp, n)
	}
	e2 := E / (1 + 0.002*n*E/rp)
	return e0 + rp/E + 0.002 + (sg-rp)/e2 + k*math.Pow(sg-rp, m)
}

// twoStageBound is the Cramér-Rao lower bound (Cramér 1946, section
// 32.3; Rao 1945; see modulusBound) on the relative standard deviation of
// any unbiased estimate of the modulus from points of stress s (made
// without noise) on the two-stage curve of twoStageStrain, normal stress
// noise of SD noise, with all six parameters free (e0, ln E, ln rp, n,
// ln k, m): the (ln E, ln E) element of the inverse of the Fisher
// information sum of g g' / noise^2, g the derivatives of the curve's
// stress at each point's strain (implicit differentiation, the
// derivatives of the strain by central differences; gonum mat).
func twoStageBound(t *testing.T, s []float64, th [6]float64, noise float64) float64 {
	t.Helper()
	strain := func(th [6]float64, sg float64) float64 {
		return twoStageStrain(th[0], math.Exp(th[1]), math.Exp(th[2]), th[3], math.Exp(th[4]), th[5], sg)
	}
	var rows []float64
	for _, sg := range s {
		if !(sg > 0) {
			continue
		}
		h := 1e-6 * sg
		ds := (strain(th, sg+h) - strain(th, sg-h)) / (2 * h)
		for j := range th {
			d := 1e-6 * math.Max(1e-3, math.Abs(th[j]))
			if j == 0 {
				d = 1e-9
			}
			t1, t2 := th, th
			t1[j] += d
			t2[j] -= d
			rows = append(rows, -(strain(t1, sg)-strain(t2, sg))/(2*d)/ds/noise)
		}
	}
	return boundOfSecond(t, rows, 6)
}

// TestTwoStageCurve: a gradually yielding curve whose power changes at
// the proof strength, as stainless steels do (the two-stage form of
// Rasmussen 2003, twoStageStrain, with m = 1 + 3.5 Rp0.2/Rm and k =
// eu'/(Rm - Rp0.2)^m, eu' = eu - Rp0.2/E - 0.002 - (Rm - Rp0.2)/E2), on
// 2,000 points, a quarter up to 1 % strain (E 200 GPa, Rp0.2 280 MPa, Rm
// 640 MPa, n 6, eu 0.5: values in the range of austenitic stainless
// steel, common practice). One Ramberg-Osgood power does not hold beyond
// Rp0.2, so the modulus fit must stop there. Clean: E within 0.5 % (ASTM
// E111) and Rp0.2 within 0.2 % (ISO 6892-1 clause 12, from memory). With
// force noise of 0.2 % of Rm, 40 seeds: Rp0.2 within 0.5 % and, for the
// modulus, no bias (the mean error within three standard errors of the
// mean, the RMS error over the square root of the number of seeds), an
// RMS error no more than 1.1 times the Cramér-Rao bound of the two-stage
// form with its six parameters free (twoStageBound, about 0.53 %), the
// error within three times the standard error the fit states, and E
// within 1.5 % on every seed. The 1 % on every seed is out of
// reach on this record: with a bound of 0.53 % on the standard deviation
// of any unbiased estimate, one seed in sixteen or so falls outside 1 %
// whatever the method.
func TestTwoStageCurve(t *testing.T) {
	const E, rp, rm, n, eu = 200000.0, 280.0, 640.0, 6.0, 0.5
	e2 := E / (1 + 0.002*n*E/rp)
	m := 1 + 3.5*rp/rm
	k := (eu - rp/E - 0.002 - (rm-rp)/e2) / math.Pow(rm-rp, m)
	const pts, seeds = 2000, 40
	// curve returns the strains (a quarter of the points up to 1 %, the
	// rest beyond) and the stresses on the curve there (bisection).
	curve := func() (x, s []float64) {
		for i := 0; i < pts; i++ {
			e := 0.01 * float64(i) / (pts / 4)
			if i >= pts/4 {
				e = 0.01 + (eu-0.01)*float64(i-pts/4)/(pts-pts/4)
			}
			lo, hi := 0.0, rm
			for it := 0; it < 100; it++ {
				if mid := (lo + hi) / 2; twoStageStrain(0, E, rp, n, k, m, mid) < e {
					lo = mid
				} else {
					hi = mid
				}
			}
			x, s = append(x, e), append(s, (lo+hi)/2)
		}
		return x, s
	}
	x0, s0 := curve()
	bound := twoStageBound(t, s0, [6]float64{0, math.Log(E), math.Log(rp), n, math.Log(k), m}, 0.002*rm)
	for _, nz := range []float64{0, 0.002} {
		var sum, sq, worst float64
		for seed := uint64(1); seed <= seeds; seed++ {
			rng := rand.New(rand.NewPCG(seed, 3))
			s := make([]float64, len(s0))
			for i := range s0 {
				s[i] = s0[i] + nz*rm*rng.NormFloat64()
			}
			x := append(append([]float64(nil), x0...), eu+0.01)
			s = append(s, 1)
			r := reduceBytes(t, record("TS", x, s))
			name := fmt.Sprintf("noise %.1f %% seed %d", 100*nz, seed)
			if nz == 0 {
				relNear(t, name+": modulus (ASTM E111)", r.Modulus, E, 0.005)
				relNear(t, name+": proof (ISO 6892-1 clause 12)", r.Proof, rp, 0.002)
				if seed > 1 {
					break
				}
				continue
			}
			relNear(t, name+": modulus (ASTM E111)", r.Modulus, E, 0.015)
			relNear(t, name+": proof (ISO 6892-1 clause 12)", r.Proof, rp, 0.005)
			e := r.Modulus/E - 1
			if math.IsNaN(e) || math.Abs(e) > 3*r.Fit.SlopeRelSE {
				t.Errorf("%s: modulus off by %.3f %%, beyond three times its stated standard error %.3f %%", name, 100*e, 100*r.Fit.SlopeRelSE)
			}
			sum += e
			sq += e * e
			worst = math.Max(worst, math.Abs(e))
		}
		if nz == 0 {
			continue
		}
		mean, rms := sum/seeds, math.Sqrt(sq/seeds)
		t.Logf("two-stage curve, noise %.1f %% of Rm, %d seeds: modulus mean error %.3f %%, RMS %.3f %%, worst %.3f %%, Cramér-Rao bound %.3f %%", 100*nz, seeds, 100*mean, 100*rms, 100*worst, 100*bound)
		if math.Abs(mean) > 3*rms/math.Sqrt(seeds) {
			t.Errorf("modulus biased: mean error %.3f %% beyond three standard errors of the mean %.3f %%", 100*mean, 100*rms/math.Sqrt(seeds))
		}
		if rms > 1.1*bound {
			t.Errorf("modulus RMS error %.3f %% above 1.1 times the Cramér-Rao bound %.3f %%", 100*rms, 100*bound)
		}
	}
}

// modulusBound is the Cramér-Rao lower bound (Cramér, Mathematical
// Methods of Statistics, 1946, section 32.3; Rao, Bulletin of the
// Calcutta Mathematical Society 37, 1945) on the relative standard
// deviation of any unbiased estimate of the modulus from the points of
// the record sp (made without noise) up to the maximum force, for normal
// stress noise of SD sp.Noise and the Ramberg-Osgood form with its four
// parameters free, strain = e0 + stress/E + 0.002 (stress/Rp)^m with
// e0, ln E, ln of the multiple and m unknown: the (ln E, ln E) element of
// the inverse of the Fisher information sum of g g' / sigma^2, with g the
// derivatives of the curve's stress at each point's strain (implicit
// differentiation: d stress/d theta = -(d strain/d theta)/(d strain/d
// stress); gonum mat).
func modulusBound(t *testing.T, sp SynthSpec) float64 {
	t.Helper()
	noise := sp.Noise
	sp.Noise = 0
	rec := synthRecord(t, sp)
	f, x, _ := pointsOf(rec)
	m := math.Log(sp.Uniform/0.002) / math.Log(sp.Rm/sp.Rp)
	var rows []float64
	for i := range x {
		s := f[i] / rec.Area
		if x[i] > sp.Rm/sp.E+sp.Uniform || !(s > 0) {
			continue
		}
		u := s / sp.Rp
		p := 0.002 * math.Pow(u, m)
		ds := 1/sp.E + 0.002*m/sp.Rp*math.Pow(u, m-1)
		for _, d := range []float64{1, -s / sp.E, p, p * math.Log(u)} {
			rows = append(rows, -d/ds/noise)
		}
	}
	return boundOfSecond(t, rows, 4)
}

// boundOfSecond is the Cramér-Rao bound on the standard deviation of the
// second of k parameters (the modulus), from the rows of the Jacobian of
// the noise-scaled residuals (k values a row): the square root of the
// (1, 1) element of the inverse of the Fisher information J'J (Cramér
// 1946; Rao 1945).
func boundOfSecond(t *testing.T, rows []float64, k int) float64 {
	t.Helper()
	J := mat.NewDense(len(rows)/k, k, rows)
	var F mat.SymDense
	F.SymOuterK(1, J.T())
	var ch mat.Cholesky
	if !ch.Factorize(&F) {
		t.Fatal("singular information matrix")
	}
	var C mat.SymDense
	if err := ch.InverseTo(&C); err != nil {
		t.Fatal(err)
	}
	return math.Sqrt(C.At(1, 1))
}

// TestGradualNoisyManySeeds: the gradually yielding materials of
// roMaterials (hardening exponents 5 and 6), 500 and 2,000 points sampled
// evenly in strain and evenly in time (ISO 6892-1 method A rates), force
// noise of 0.2 % of Rm, 40 seeds each (320 records). Every record: Rp0.2
// within 0.5 % (ISO 6892-1 clause 12, ASTM E8/E8M 7.7), Rm within 0.5 %
// (ISO 6892-1 clause 19), nothing missing. The modulus (ASTM E111,
// tangent modulus of the fitted curve): within 1 % on 2,000 points (the
// issue's target). On 500 points no estimate can hold 1 % on every seed:
// the Cramér-Rao bound on its standard deviation (modulusBound) is 0.6 %
// to 0.7 % there, so one record in seven or so falls outside 1 % whatever
// the method; there the test checks that the estimate is as good as the
// bound allows (its RMS error over the 80 records of a material no more
// than 1.1 times the bound's RMS) and that the standard error the fit
// states covers the error (within three of it on every seed). Clause
// numbers from memory.
func TestGradualNoisyManySeeds(t *testing.T) {
	const seeds = 40
	for _, mt := range []roMaterial{roMaterials[0], roMaterials[1]} {
		for _, pts := range []int{500, 2000} {
			var sq, bsq float64
			worst := 0.0
			for _, rate := range []bool{false, true} {
				bound := modulusBound(t, mt.sampled(pts, 0.002, 1, rate))
				for seed := uint64(1); seed <= seeds; seed++ {
					sp := mt.sampled(pts, 0.002, seed, rate)
					r := reduceSpec(t, sp, Options{})
					name := fmt.Sprintf("%s %d points rate %v seed %d", mt.name, pts, rate, seed)
					relNear(t, name+": Rp0.2 (ISO 6892-1 clause 12)", r.Proof, sp.Rp, 0.005)
					relNear(t, name+": Rm (ISO 6892-1 clause 19)", r.Tensile, sp.Rm, 0.005)
					e := r.Modulus/sp.E - 1
					if pts >= 2000 {
						relNear(t, name+": E (ASTM E111)", r.Modulus, sp.E, 0.01)
					} else if math.IsNaN(e) || math.Abs(e) > 3*r.Fit.SlopeRelSE {
						t.Errorf("%s: E (ASTM E111) off by %.3f %%, beyond three times its stated standard error %.3f %%", name, 100*e, 100*r.Fit.SlopeRelSE)
					}
					sq += e * e
					bsq += bound * bound
					worst = math.Max(worst, math.Abs(e))
				}
			}
			rms, brms := math.Sqrt(sq/(2*seeds)), math.Sqrt(bsq/(2*seeds))
			t.Logf("%s %d points: modulus RMS error %.3f %%, worst %.3f %%, Cramér-Rao bound %.3f %%", mt.name, pts, 100*rms, 100*worst, 100*brms)
			if rms > 1.1*brms {
				t.Errorf("%s %d points: modulus RMS error %.3f %% above 1.1 times the Cramér-Rao bound %.3f %%", mt.name, pts, 100*rms, 100*brms)
			}
		}
	}
}
