package spec

import (
	"errors"
	"math"
	"strings"
	"testing"

	"lotproof/lots"
)

// The demo specifications are invented (lots/demo/data); these tests check
// that the parser reads them as written, not any statistical result.
func TestReadDemoSpecs(t *testing.T) {
	s, err := ReadFile("../lots/demo/data/spec-steel-bar.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if s.Label() != "OHP-MS-101 rev C" || s.Material != "QT bar OH-S42" || len(s.Limits) != 5 {
		t.Fatalf("got %+v", s)
	}
	h, ok := s.Limit("Hardness")
	if !ok || h.Min != 269 || h.Max != 331 || h.Unit.Symbol != "HBW" {
		t.Fatalf("hardness %+v", h)
	}
	e, _ := s.Limit("elongation")
	// 12 % is 0.12 in the internal unit (fraction); exact to rounding.
	if math.Abs(e.Min-0.12) > 1e-15 || e.HasMax() {
		t.Fatalf("elongation %+v", e)
	}
	r := s.Acceptance
	if r.Content != 0.9 || r.Confidence != 0.9 || r.MinSpecimens != 5 || !r.IndividualReject || r.Retests != 1 || r.RetestFactor != 2 {
		t.Fatalf("rule %+v", r)
	}
	p, err := ReadFile("../lots/demo/data/spec-plate.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if p.Label() != "OHP-MS-205 rev A" || len(p.Limits) != 4 {
		t.Fatalf("plate %+v", p)
	}
	if err := CheckSet([]*Spec{s, p}); err != nil {
		t.Fatal(err)
	}
	if got, _ := ForMaterial([]*Spec{s, p}, " plate oh-a61 "); got != p {
		t.Fatal("plate spec not chosen for plate material")
	}
	if got, why := ForMaterial([]*Spec{s, p}, "Unknown alloy"); got != nil || !strings.Contains(why, "no specification covers") {
		t.Fatalf("unknown material: %v %q", got, why)
	}
	if got, _ := ForMaterial([]*Spec{s}, ""); got != s {
		t.Fatal("one spec should judge a lot without material")
	}
	if got, _ := ForMaterial([]*Spec{s, p}, ""); got != nil {
		t.Fatal("two specs cannot judge a lot without material")
	}
	if err := CheckSet([]*Spec{s, s}); err == nil {
		t.Fatal("duplicate material accepted")
	}
}

const good = `specification: X-1
revision: B
material: M
properties:
  tensile:
    unit: ksi
    min: 100
acceptance:
  content: 0.95
  confidence: 0.9
  min_specimens: 3
`

func TestParseConvertsUnits(t *testing.T) {
	s, err := Parse("x.yaml", []byte(good))
	if err != nil {
		t.Fatal(err)
	}
	l := s.Limits[0]
	// 100 ksi = 689.4757293168361 MPa (NIST SP 811 exact psi definition).
	if math.Abs(l.Min-689.4757293168361) > 1e-9 || l.Where != "x.yaml:5:3" {
		t.Fatalf("%+v", l)
	}
	if s.Acceptance.RetestFactor != 2 || s.Acceptance.Retests != 0 || !s.Acceptance.IndividualReject {
		t.Fatalf("defaults %+v", s.Acceptance)
	}
}

func TestParseErrorsAreLocated(t *testing.T) {
	cases := []struct {
		name, text, where, what string
	}{
		{"unknown key", strings.Replace(good, "material: M", "material: M\ncolour: red", 1), "x.yaml:4:1", `unknown key "colour"`},
		{"unknown unit", strings.Replace(good, "unit: ksi", "unit: furlong", 1), "x.yaml:6:11", "unknown unit"},
		{"negative stress", strings.Replace(good, "min: 100", "min: -100", 1), "x.yaml:7:10", "impossible"},
		{"max below min", strings.Replace(good, "min: 100", "min: 100\n    max: 90", 1), "x.yaml:8:10", "not above min"},
		{"content 1", strings.Replace(good, "content: 0.95", "content: 1", 1), "x.yaml:9:12", "outside [0.5, 1)"},
		{"text content", strings.Replace(good, "content: 0.95", "content: high", 1), "x.yaml:9:12", "must be a number"},
		{"min specimens 1", strings.Replace(good, "min_specimens: 3", "min_specimens: 1", 1), "x.yaml:11:18", "impossible"},
		{"no bound", strings.Replace(good, "    min: 100\n", "", 1), "x.yaml:5:3", "neither a minimum nor a maximum"},
		{"duplicate key", strings.Replace(good, "revision: B", "revision: B\nrevision: C", 1), "x.yaml:3:1", "appears twice"},
		{"not yaml", "specification: [", "x.yaml:1:1", "not valid YAML"},
		{"missing rule", strings.Split(good, "acceptance:")[0], "x.yaml:1:1", "acceptance rule is missing"},
		{"strain too big", strings.Replace(strings.Replace(good, "unit: ksi", "unit: mm/mm", 1), "min: 100", "min: 50", 1), "x.yaml:7:10", "impossible strain"},
		{"bad bool", strings.Replace(good, "min_specimens: 3", "min_specimens: 3\n  individual_reject: maybe", 1), "x.yaml:12:22", "true or false"},
	}
	for _, c := range cases {
		_, err := Parse("dir/x.yaml", []byte(c.text))
		var ie *lots.InputError
		if !errors.As(err, &ie) {
			t.Errorf("%s: want InputError, got %v", c.name, err)
			continue
		}
		p := ie.Problems[0]
		if p.Where != c.where || !strings.Contains(p.What, c.what) {
			t.Errorf("%s: got %s: %s; want %s: ...%s...", c.name, p.Where, p.What, c.where, c.what)
		}
	}
}
