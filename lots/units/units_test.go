package units

import (
	"math"
	"strconv"
	"testing"
)

// Conversion factors from the exact definitions 1 lbf = 4.4482216152605 N
// and 1 in = 25.4 mm (NIST SP 811, 2008, appendix B): 1 psi =
// 6.894757293168361e-3 MPa (NIST SP 811 B.8 lists 6.894757 E+03 Pa).
func TestConversions(t *testing.T) {
	for _, c := range []struct {
		sym  string
		v    float64
		want float64 // internal unit
	}{
		{"psi", 1, 6.894757293168361e-3},
		{"ksi", 100, 689.4757293168361},
		{"Msi", 10, 68947.57293168361},
		{"GPa", 71, 71000},
		{"kPa", 1500, 1.5},
		{"Pa", 2e6, 2},
		{"N/mm2", 5, 5},
		{"%", 12.5, 0.125},
		{"in/in", 0.2, 0.2},
		{"kJ/m^3", 500, 0.5},
		{"in-lbf/in^3", 1000, 6.894757293168361},
		{"ft-lbf", 1, 1.3558179483314004},
	} {
		u, err := Parse(c.sym)
		if err != nil {
			t.Fatal(err)
		}
		got := u.ToInternal(c.v)
		if math.Abs(got-c.want) > 1e-14*math.Abs(c.want) {
			t.Errorf("%g %s = %.17g, want %.17g", c.v, c.sym, got, c.want)
		}
		if back := u.FromInternal(got); math.Abs(back-c.v) > 1e-14*math.Abs(c.v) {
			t.Errorf("%s round trip %.17g", c.sym, back)
		}
	}
}

func TestDisplayAndCompatibility(t *testing.T) {
	gpa, _ := Parse("GPa")
	mpa, _ := Parse("mpa")
	hbw, _ := Parse("HBW")
	hrc, _ := Parse("HRC")
	pct, _ := Parse("%")
	if gpa.Display(US).Symbol != "Msi" || mpa.Display(US).Symbol != "ksi" || mpa.Display(SI).Symbol != "MPa" || pct.Display(US).Symbol != "%" {
		t.Error("display units wrong")
	}
	if Compatible(hbw, hrc) || !Compatible(gpa, mpa) || Compatible(mpa, pct) {
		t.Error("compatibility wrong")
	}
	if _, err := Parse("furlong"); err == nil {
		t.Error("unknown unit accepted")
	}
	if CheckValue(Stress, -1) == "" || CheckValue(Strain, 0) != "" || CheckValue(Strain, -0.1) == "" {
		t.Error("value checks wrong")
	}
}

// TestFromInternalRoundTrip: a value entered in a unit and shown again in
// that unit is the value entered (14.9 %, not 14.899999999999999), and what
// FromInternal returns always converts back to exactly the internal value
// when the plain quotient does.
func TestFromInternalRoundTrip(t *testing.T) {
	for _, sym := range []string{"%", "ksi", "psi", "GPa", "Msi", "kPa", "ft-lbf", "in-lbf/in^3"} {
		u, err := Parse(sym)
		if err != nil {
			t.Fatal(err)
		}
		for _, text := range []string{"14.9", "0.1", "0.3", "1002.5", "70.11", "12.34", "165.7", "0.007", "99.99", "1e-05", "123456.789"} {
			in, _ := strconv.ParseFloat(text, 64)
			back := u.FromInternal(u.ToInternal(in))
			if got := strconv.FormatFloat(back, 'g', -1, 64); got != text && strconv.FormatFloat(in, 'g', -1, 64) == text {
				t.Errorf("%s %s: shown as %s", text, sym, got)
			}
		}
		// Computed values (not entered): the result reads back exactly.
		for i := 1; i < 2000; i++ {
			v := float64(i)*0.7310585786300049 + 1/float64(i)
			x := v / u.Factor
			if x*u.Factor != v {
				continue
			}
			if got := u.FromInternal(v); u.ToInternal(got) != v {
				t.Fatalf("%s: %v shown as %v, which converts back to %v", sym, v, got, u.ToInternal(got))
			}
		}
	}
}
