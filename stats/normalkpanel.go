package stats

import (
	"math"
)

// Long tables of the normal tolerance factor by interpolation in the
// sample size.
//
// For fixed content p and confidence gamma, k(n) = t'_gamma(n-1, z_p sqrt n)
// / sqrt n (NormalK) extends to real n > 1 and is an analytic function of
// w = 1/sqrt(n) near w = 0: its large-sample expansion is a series in w
// (Johnson, Kotz and Balakrishnan, Continuous Univariate Distributions
// vol. 2, 2nd ed., 1995, section 31.7, the normal approximation of the
// noncentral t; Natrella's k = (z_p + sqrt(z_p^2 - a b))/a with
// a = 1 - z_gamma^2/(2(n-1)), b = z_p^2 - z_gamma^2/n, NIST/SEMATECH
// e-Handbook section 7.2.6.3, is its leading part), with the nearest
// singularity near n = 1 (w = 1). So on a decade of sizes above 100 (w in
// at most [0.003, 0.1]) the polynomial through kPanelNodes Chebyshev points
// in w converges geometrically, far past double precision (Trefethen,
// Approximation Theory and Approximation Practice, SIAM 2013, chapter 8).
//
// A panel (the sizes 101 10^j to 101 10^(j+1)) is built from exact
// factors at its Chebyshev points (NoncentralTQuantile, the route NormalK
// takes, at real n), as fracPanel does for the fraction bounds, and used
// only if both checks pass, otherwise its sizes take the per-size route:
//   - the last two Chebyshev coefficients are below kPanelCoefTol times the
//     smallest |k| at the nodes;
//   - at three whole sizes off the nodes the interpolant agrees with
//     NormalK to kPanelCheckTol relative.
//
// Measured (TestNormalKTableMatchesNormalK): agreement with NormalK to
// about 1e-15 relative.
const (
	kPanelNodes    = fracNodes
	kPanelBase     = normalKTableMinN // first size of panel 0
	kPanelMinSizes = 256              // fewer sizes in a panel: per-size route
	kPanelCoefTol  = 1e-14
	kPanelCheckTol = 1e-13
)

// kPanelOf is the panel of size n >= kPanelBase.
func kPanelOf(n int) int {
	j := 0
	for lim := kPanelBase * 10; n >= lim; lim *= 10 {
		j++
	}
	return j
}

// kPanelRange is the sizes [lo, hi) of panel j.
func kPanelRange(j int) (lo, hi float64) {
	lo = float64(kPanelBase) * math.Pow(10, float64(j))
	return lo, 10 * lo
}

// normalKReal is NormalK's formula at a real size nu > 1.
func normalKReal(nu, zp, gamma float64) (float64, error) {
	rn := math.Sqrt(nu)
	t, err := NoncentralTQuantile(gamma, nu-1, zp*rn)
	return t / rn, err
}

// kPanel is the interpolant of k on one panel, in x in [-1, 1] with
// w = 1/sqrt(n) = wMid + wHalf x.
type kPanel struct {
	wMid, wHalf float64
	cheb        chebSeries
}

// buildKPanel builds and checks the interpolant of panel j; ok is false
// when a check fails or a factor cannot be computed.
func buildKPanel(j int, p, gamma float64) (kp kPanel, ok bool) {
	lo, hi := kPanelRange(j)
	wLo, wHi := 1/math.Sqrt(hi), 1/math.Sqrt(lo)
	kp.wMid, kp.wHalf = (wLo+wHi)/2, (wHi-wLo)/2
	zp := normQuantile(p)
	var f [kPanelNodes]float64
	smallest := math.Inf(1)
	for i := range f {
		w := kp.wMid + kp.wHalf*fracCos[1][i]
		k, err := normalKReal(1/(w*w), zp, gamma)
		if err != nil || math.IsNaN(k) || math.IsInf(k, 0) {
			return kp, false
		}
		f[i] = k
		smallest = math.Min(smallest, math.Abs(k))
	}
	kp.cheb.fit(&f)
	if !(math.Abs(kp.cheb.coef[kPanelNodes-1])+math.Abs(kp.cheb.coef[kPanelNodes-2]) <= kPanelCoefTol*smallest) {
		return kp, false
	}
	for _, frac := range [...]float64{0.13, 0.4718, 0.83} {
		n := int(math.Round(lo + frac*(hi-lo)))
		want, err := NormalK(n, p, gamma)
		if err != nil || !(math.Abs(kp.at(n)-want) <= kPanelCheckTol*math.Abs(want)) {
			return kp, false
		}
	}
	return kp, true
}

// at is the interpolated factor for size n in the panel.
func (kp *kPanel) at(n int) float64 {
	return kp.cheb.eval((1/math.Sqrt(float64(n)) - kp.wMid) / kp.wHalf)
}
