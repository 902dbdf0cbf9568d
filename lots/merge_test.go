package lots

import (
	"math"
	"strings"
	"testing"
)

func TestMerge(t *testing.T) {
	a, _ := ReadCSV(strings.NewReader("specimen,lot,tensile [MPa]\nS1,L1,300\nS2,L1,310\n"), "a.csv")
	b, _ := ReadCSV(strings.NewReader("specimen,lot,supplier,hardness [HBW],tensile [ksi]\nS2,L1,M,95,\nS3,L2,M,96,45\n"), "b.csv")
	m, err := Merge("merged", a, b)
	if err != nil {
		t.Fatal(err)
	}
	if m.Len() != 3 || len(m.Properties) != 2 {
		t.Fatalf("%d specimens %d properties", m.Len(), len(m.Properties))
	}
	s2 := m.Specimen(1)
	if s2.ID != "S2" || s2.Values[0] != 310 || s2.Values[1] != 95 || s2.Supplier != "M" {
		t.Errorf("S2 merged wrong: %+v", s2)
	}
	// 45 ksi in MPa (exact definitions, NIST SP 811).
	if got := m.Specimen(2).Values[0]; math.Abs(got-45*6.894757293168361) > 1e-9 {
		t.Errorf("S3 tensile %g", got)
	}
	if !m.Specimen(0).Missing(1) || m.Missing[1] != 1 {
		t.Errorf("missing hardness not counted: %v", m.Missing)
	}
	c, _ := ReadCSV(strings.NewReader("specimen,lot,tensile [MPa]\nS1,L9,300\n"), "c.csv")
	if _, err := Merge("m", a, c); err == nil || !strings.Contains(err.Error(), `c.csv:2: specimen "S1": lot "L9" differs from "L1" given at a.csv:2`) {
		t.Errorf("lot conflict: %v", err)
	}
	// A value given twice differently: located in both files.
	v, _ := ReadCSV(strings.NewReader("specimen,lot,hardness [HBW],tensile [MPa]\nS3,L2,96,\nS2,L1,95,312.5\n"), "v.csv")
	if _, err := Merge("m", a, b, v); err == nil || !strings.Contains(err.Error(), `v.csv:3: specimen "S2": tensile is 312.5 MPa here but 310 MPa at a.csv:3; keep one value`) {
		t.Errorf("value conflict: %v", err)
	}
	if _, err := Merge("m", b, v); err != nil {
		t.Errorf("same values in two files: %v", err)
	}
	e, _ := ReadCSV(strings.NewReader("specimen,lot,tensile [%]\nS9,L9,3\n"), "e.csv")
	if _, err := Merge("m", a, e); err == nil || !strings.Contains(err.Error(), "is in % here but in MPa") {
		t.Errorf("unit conflict: %v", err)
	}
}
