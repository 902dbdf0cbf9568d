package sizing

import (
	"math"
	"testing"
)

func near(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.10g, want %.10g (rel tol %g)", what, got, want, rel)
	}
}

// Worked example, Beer, Johnston, DeWolf and Mazurek, Mechanics of
// Materials, chapter 1 (the boom-and-rod structure; from memory): rod BC
// carries 50 kN, steel with an allowable stress of 165 MPa; the required
// area is 303e-6 m^2 and the diameter 19.65 mm (the book rounds up to a
// 20 mm rod). The values are checked here to the book's printed digits.
func TestTextbookRod(t *testing.T) {
	a, err := Area(50e3, 165)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "area mm^2", a, 303, 0.002)
	s, _ := Size(Round, a, 0)
	near(t, "diameter mm", s.Diameter, 19.65, 0.0005)
}

// Closed forms (elementary geometry): round trip load -> section -> load.
func TestClosedFormRoundTrip(t *testing.T) {
	allow, err := Allowable(620, 1.5)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "allowable", allow, 413.3333333333, 1e-12)
	a, _ := Area(120e3, allow)
	for _, c := range []struct {
		shape Shape
		given float64
	}{{Round, 0}, {Rectangle, 25}, {Tube, 30}} {
		s, err := Size(c.shape, a, c.given)
		if err != nil {
			t.Fatal(err)
		}
		p, err := MaxLoad(s, allow)
		if err != nil {
			t.Fatal(err)
		}
		near(t, string(c.shape)+" load back", p, 120e3, 1e-12)
	}
	// Tube: D = 30, A = 290.3 -> d_i^2 = 900 - 4A/pi.
	s, _ := Size(Tube, a, 30)
	near(t, "tube inner", s.Inner, math.Sqrt(900-4*a/math.Pi), 1e-14)
	near(t, "tube wall", s.Wall, (30-s.Inner)/2, 1e-14)
}

func TestSizingErrors(t *testing.T) {
	if _, err := Allowable(500, 0.8); err == nil {
		t.Error("factor of safety below 1 accepted")
	}
	if _, err := Allowable(-5, 2); err == nil {
		t.Error("negative design value accepted")
	}
	if _, err := Area(0, 100); err == nil {
		t.Error("zero load accepted")
	}
	if _, err := Size(Tube, 1000, 20); err == nil {
		t.Error("tube too small accepted")
	}
	if _, err := Size(Rectangle, 100, 0); err == nil {
		t.Error("rectangle without width accepted")
	}
	if _, err := Size("hexagon", 100, 0); err == nil {
		t.Error("unknown shape accepted")
	}
}
