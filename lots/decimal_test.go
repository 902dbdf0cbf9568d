package lots

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
)

// TestQuickDecimalMatchesParseFloat: the fast path gives the value of
// strconv.ParseFloat bit for bit wherever it answers, over typical results
// cells, random digit strings with and without a point and sign, and the
// edges (leading zeros, "-0", ".5", "5.", 15 digits), and declines what
// it does not handle.
func TestQuickDecimalMatchesParseFloat(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	cases := []string{"0", "-0", "+0", "0.0", ".5", "5.", "-.25", "007.50", "1052.6", "13", "0.000001",
		"999999999999999", "99999999999999.9", "0.0000000000000000000001", "123456789012345",
		"1e3", "1.5E-2", "0x1p3", "1_000", "", ".", "-", "+.", "1.2.3", " 1", "1 ", "inf", "NaN",
		"1234567890123456", "0.00000000000000000000001"}
	for range 200000 {
		n := 1 + r.IntN(17)
		b := make([]byte, 0, n+2)
		if r.IntN(4) == 0 {
			b = append(b, "+-"[r.IntN(2)])
		}
		pt := r.IntN(n + 2)
		for j := 0; j < n; j++ {
			if j == pt {
				b = append(b, '.')
			}
			b = append(b, byte('0'+r.IntN(10)))
		}
		cases = append(cases, string(b))
	}
	answered := 0
	for _, c := range cases {
		got, ok := quickDecimal(c)
		want, err := strconv.ParseFloat(c, 64)
		if !ok {
			continue
		}
		answered++
		if err != nil {
			t.Fatalf("%q: fast path %g, ParseFloat refuses it (%v)", c, got, err)
		}
		if math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("%q: fast path %v (%x), ParseFloat %v (%x)", c, got, math.Float64bits(got), want, math.Float64bits(want))
		}
	}
	for _, c := range []string{"1e3", "0x1p3", "1_000", "", ".", "-", "1.2.3", " 1", "inf", "1234567890123456"} {
		if _, ok := quickDecimal(c); ok {
			t.Errorf("%q: the fast path should leave it to ParseFloat", c)
		}
	}
	if answered < len(cases)/2 {
		t.Errorf("the fast path answered only %d of %d cases", answered, len(cases))
	}
	t.Logf("%d of %d answered by the fast path", answered, len(cases))
}

// BenchmarkQuickDecimal: the fast path on numbers as results files give
// them (one to four digits before the point, one or two after).
func BenchmarkQuickDecimal(b *testing.B) {
	in := []string{"1052.6", "900.5", "17.4", "1043.2", "896.8", "18.1", "988.0", "12.35"}
	var s float64
	for i := 0; i < b.N; i++ {
		v, _ := quickDecimal(in[i&7])
		s += v
	}
	_ = s
}
