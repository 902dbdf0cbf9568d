package reduce

import (
	"fmt"
	"math"
	"sort"

	"lotproof/stats"
)

// Glitch is a point, or a short run of points, that departs from its
// neighbours by far more than the record's own noise: a force dropout or
// spike, an extension spike, or an extension step (the extensometer
// slipping).
type Glitch struct {
	Line, LastLine int     // file lines of the first and last point
	Points         int     // points in the run
	Series         string  // "force" or "extension"
	Kind           string  // "spike", "dropout", "excursion" (a jump and back), "step" or "repeat"
	Size           float64 // departure from the neighbours' trend [MPa or strain]
	Noise          float64 // the series' noise SD [MPa or strain]
	Threshold      float64 // the departure that counts as a glitch
	from, to       int     // raw point indices [from, to)
	at             float64 // strain before a step
	atStress       float64 // stress before a force step [MPa]
}

// glitchSide is the number of neighbours on each side whose straight line
// predicts a point.
const glitchSide = 5

// maxSpikeRun is the longest run of points treated as one spike; longer
// departures are found as a pair of opposite steps (maxStepPair points
// apart at most).
const (
	maxSpikeRun = 3
	maxStepPair = 200
)

// maxGlitches is the most glitches (spikes, dropouts and steps of one
// series, or all of them together) a record may hold; a record with more
// is refused (it is not a clean tensile record, and every glitch is
// listed in the audit).
const maxGlitches = 1000

// minSerrations is the fewest force falls (and no force rise) that make
// serrated flow rather than glitches.
const minSerrations = 3

// sideLine fits a least-squares straight line to v(k), k in [a, b), with
// the index as abscissa and returns its value at index t.
func sideLine(v func(int) float64, a, b int) (mean, slope, centre float64) {
	n := float64(b - a)
	centre = float64(a+b-1) / 2
	var sy, sxy, sxx float64
	for k := a; k < b; k++ {
		y := v(k)
		d := float64(k) - centre
		sy += y
		sxy += d * y
		sxx += d * d
	}
	return sy / n, sxy / sxx, centre
}

// findGlitches looks for glitches in the series v(0..n-1) (time order).
// A point i is predicted twice: by the least-squares line through the
// glitchSide points before it, extrapolated forward, and by the line
// through the glitchSide points after the run, extrapolated back. A run
// of 1 to maxSpikeRun points is a spike (or dropout) when every point of
// it departs from both predictions by more than thr in the same
// direction while the two predictions agree with each other to within
// half that departure, i.e. the curve continues across the run as if it
// were not there. A point that departs from the forward prediction while
// the line after it, extrapolated back, misses the point before it by
// about the same amount in the other direction, with both lines of
// similar slope, is a step: the series jumped and stayed. Two opposite
// steps of similar size at most maxStepPair points apart are one run to
// be left out. Real features are not glitches under these rules: a yield
// drop or the fracture changes the slope, a peak or a turn of an
// unload-reload loop lies on the line before it, a change of the test
// speed is a kink, not a jump. The rule is this package's own; the noise
// SD is the robust estimate of noiseSD (median absolute second
// difference).
func findGlitches(n int, v func(int) float64, thr float64, series string) (spikes []Glitch, steps []Glitch, over bool) {
	h := glitchSide
	spikeEnd := 0 // end of the last spike: no step is judged on a line through it
	for i := h; i+h < n && len(spikes)+len(steps) <= maxGlitches; i++ {
		mL, bL, cL := sideLine(v, i-h, i)
		predL := func(k int) float64 { return mL + bL*(float64(k)-cL) }
		dL := v(i) - predL(i)
		if math.Abs(dL) <= thr {
			continue
		}
		found := false
		for L := 1; L <= maxSpikeRun && i+L+h <= n; L++ {
			mR, bR, cR := sideLine(v, i+L, i+L+h)
			ok := true
			minDev := math.Inf(1)
			for k := i; k < i+L && ok; k++ {
				pl, pr := predL(k), mR+bR*(float64(k)-cR)
				a, b := v(k)-pl, v(k)-pr
				if math.Signbit(a) != math.Signbit(dL) || math.Signbit(b) != math.Signbit(dL) ||
					math.Abs(a) <= thr || math.Abs(b) <= thr || math.Abs(pl-pr) >= 0.5*math.Min(math.Abs(a), math.Abs(b)) {
					ok = false
				}
				minDev = math.Min(minDev, math.Min(math.Abs(a), math.Abs(b)))
			}
			if ok {
				kind := "spike"
				if dL < 0 {
					kind = "dropout"
				}
				spikes = append(spikes, Glitch{Points: L, Series: series, Kind: kind, Size: math.Copysign(minDev, dL), Threshold: thr, from: i, to: i + L})
				spikeEnd = i + L
				i += L - 1
				found = true
				break
			}
		}
		if found || i-h < spikeEnd {
			continue
		}
		// A step: the line after i, extrapolated back to i-1, misses v(i-1)
		// by about -dL, and both lines have about the same slope.
		mR, bR, cR := sideLine(v, i, i+h)
		dR := v(i-1) - (mR + bR*(float64(i-1)-cR))
		if math.Signbit(dR) != math.Signbit(dL) && math.Abs(dR) > thr && math.Abs(bL-bR) < 0.25*math.Abs(dL) &&
			math.Abs(math.Abs(dR)-math.Abs(dL)) < 0.5*math.Abs(dL) {
			steps = append(steps, Glitch{Points: 1, Series: series, Kind: "step", Size: dL, Threshold: thr, from: i, to: i + 1})
			i += h - 1
		}
	}
	// A force step among the first glitchSide points: see startStep (a
	// shift of every strain from the first points on is taken out by the
	// toe compensation).
	first := 0
	if series == "force" {
		if i, d := startStep(n, v, thr); i > 0 {
			steps = append([]Glitch{{Points: 1, Series: series, Kind: "step", Size: d, Threshold: thr, from: i, to: i + 1}}, steps...)
			first = i
		}
	}
	// The first and last glitchSide points have fewer neighbours on one
	// side: see edgeRun. Among the first ones, runs judged on both sides
	// come first (the points before such a run lie on the trend, so no
	// run is looked for among them); then runs judged on one side.
	add := func(i, L int, dev float64) {
		kind := "spike"
		if dev < 0 {
			kind = "dropout"
		}
		spikes = append(spikes, Glitch{Points: L, Series: series, Kind: kind, Size: dev, Threshold: thr, from: i, to: i + L})
	}
	for i := first; i < min(h, n); i++ {
		if L, dev := edgeRun(n, v, i, thr, series == "force", true); L > 0 {
			add(i, L, dev)
			i += L - 1
			first = i + 1
		}
	}
	for i := first; i < n; i++ {
		if i == h && n-h > i {
			i = n - h
		}
		L, dev := edgeRun(n, v, i, thr, series == "force", false)
		if L == 0 {
			continue
		}
		if i < h && len(spikes) > 0 && i < spikes[len(spikes)-1].to {
			continue
		}
		add(i, L, dev)
		i += L - 1
	}
	sortGlitches(spikes)
	if len(spikes)+len(steps) > maxGlitches {
		return nil, nil, true
	}
	// Pair opposite steps of similar size into runs.
	var lone []Glitch
	for k := 0; k < len(steps); k++ {
		s := steps[k]
		if k+1 < len(steps) {
			t := steps[k+1]
			if t.from-s.from <= maxStepPair && math.Signbit(t.Size) != math.Signbit(s.Size) &&
				math.Abs(s.Size+t.Size) < 0.3*math.Abs(s.Size) {
				spikes = append(spikes, Glitch{Points: t.from - s.from, Series: series, Kind: "excursion", Size: s.Size, Threshold: thr, from: s.from, to: t.from})
				k++
				continue
			}
		}
		lone = append(lone, s)
	}
	return spikes, lone, false
}

// startStep finds a step among the first glitchSide points of the
// series: the least-squares line through the glitchSide points from i
// on (1 <= i < glitchSide) is straight within half the threshold, the
// points before i depart from it, extrapolated back, by more than the
// threshold on average and each by more than half of it, in the same
// direction, by amounts that agree within half the threshold (the points
// before run parallel to the line after: a jump, not the bend of a toe),
// and the first point lies within the threshold of zero and nearer zero
// than the line's value there (the record starts from zero force and the
// jump moved the rest off it: a first point far from zero with the line
// after it through zero is a spike, see edgeRun; a record that starts at
// a preload, or a curve that bends from its first point on, is not
// judged here). It returns i and the jump v(i) less the level before it
// (0, 0 when none; the first i that qualifies). The rule is this
// package's own.
func startStep(n int, v func(int) float64, thr float64) (int, float64) {
	h := glitchSide
	for i := 1; i < h && i+h <= n; i++ {
		m, b, c := sideLine(v, i, i+h)
		pred := func(k int) float64 { return m + b*(float64(k)-c) }
		straight := true
		for k := i; k < i+h && straight; k++ {
			straight = math.Abs(v(k)-pred(k)) <= thr/2
		}
		if !straight {
			continue
		}
		lo, hi, sum := math.Inf(1), math.Inf(-1), 0.0
		for k := 0; k < i; k++ {
			d := v(k) - pred(k)
			lo, hi, sum = math.Min(lo, d), math.Max(hi, d), sum+d
		}
		mean := sum / float64(i)
		same := math.Abs(mean) > thr && (lo > thr/2 || hi < -thr/2) && hi-lo <= thr/2
		if same && math.Abs(v(0)) <= thr && math.Abs(v(0)) < math.Abs(pred(0)) {
			return i, -mean
		}
	}
	return 0, 0
}

// strainSlope is the least-squares slope of stress on strain over points
// a..b-1 and its standard error (ok false with fewer than 3 points or no
// spread of the strain).
func strainSlope(stressAt, strainAt func(int) float64, a, b int) (k, se float64, ok bool) {
	n := float64(b - a)
	if b-a < 3 {
		return 0, 0, false
	}
	var sx, sy float64
	for i := a; i < b; i++ {
		sx += strainAt(i)
		sy += stressAt(i)
	}
	mx, my := sx/n, sy/n
	var sxx, sxy, syy float64
	for i := a; i < b; i++ {
		dx, dy := strainAt(i)-mx, stressAt(i)-my
		sxx += dx * dx
		sxy += dx * dy
		syy += dy * dy
	}
	if !(sxx > 0) {
		return 0, 0, false
	}
	k = sxy / sxx
	return k, math.Sqrt(math.Max(0, syy-k*sxy) / (n - 2) / sxx), true
}

// edgeLine fits the least-squares line through v(a..b-1) when it holds
// at least 2 points and returns its value at index k; ok is false when a
// point of it lies more than tol off the line (the side is not straight,
// e.g. it straddles the fracture).
func edgeLine(v func(int) float64, a, b, k int, tol float64) (pred float64, ok bool) {
	if b-a < 2 {
		return 0, false
	}
	m, sl, c := sideLine(v, a, b)
	for j := a; j < b; j++ {
		if math.Abs(v(j)-(m+sl*(float64(j)-c))) > tol {
			return 0, false
		}
	}
	return m + sl*(float64(k)-c), true
}

// edgeRun judges a run of 1 to maxSpikeRun points starting at i among
// the first or last glitchSide points of the series, where one side has
// fewer than glitchSide neighbours. Each side is the least-squares line
// through up to glitchSide neighbours (at least 3), or through the 3
// nearest when the longer line is not straight within half the
// threshold (the 2 nearest before the point, when they agree within
// twice the threshold, at the end of the force series, where the points after the
// fracture may be few); a side that is not straight either way is not used. The
// run is a spike or dropout when both sides are usable, every point of
// it departs from both predictions in the same direction by more than the
// threshold and the two predictions agree with each other to within half
// that departure, or it departs from both by more than twice the
// threshold (at the fracture the two sides disagree), and it departs by
// more than the threshold from a least-squares parabola through the
// neighbours on both sides as well (the bend of a toe is no glitch). With one side usable only a rise counts (a fall at the
// end is the fracture, before the first points the loading had not
// started), and only by more than twice the threshold plus the side's
// bend (the gap between its line and a least-squares parabola through the
// same points, at the point judged; at the end of the record the side
// after, the fracture's tail, is never used alone); at the end of the
// record a series
// is judged on one side only when endOneSided is set (the force: after
// the fracture it stays near zero, while the extension after the
// fracture means nothing) and twoSided is not set. Among the first
// points, one or two points before the run that lie within half the
// threshold plus the side's bend of the line after it, extrapolated back,
// make that line the trend on both sides. It returns the run length (0: none)
// and the smallest departure, signed. The rule is this package's own.
func edgeRun(n int, v func(int) float64, i int, thr float64, endOneSided, twoSided bool) (int, float64) {
	h := glitchSide
	// side returns the prediction at k of the line through v(a..b-1) (or
	// its 3 points nearest the run) and the gap between that line and a
	// parabola through the same points, at k (the bend of the side).
	side := func(a, b, k int, near bool) (pred, bend float64, ok bool) {
		var p float64
		if b-a >= 3 {
			p, ok = edgeLine(v, a, b, k, thr/2)
		}
		for m := 3; !ok && m >= 2; m-- {
			if b-a < m || (b-a == m && m == 3) || (m == 2 && !(near && endOneSided)) {
				continue
			}
			if near {
				a = b - m
			} else {
				b = a + m
			}
			if m == 2 && math.Abs(v(a)-v(a+1)) > 2*thr {
				continue // two points make a level only when they agree
			}
			p, ok = edgeLine(v, a, b, k, thr/2)
		}
		if !ok {
			return 0, 0, false
		}
		if b-a >= 4 {
			xs, ys := make([]float64, 0, b-a), make([]float64, 0, b-a)
			for j := a; j < b; j++ {
				xs, ys = append(xs, float64(j)), append(ys, v(j))
			}
			xc, w := float64(a+b-1)/2, float64(b-a)
			if c, good := quadFit(xs, ys, xc, w); good {
				u := (float64(k) - xc) / w
				bend = math.Abs(c[0] + c[1]*u + c[2]*u*u - p)
			}
		}
		return p, bend, true
	}
	for L := 1; L <= maxSpikeRun && i+L <= n; L++ {
		ok := true
		sign := 0.0
		minDev := math.Inf(1)
		for k := i; k < i+L && ok; k++ {
			pl, bl, okL := side(max(0, i-h), i, k, true)
			pr, br, okR := side(i+L, min(n, i+L+h), k, false)
			// Among the first points, one or two points before the run
			// that lie on the line after it, extrapolated back, confirm
			// that line as the trend on both sides.
			if !okL && okR && i > 0 && i < 3 {
				on := true
				for j := 0; j < i && on; j++ {
					p, bend, good := side(i+L, min(n, i+L+h), j, false)
					on = good && math.Abs(v(j)-p) <= thr/2+bend
				}
				if on {
					pl, bl, okL = pr, br, true
				}
			}
			if !okL && !okR {
				ok = false
				break
			}
			// One side alone: a fall is the fracture (at the end) or the
			// start of the loading (at the start), a rise must exceed
			// twice the threshold and the side's bend.
			if okL != okR && twoSided {
				ok = false
				break
			}
			if okL != okR {
				// At the end, the points after are the fracture's tail:
				// they judge nothing alone.
				if (okL && !endOneSided) || (okR && i >= n-h) {
					ok = false
					break
				}
				p, bend := pl, bl
				if okR {
					p, bend = pr, br
				}
				d := v(k) - p
				if d < 0 || d <= 2*thr+bend || (sign != 0 && sign < 0) {
					ok = false
					break
				}
				sign = 1
				minDev = math.Min(minDev, d)
				continue
			}
			for _, d := range []float64{v(k) - pl, v(k) - pr} {
				if sign == 0 {
					sign = math.Copysign(1, d)
				}
				if math.Abs(d) <= thr || math.Copysign(1, d) != sign {
					ok = false
				}
				minDev = math.Min(minDev, math.Abs(d))
			}
			if ok && math.Abs(pl-pr) >= 0.5*minDev && minDev <= 2*thr {
				ok = false
			}
			// A bend of the curve (the toe) is not a glitch: the point must
			// also depart from a parabola through the neighbours on both
			// sides.
			if ok {
				var xs, ys []float64
				for j := max(0, i-h); j < min(n, i+L+h); j++ {
					if j < i || j >= i+L {
						xs, ys = append(xs, float64(j)), append(ys, v(j))
					}
				}
				if c, good := quadFit(xs, ys, float64(i), float64(h+L+1)); good {
					u := float64(k-i) / float64(h+L+1)
					if math.Abs(v(k)-(c[0]+c[1]*u+c[2]*u*u)) <= thr {
						ok = false
					}
				}
			}
		}
		if ok {
			return L, math.Copysign(minDev, sign)
		}
	}
	return 0, 0
}

// binTarget is the number of working points a dense record is averaged
// down to (bins of k consecutive points, k = ceil(n / binTarget)).
const binTarget = 20000

// rawNoise is noiseSD over the raw series v(0..n-1), with the absolute
// second differences held as float32 (4 bytes a point).
func rawNoise(n int, v func(int) float64) float64 {
	const normQ75 = 0.6744897501960817
	if n < 3 {
		return 0
	}
	d := make([]float32, n-2)
	a, b := v(0), v(1)
	for i := 2; i < n; i++ {
		c := v(i)
		d[i-2] = float32(math.Abs(a - 2*b + c))
		a, b = b, c
	}
	return float64(stats.SelectKth(d, len(d)/2)) / (normQ75 * math.Sqrt(6))
}

// glitches finds force and extension glitches in the raw points, leaves
// spikes, dropouts and paired steps out (res.left) with a located warning
// each, and records lone extension and force steps (res.steps), which
// shift every later strain or stress.
func (res *Result) glitches(rec *Record, n int, stressAt, strainAt func(int) float64, smRaw, xMax float64) {
	thrS := math.Max(10*res.RawNoise, 0.005*smRaw)
	thrX := math.Max(10*res.StrainNoise, 1e-5)
	fs, fsteps, over1 := findGlitches(n, stressAt, thrS, "force")
	xs, xsteps, over2 := findGlitches(n, strainAt, thrX, "extension")
	if over1 || over2 || len(fs)+len(xs)+len(xsteps)+len(fsteps) > maxGlitches {
		res.tooMany = true
		return
	}
	for i := range fs {
		fs[i].Noise = res.RawNoise
	}
	for i := range xs {
		xs[i].Noise = res.StrainNoise
	}
	for i := range xsteps {
		xsteps[i].Noise = res.StrainNoise
	}
	all := append(fs, xs...)
	// A backward extension step where the points repeat earlier points
	// exactly is a data block written twice.
	// An extension jump with the force falling or rising abruptly at the
	// same point is the material yielding (a Lüders band, a yield drop),
	// not the extensometer slipping.
	var lone []Glitch
	for _, g := range xsteps {
		if g.from >= glitchSide {
			m, b, c := sideLine(stressAt, g.from-glitchSide, g.from)
			if math.Abs(stressAt(g.from)-(m+b*(float64(g.from)-c))) > thrS {
				continue
			}
		}
		if g.Size < 0 {
			if p, L := rawRepeat(rec, g.from); L >= 3 {
				_, _, pl := rec.Point(p)
				_, _, pe := rec.Point(p + L - 1)
				all = append(all, Glitch{Series: "data", Kind: "repeat", from: g.from, to: g.from + L, Size: float64(pl), Threshold: float64(pe)})
				continue
			}
		}
		lone = append(lone, g)
	}
	xsteps = lone
	// A lone force step (the force jumps and stays while the extension
	// goes on smoothly: the load cell or its amplifier jumped) shifts
	// every later stress. A fall to below a tenth of the highest force
	// is the fracture; a jump of the extension at the same point is the
	// material yielding.
	var flone []Glitch
	for _, g := range fsteps {
		start := g.from < glitchSide
		if !start && math.Min(stressAt(g.from), stressAt(g.from-1)) < 0.1*smRaw {
			continue
		}
		if g.from >= glitchSide {
			m, b, c := sideLine(strainAt, g.from-glitchSide, g.from)
			if math.Abs(strainAt(g.from)-(m+b*(float64(g.from)-c))) > thrX {
				continue
			}
		}
		// The stress-strain slope goes on across a step; a yield drop
		// turns the elastic slope into a plateau.
		// (Among the first points there may be too few before the step to
		// judge the slope.)
		kL, seL, okL := strainSlope(stressAt, strainAt, max(0, g.from-2*glitchSide), g.from)
		kR, seR, okR := strainSlope(stressAt, strainAt, g.from, min(n, g.from+2*glitchSide))
		if !(start && g.from < 3) && (!okL || !okR || math.Abs(kL-kR) > 0.5*math.Max(math.Abs(kL), math.Abs(kR))+3*math.Hypot(seL, seR)) {
			continue
		}
		g.Noise = res.RawNoise
		g.atStress = stressAt(g.from - 1)
		flone = append(flone, g)
	}
	// Three or more force falls past the first points and no rise are
	// serrated flow (the Portevin-Le Chatelier effect, discontinuous
	// yielding in bands: the force falls abruptly and climbs back, again
	// and again): the material's own response, kept as recorded.
	var falls []Glitch
	rise := false
	for _, g := range flone {
		if g.from >= glitchSide {
			if g.Size < 0 {
				falls = append(falls, g)
			} else {
				rise = true
			}
		}
	}
	if len(falls) >= minSerrations && !rise {
		lo, hi := math.Inf(1), 0.0
		for _, g := range falls {
			lo, hi = math.Min(lo, -g.Size), math.Max(hi, -g.Size)
		}
		_, _, l1 := rec.Point(falls[0].from)
		_, _, l2 := rec.Point(falls[len(falls)-1].from)
		res.note("serrated flow: %d abrupt force falls of %.3g to %.3g MPa between lines %d and %d, each followed by a climb back and none by a jump up: taken as the material's own response (the Portevin-Le Chatelier effect), not as glitches; the curve is used as recorded",
			len(falls), lo, hi, l1, l2)
		var keep []Glitch
		for _, g := range flone {
			if g.from < glitchSide {
				keep = append(keep, g)
			}
		}
		flone = keep
	}
	xsteps = append(xsteps, flone...)
	sortGlitches(xsteps)
	sortGlitches(all)
	// Overlapping runs (a dropout that is also an extension spike) merge.
	var left []Glitch
	for _, g := range all {
		if k := len(left) - 1; k >= 0 && g.from < left[k].to {
			left[k].to = max(left[k].to, g.to)
			continue
		}
		left = append(left, g)
	}
	for i := range left {
		_, _, left[i].Line = rec.Point(left[i].from)
		_, _, left[i].LastLine = rec.Point(left[i].to - 1)
		left[i].Points = left[i].to - left[i].from
	}
	for i := range xsteps {
		_, xsteps[i].at, _ = rec.Point(xsteps[i].from - 1)
		_, _, xsteps[i].Line = rec.Point(xsteps[i].from)
		xsteps[i].LastLine = xsteps[i].Line
	}
	res.left, res.steps = left, xsteps
	res.Glitches = append(append([]Glitch{}, left...), xsteps...)
	const listed = 10
	for k, g := range left {
		if g.Kind == "repeat" {
			res.RepeatedPoints += g.Points
			res.warn("lines %d to %d repeat lines %d to %d point for point (a data block written twice); the repeat is left out", g.Line, g.LastLine, int(g.Size), int(g.Threshold))
			continue
		}
		if k == listed {
			res.warn("%d more glitches left out (see the audit)", len(left)-listed)
			break
		}
		where := glitchWhere(g)
		unit, size, noise, thr := "MPa", fmt.Sprintf("%+.4g", g.Size), fmt.Sprintf("%.3g", g.Noise), fmt.Sprintf("%.3g", g.Threshold)
		if g.Series == "extension" {
			unit, size, noise, thr = "% strain", fmt.Sprintf("%+.3g", 100*g.Size), fmt.Sprintf("%.3g", 100*g.Noise), fmt.Sprintf("%.3g", 100*g.Threshold)
		}
		res.warn("%s %s at %s: %s %s from the trend of its neighbours (noise SD %s, glitch threshold %s %s); left out of every property",
			g.Series, g.Kind, where, size, unit, noise, thr, unit)
	}
	for _, g := range xsteps {
		if g.Series == "force" {
			res.warn("force step at line %d: the force jumps by %+.4g MPa and stays (noise SD %.3g MPa, threshold %.3g MPa) while the extension goes on smoothly: the load cell or its amplifier probably jumped; properties measured beyond it are not reported",
				g.Line, g.Size, g.Noise, g.Threshold)
			continue
		}
		res.warn("extension step at line %d: the extension jumps by %+.3g %% strain and stays (noise SD %.3g %%, threshold %.3g %%): the extensometer probably slipped; properties measured beyond it are not reported",
			g.Line, 100*g.Size, 100*g.Noise, 100*g.Threshold)
	}
}

// glitchWhere names the file line or lines of a glitch.
func glitchWhere(g Glitch) string {
	if g.LastLine != g.Line {
		return fmt.Sprintf("lines %d to %d", g.Line, g.LastLine)
	}
	return fmt.Sprintf("line %d", g.Line)
}

// glitchAtFracture returns the glitch left out between the last point
// before the fracture's fall (its last file line before) and the first
// point after it (its first file line after), if any: the point or points
// left out there may be the last the specimen carried load through, so
// the fracture cannot be placed to better than the strain they span, and
// a glitch there decides the elongation after fracture (the rule
// for glitches: a glitch where it decides a property leaves the property
// empty, with its line named). An extension glitch whose every force
// reading lies below the fracture tail's level (forceTail [force unit])
// was read after the fracture and decides nothing.
func (res *Result) glitchAtFracture(rec *Record, before, after int, forceTail float64) *Glitch {
	res.fractureLines = [2]int{before, after}
	for i := range res.left {
		g := &res.left[i]
		if g.LastLine <= before || g.Line >= after || g.Kind == "repeat" {
			continue
		}
		if g.Series == "extension" {
			high := false
			for j := g.from; j < g.to; j++ {
				f, _, _ := rec.Point(j)
				high = high || f >= forceTail
			}
			if !high {
				continue
			}
		}
		return g
	}
	return nil
}

// glitchShiftLimit is the largest change of the modulus, relative, that
// the points of one glitch left out may bring at three standard
// deviations (99.7 % for normal noise; the package's other agreement
// checks use three as well): the target for one glitch, 0.5 %.
const glitchShiftLimit = 0.005

// glitchInModulus leaves the modulus empty, with a warning naming the
// glitch, when the points of a glitch left out lie among those that carry
// the modulus fit so that, fitted, they could have moved it by more than
// glitchShiftLimit at three standard deviations (modulusInfo.shift: the
// shift does not depend on the values the points would have had). The
// strains of the points left out are interpolated between the points
// around the run (an extension glitch has no strain to trust); in a
// record averaged in bins each weighs 1/bin of a working point. The
// slope is still used for the offset line, as for a crosshead record.
// The rule is this package's own (the issue's: a glitch where it decides
// a property leaves the property empty).
func (res *Result) glitchInModulus(rec *Record) {
	n := rec.Len()
	strain := func(i int) float64 { _, x, _ := rec.Point(i); return x }
	w := 1 / float64(max(1, res.Bin))
	for _, g := range res.left {
		if g.Kind == "repeat" || g.from <= 0 || g.to >= n {
			continue
		}
		xa, xb := strain(g.from-1), strain(g.to)
		var xs []float64
		for j := g.from; j < g.to; j++ {
			xs = append(xs, xa+(xb-xa)*float64(j-g.from+1)/float64(g.to-g.from+1))
		}
		if sd := res.modInfo.shift(xs, w); 3*sd > glitchShiftLimit {
			res.Modulus = math.NaN()
			res.warn("modulus not reported: the %s %s at %s, left out, lay among the points that carry the modulus; fitted, they could have moved it by %.2g %% (three standard deviations of the change, from the fit's covariance), more than %.1f %%; the slope %.4g GPa is used only for the offset line",
				g.Series, g.Kind, glitchWhere(g), 300*sd, 100*glitchShiftLimit, res.Fit.Slope/1000)
			return
		}
	}
}

// rawRepeat looks for an earlier raw point equal (force and strain) to
// point i and returns it and the number of points that repeat from there
// (0 when none does).
func rawRepeat(rec *Record, i int) (p, length int) {
	const lookBack = 1_000_000 // points searched back
	f, x, _ := rec.Point(i)
	for p = i - 1; p >= 0 && p >= i-lookBack; p-- {
		fp, xp, _ := rec.Point(p)
		if fp != f || xp != x {
			continue
		}
		L := 1
		for i+L < rec.Len() && p+L < i {
			a, b, _ := rec.Point(p + L)
			c, d, _ := rec.Point(i + L)
			if a != c || b != d {
				break
			}
			L++
		}
		if L >= 3 {
			return p, L
		}
	}
	return 0, 0
}

func sortGlitches(g []Glitch) {
	sort.Slice(g, func(i, j int) bool { return g[i].from < g[j].from })
}

// startForce is the force of the first point not left out.
func startForce(rec *Record, n int, left []Glitch) float64 {
	k := 0
	for i := 0; i < n; i++ {
		for k < len(left) && left[k].to <= i {
			k++
		}
		if k < len(left) && i >= left[k].from {
			continue
		}
		f, _, _ := rec.Point(i)
		return f
	}
	return 0
}

// workingPoints builds the working curve: stress [MPa], strain and the
// first and last file line of each working point, with repeated points
// and glitches left out. With more than binTarget points, consecutive
// points are averaged in bins of k (the mean force and the mean strain);
// the points after the fracture (the final run below 10 % of the highest
// force) are binned on their own so that no bin straddles the fracture.
// The highest raw stress of the points kept is res.TensileRaw.
func (res *Result) workingPoints(rec *Record, n int) (x, s []float64, ln, lnLast []int) {
	left := res.left
	kept := n - res.Duplicates
	for _, g := range left {
		kept -= g.to - g.from
	}
	k := (kept + binTarget - 1) / binTarget
	if k < 1 {
		k = 1
	}
	res.Bin = k
	// The fracture tail in raw points.
	top := math.Inf(-1)
	isLeft := func() func(i int) bool {
		j := 0
		return func(i int) bool {
			for j < len(left) && left[j].to <= i {
				j++
			}
			return j < len(left) && i >= left[j].from
		}
	}
	il := isLeft()
	var pf, px float64
	for i := 0; i < n; i++ {
		f, xx, _ := rec.Point(i)
		dup := i > 0 && f == pf && xx == px
		pf, px = f, xx
		if dup || il(i) {
			continue
		}
		top = math.Max(top, f/rec.Area)
	}
	res.TensileRaw = top
	tail := n
	for tail > 0 {
		f, _, _ := rec.Point(tail - 1)
		if f/rec.Area >= 0.1*top {
			break
		}
		tail--
	}
	size := kept/k + 2
	x, s = make([]float64, 0, size), make([]float64, 0, size)
	ln, lnLast = make([]int, 0, size), make([]int, 0, size)
	var sf, sx float64
	cnt, first, last := 0, 0, 0
	flush := func() {
		if cnt > 0 {
			x, s = append(x, sx/float64(cnt)), append(s, sf/float64(cnt)/rec.Area)
			ln, lnLast = append(ln, first), append(lnLast, last)
		}
		sf, sx, cnt = 0, 0, 0
	}
	il = isLeft()
	inTail := false
	for i := 0; i < n; i++ {
		f, xx, line := rec.Point(i)
		dup := i > 0 && f == pf && xx == px
		pf, px = f, xx
		if dup || il(i) {
			continue
		}
		if i >= tail && !inTail {
			flush()
			inTail = true
		}
		if cnt == 0 {
			first = line
		}
		sf, sx, last = sf+f, sx+xx, line
		cnt++
		if cnt == k {
			flush()
		}
	}
	flush()
	if k > 1 {
		res.note("%d points averaged in bins of %d consecutive points (%d working points)", kept, k, len(x))
	}
	return x, s, ln, lnLast
}
