package stats

import (
	"encoding/binary"
	"math"
	"testing"
)

// Fuzz targets for the fits and tests: any input must give either an error
// or a finite, in-range result, never a panic. The seed corpora below run as
// ordinary tests; `go test -fuzz FuzzX ./stats/` explores further.

// floatsFrom decodes b as little-endian float64s (any bit pattern,
// including NaN, ±Inf, subnormals) when raw is true, else as int16
// values scaled to a moderate range with many ties.
func floatsFrom(b []byte, raw bool) []float64 {
	var x []float64
	if raw {
		for len(b) >= 8 {
			x = append(x, math.Float64frombits(binary.LittleEndian.Uint64(b)))
			b = b[8:]
		}
		return x
	}
	for len(b) >= 2 {
		x = append(x, float64(int16(binary.LittleEndian.Uint16(b)))/64)
		b = b[2:]
	}
	return x
}

func le(v ...float64) []byte {
	b := make([]byte, 8*len(v))
	for i, f := range v {
		binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(f))
	}
	return b
}

func finite(v ...float64) bool {
	for _, f := range v {
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return false
		}
	}
	return true
}

func addSeeds(f *testing.F) {
	f.Add(le(1, 2, 3, 4, 5), true)
	f.Add(le(1e6, 1e6+1, 1e6+1, 1e6+2), true)
	f.Add(le(1e-3, 1.2e-3, 0.9e-3), true)
	f.Add(le(5, 5, 5, 5, 7), true)
	f.Add(le(math.NaN(), 1, 2), true)
	f.Add(le(math.Inf(1), 1, 2), true)
	f.Add(le(-1, 0, 1, 2), true)
	f.Add(le(5e-324, 1, 1e308), true)
	f.Add(le(1e-300, 1e300, 1, 2), true)
	f.Add(le(1, math.Nextafter(1, 2), 1, 1), true)
	f.Add(le(1.7e308, -1.7e308, 0), true)
	f.Add([]byte{1, 0, 2, 0, 2, 0, 3, 0, 200, 1, 7, 0, 1, 0}, false)
	f.Add([]byte{}, false)
	f.Add([]byte{0xff, 0x7f, 0x00, 0x80, 1, 0}, false)
}

func FuzzFits(f *testing.F) {
	addSeeds(f)
	f.Fuzz(func(t *testing.T, b []byte, raw bool) {
		x := floatsFrom(b, raw)
		if n, err := FitNormal(x); err == nil && (!finite(n.Mu, n.Sigma) || n.Sigma <= 0) {
			t.Fatalf("FitNormal(%v) = %+v", x, n)
		}
		if l, err := FitLognormal(x); err == nil && (!finite(l.Mu, l.Sigma) || l.Sigma <= 0) {
			t.Fatalf("FitLognormal(%v) = %+v", x, l)
		}
		w, err := FitWeibull(x)
		if err == nil && (!finite(w.Shape, w.Scale) || w.Shape <= 0 || w.Scale <= 0) {
			t.Fatalf("FitWeibull(%v) = %+v", x, w)
		}
		// The guarantee: at least 2 distinct positive finite values
		// always converge.
		if err != nil && len(x) >= 2 {
			ok := true
			first := x[0]
			distinctSeen := false
			for _, v := range x {
				if !(v > 0) || math.IsInf(v, 0) {
					ok = false
				}
				if v != first {
					distinctSeen = true
				}
			}
			if ok && distinctSeen {
				t.Fatalf("FitWeibull(%v) failed on valid data: %v", x, err)
			}
		}
		if d, err := Describe(x); err == nil && !finite(d.Mean, d.SD, d.Min, d.Max, d.Median) {
			t.Fatalf("Describe(%v) = %+v", x, d)
		}
	})
}

func FuzzADTests(f *testing.F) {
	addSeeds(f)
	f.Fuzz(func(t *testing.T, b []byte, raw bool) {
		x := floatsFrom(b, raw)
		for name, fn := range map[string]func([]float64) (ADResult, error){"normal": ADNormal, "lognormal": ADLognormal, "weibull": ADWeibull} {
			r, err := fn(x)
			if err != nil {
				continue
			}
			if !finite(r.Statistic, r.Adjusted, r.OSL) || r.OSL < 0 || r.OSL > 1 || r.N != len(x) {
				t.Fatalf("AD %s(%v) = %+v", name, x, r)
			}
		}
	})
}

// groupsFrom splits x into k = 2 + (first byte mod 5) groups round-robin.
func groupsFrom(b []byte, raw bool) [][]float64 {
	if len(b) == 0 {
		return nil
	}
	k := 2 + int(b[0]%5)
	x := floatsFrom(b[1:], raw)
	g := make([][]float64, k)
	for i, v := range x {
		g[i%k] = append(g[i%k], v)
	}
	return g
}

func FuzzGroupTests(f *testing.F) {
	addSeeds(f)
	f.Add(append([]byte{2}, le(1, 2, 3, 4, 5, 6, 7, 8, 9)...), true)
	f.Add(append([]byte{0}, le(1, 1, 1, 1, 2, 2)...), true)
	f.Fuzz(func(t *testing.T, b []byte, raw bool) {
		g := groupsFrom(b, raw)
		if r, err := KSampleAD(g, 0.05); err == nil {
			if !finite(r.Statistic, r.Standardized, r.Critical, r.PValue, r.ADK, r.ADC) || r.PValue < 0 || r.PValue > 1 || r.Statistic < 0 {
				t.Fatalf("KSampleAD(%v) = %+v", g, r)
			}
		}
		if r, err := OneWayANOVA(g); err == nil {
			if !finite(r.SSB, r.SSW, r.MSB, r.MSW, r.F, r.P) || r.P < 0 || r.P > 1 || r.F < 0 {
				t.Fatalf("OneWayANOVA(%v) = %+v", g, r)
			}
		}
		if r, err := Levene(g); err == nil {
			if !finite(r.F, r.P) || r.P < 0 || r.P > 1 {
				t.Fatalf("Levene(%v) = %+v", g, r)
			}
		}
	})
}

func FuzzOutliers(f *testing.F) {
	addSeeds(f)
	f.Fuzz(func(t *testing.T, b []byte, raw bool) {
		x := floatsFrom(b, raw)
		r, err := MaxNormedResidual(x, 0.05)
		if err == nil {
			if !finite(r.MNR, r.Critical) || r.Index < 0 || r.Index >= len(x) || r.MNR < 0 {
				t.Fatalf("MaxNormedResidual(%v) = %+v", x, r)
			}
			// The MNR of n values cannot exceed (n-1)/√n (Samuelson's
			// inequality), and neither can C.
			lim := float64(len(x)-1)/math.Sqrt(float64(len(x))) + 1e-9
			if r.MNR > lim || r.Critical > lim {
				t.Fatalf("MNR %v or C %v beyond (n-1)/sqrt(n) = %v", r.MNR, r.Critical, lim)
			}
		}
		fl, err := ScreenOutliers(x, 0.05, true)
		if err == nil {
			seen := map[int]bool{}
			for _, s := range fl {
				if seen[s.Index] || !s.Outlier || s.Index < 0 || s.Index >= len(x) {
					t.Fatalf("ScreenOutliers(%v) = %+v", x, fl)
				}
				seen[s.Index] = true
			}
		}
	})
}
