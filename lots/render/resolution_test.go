package render

import (
	"math"
	"testing"
)

// TestResolutionOf: the resolution is the fewest decimals at which every
// value is exact in its display unit (common practice), allowing for the
// rounding error of a unit conversion; a value with no finite resolution
// (more than MaxDecimals) makes the resolution unknown.
func TestResolutionOf(t *testing.T) {
	const mpaPerKsi = 6.894757293168361 // 1 ksi in MPa (NIST SP 811, B.8)
	cases := []struct {
		name  string
		vals  []float64
		dec   int
		known bool
	}{
		{"whole", []float64{930, 955, 1000}, 0, true},
		{"half", []float64{930, 1000.5}, 1, true},
		{"hundredths", []float64{12.25, 14.5}, 2, true},
		{"0.1+0.2", []float64{0.1 + 0.2}, 1, true},
		{"fraction to percent", []float64{0.149 * 100, 0.07 * 100}, 1, true},
		{"ksi back to MPa", []float64{135 * mpaPerKsi / mpaPerKsi, 140.5 * mpaPerKsi / mpaPerKsi}, 1, true},
		{"MPa to ksi", []float64{930 / mpaPerKsi}, 0, false},
		{"missing skipped", []float64{math.NaN(), 8}, 0, true},
		{"none", nil, 0, false},
		{"negative", []float64{-0.25, 3}, 2, true},
		{"zero", []float64{0}, 0, true},
		{"seven decimals", []float64{1.0000001}, 0, false},
	}
	for _, c := range cases {
		r := ResolutionOf(c.vals...)
		if r.Known != c.known || (c.known && r.Dec != c.dec) {
			t.Errorf("%s %v: got %d decimals (known %v), want %d (known %v)", c.name, c.vals, r.Dec, r.Known, c.dec, c.known)
		}
	}
	// An unknown value stays unknown whatever follows.
	r := ResolutionOf(930/mpaPerKsi, 930)
	if r.Known {
		t.Errorf("resolution known after a value with no finite resolution: %+v", r)
	}
}

// TestResolutionFormat: given values at the resolution, statistics with
// one decimal more, SDs with one decimal more or 3 significant digits; an
// unknown resolution falls back to the significant-digit rules.
func TestResolutionFormat(t *testing.T) {
	whole := ResolutionOf(955, 981, 940, 968, 949)
	tenths := ResolutionOf(14.5, 12, 8.5)
	var unknown Resolution
	cases := []struct {
		got  Number
		want string
	}{
		{whole.Given(930), "930"},
		{whole.Given(930.5), "930.5"}, // a finer limit keeps its decimals
		{whole.Stat(958.6), "958.6"},
		{whole.Stat(1000.26), "1000.3"},
		{whole.Stat(1000.25), "1000.2"}, // exact half to even (ASTM E29 rounding, from memory)
		{whole.Stat(990.875), "990.9"},
		{whole.Spread(15.8209), "15.8"},
		{whole.Spread(0.01234), "0.0123"},
		{whole.Spread(0), "0.0"},
		{tenths.Given(8), "8.0"},
		{tenths.Stat(12.3333), "12.33"},
		{tenths.Spread(1.2345), "1.23"},
		{tenths.Stat(math.NaN()), "-"},
		{unknown.Given(134.88493), "134.885"},
		{unknown.Stat(990.875), "990.88"},
		{unknown.Spread(15.8209), "15.8"},
		{ResolutionOf(0.1 + 0.2).Given(0.1 + 0.2), "0.3"},
	}
	for i, c := range cases {
		if s := c.got.Text(); s != c.want {
			t.Errorf("case %d: %v printed %q, want %q", i, c.got.V, s, c.want)
		}
		if c.got.V == c.got.V && Exact(c.got.V) == "" {
			t.Errorf("case %d: lost the exact value", i)
		}
	}
	var m Resolutions
	if m.Of("bar", "tensile").Known || m.Of("", "tensile").Known {
		t.Error("nil Resolutions knows a property")
	}
	m = Resolutions{}
	m.Add("bar", "tensile", 955)
	m.Add("bar", "tensile", 960.5)
	m.Add("plate", "tensile", 320)
	if r := m.Of("bar", "tensile"); !r.Known || r.Dec != 1 {
		t.Errorf("bar tensile: %+v, want 1 decimal", r)
	}
	if r := m.Of("plate", "tensile"); !r.Known || r.Dec != 0 {
		t.Errorf("plate tensile: %+v, want 0 decimals", r)
	}
	if r := m.Of("", "tensile"); !r.Known || r.Dec != 1 {
		t.Errorf("tensile over both materials: %+v, want 1 decimal", r)
	}
	// A material whose values are computed (no finite resolution) keeps
	// its own unknown resolution; the others keep theirs.
	m.Add("forging", "tensile", 319.60975440679283)
	if m.Of("forging", "tensile").Known || !m.Of("bar", "tensile").Known || m.Of("", "tensile").Known {
		t.Errorf("with computed forging values: forging %+v, bar %+v, all %+v", m.Of("forging", "tensile"), m.Of("bar", "tensile"), m.Of("", "tensile"))
	}
}

// BenchmarkResolutionAdd: the cost per value of inferring a resolution
// (values to 0.1, as tensile strengths in MPa), which summary, accept and
// trend pay for each value when they print a table.
func BenchmarkResolutionAdd(b *testing.B) {
	vals := make([]float64, 1000)
	for i := range vals {
		vals[i] = 900 + float64(i%997)/10
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var r Resolution
		for _, v := range vals {
			r.Add(v)
		}
		if !r.Known || r.Dec != 1 {
			b.Fatalf("%+v", r)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*len(vals)), "ns/value")
}
