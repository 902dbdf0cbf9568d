package lots

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// The bad-input cases of the specimen results format, each with the exact
// message a user sees (file:line:column, what was expected, what to do).
func TestReadCSVBadInput(t *testing.T) {
	cases := []struct {
		name, in, want string
	}{
		{"missing required column", "specimen,tensile [MPa]\nS1,1000\n",
			`r.csv:1:1: required column "lot" is missing; add a column headed lot naming each specimen's lot`},
		{"duplicate specimen id", "specimen,lot,tensile [MPa]\nS1,L1,1000\nS2,L1,1001\nS1,L1,1002\n",
			`r.csv:4:1: duplicate specimen id "S1" (first on line 2); specimen ids must be unique; rename or remove one of them`},
		{"non-numeric value", "specimen,lot,tensile [MPa]\nS1,L1,10O0\n",
			`r.csv:2:7: tensile: "10O0" is not a number; write a decimal number such as 1034.5, or leave the cell empty for a missing value`},
		{"NaN", "specimen,lot,tensile [MPa]\nS1,L1,NaN\n",
			`r.csv:2:7: tensile: "NaN" is not a finite number; write a decimal number such as 1034.5, or leave the cell empty for a missing value`},
		{"Inf", "specimen,lot,tensile [MPa]\nS1,L1,-Inf\n",
			`r.csv:2:7: tensile: "-Inf" is not a finite number; write a decimal number such as 1034.5, or leave the cell empty for a missing value`},
		{"overflow", "specimen,lot,tensile [MPa]\nS1,L1,1e999\n",
			`r.csv:2:7: tensile: "1e999" is not a finite number; write a decimal number such as 1034.5, or leave the cell empty for a missing value`},
		{"unknown unit", "specimen,lot,tensile [MPA2]\nS1,L1,1000\n",
			`r.csv:1:14: column "tensile" has unknown unit "MPA2"; use one of: ` + strings.Join(unitsList(), ", ")},
		{"unit missing", "specimen,lot,tensile\nS1,L1,1000\n",
			`r.csv:1:14: property column "tensile" has no unit; write the unit in square brackets, e.g. "tensile [MPa]", or "tensile [1]" for a plain number`},
		{"negative strength", "specimen,lot,tensile [MPa]\nS1,L1,-980\n",
			`r.csv:2:7: tensile: -980 is impossible (a stress must be positive); check the value and its unit`},
		{"ragged row", "specimen,lot,tensile [MPa]\nS1,L1,1000,7\n",
			`r.csv:2:12: row has 4 fields, the header has 3; give every row as many fields as the header (an empty field is a missing value)`},
		{"empty file", "",
			`r.csv:1:1: the file is empty; write a header row such as "specimen,lot,tensile [MPa]" and one row per specimen`},
		{"header only", "specimen,lot,tensile [MPa]\n",
			`r.csv:2:1: the file has a header but no specimen rows; add one row per specimen below the header`},
		{"bad date", "specimen,lot,tested,tensile [MPa]\nS1,L1,31/03/2026,1000\n",
			`r.csv:2:7: tested date "31/03/2026" is not an ISO 8601 date; write dates as YYYY-MM-DD, e.g. 2026-03-31`},
		{"bare quote", "specimen,lot,tensile [MPa]\nS\"1,L1,1000\n",
			`r.csv:2:2: cannot read the CSV: bare " in non-quoted-field; fix the quoting: a field with a comma, quote or line break is enclosed in double quotes, and a quote inside it is doubled`},
		{"empty lot", "specimen,lot,tensile [MPa]\nS1,,1000\n",
			`r.csv:2:4: lot is empty; name the lot of every specimen`},
		{"duplicate column", "specimen,lot,tensile [MPa],Tensile [ksi]\nS1,L1,1000,145\n",
			`r.csv:1:28: column "Tensile" appears twice (first as column 3); keep one of the two columns`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d, err := ReadCSV(strings.NewReader(c.in), "r.csv")
			if d != nil {
				t.Fatalf("got a dataset for bad input")
			}
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("want *InputError, got %T %v", err, err)
			}
			if got := err.Error(); got != c.want {
				t.Errorf("message\n got: %s\nwant: %s", got, c.want)
			}
		})
	}
}

func unitsList() []string {
	return []string{"Pa", "kPa", "MPa", "GPa", "N/mm^2", "psi", "ksi", "Msi", "%", "mm/mm", "in/in", "J/m^3", "kJ/m^3", "MJ/m^3", "in-lbf/in^3", "J", "ft-lbf", "HBW", "HRC", "HRB", "HV", "1", "-"}
}

// All problems in a file are reported together, up to MaxProblems, then counted.
func TestReadCSVCollectsProblems(t *testing.T) {
	var b strings.Builder
	b.WriteString("specimen,lot,tensile [MPa]\n")
	for i := 0; i < 30; i++ {
		b.WriteString("S,L1,x\n")
	}
	_, err := ReadCSV(strings.NewReader(b.String()), "r.csv")
	var ie *InputError
	if !errors.As(err, &ie) {
		t.Fatalf("want *InputError, got %v", err)
	}
	// 30 non-numbers and 29 duplicate ids: 59 problems, 20 listed.
	if len(ie.Problems) != MaxProblems || ie.More != 59-MaxProblems {
		t.Fatalf("listed %d, more %d; want %d and %d", len(ie.Problems), ie.More, MaxProblems, 59-MaxProblems)
	}
	if !strings.HasSuffix(err.Error(), "... and 39 more problems") {
		t.Errorf("missing count line: %q", err.Error()[len(err.Error())-40:])
	}
}

// A byte order mark, CRLF line ends, quoted fields with commas, missing
// values and unit conversion (1 ksi = 6.894757293168361 MPa by the
// definitions 1 lbf = 4.4482216152605 N, 1 in = 25.4 mm; NIST SP 811).
func TestReadCSVGoodInput(t *testing.T) {
	in := "\xEF\xBB\xBFspecimen,lot,heat,supplier,tested,condition,tensile [ksi],elongation [%],modulus [GPa]\r\n" +
		"A-1,\"L, 1\",H1,\"Mill \"\"North\"\"\",2026-01-05,RT,150,12.5,200\r\n" +
		"A-2,\"L, 1\",H1,\"Mill \"\"North\"\"\",2026-01-05,RT,151,,201\r\n"
	d, err := ReadCSV(strings.NewReader(in), "ok.csv")
	if err != nil {
		t.Fatal(err)
	}
	if d.Len() != 2 || len(d.Properties) != 3 {
		t.Fatalf("got %d specimens, %d properties", d.Len(), len(d.Properties))
	}
	s := d.Specimen(0)
	if s.ID != "A-1" || s.Lot != "L, 1" || s.Supplier != `Mill "North"` || s.Tested != "2026-01-05" || s.Condition != "RT" {
		t.Errorf("identity read wrong: %+v", s)
	}
	if got, want := s.Values[0], 150*6.894757293168361; math.Abs(got-want) > 1e-12*want {
		t.Errorf("150 ksi = %.15g MPa, want %.15g", got, want)
	}
	if got := s.Values[1]; math.Abs(got-0.125) > 1e-15 {
		t.Errorf("12.5 %% = %g, want 0.125", got)
	}
	if got := s.Values[2]; got != 200000 {
		t.Errorf("200 GPa = %g MPa, want 200000", got)
	}
	if !d.Specimen(1).Missing(1) || d.Missing[1] != 1 || d.Missing[0] != 0 {
		t.Errorf("missing value not counted: %v", d.Missing)
	}
	if d.Digest == "" || d.Bytes != int64(len(in)) {
		t.Errorf("digest %q bytes %d", d.Digest, d.Bytes)
	}
	if d.Properties[0].Name != "tensile" || d.Properties[0].Unit.Symbol != "ksi" {
		t.Errorf("property %+v", d.Properties[0])
	}
}

func TestGroupByHeat(t *testing.T) {
	in := "specimen,lot,heat,tensile [MPa]\n1,L1,H1,900\n2,L2,H1,901\n3,L3,H2,902\n"
	d, err := ReadCSV(strings.NewReader(in), "g.csv")
	if err != nil {
		t.Fatal(err)
	}
	gs, err := d.Group(ByHeat, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(gs) != 2 || gs[0].Key != "H1" || len(gs[0].Specimens) != 2 || gs[1].Key != "H2" {
		t.Errorf("heat groups %+v", gs)
	}
	gl, _ := d.Group(ByLot, nil)
	if len(gl) != 3 {
		t.Errorf("lot groups %d", len(gl))
	}
	d2, _ := ReadCSV(strings.NewReader("specimen,lot,heat,tensile [MPa]\n1,L1,,900\n"), "g.csv")
	if _, err := d2.Group(ByHeat, nil); err == nil || err.Error() != `g.csv:2: specimen "1" has no heat, so specimens cannot be grouped by heat; fill the heat column or group by lot` {
		t.Errorf("heat missing: %v", err)
	}
}

// Calendar rules of the Gregorian calendar (ISO 8601), common knowledge.
func TestIsDate(t *testing.T) {
	for s, want := range map[string]bool{
		"2026-03-31": true, "2024-02-29": true, "2000-02-29": true, "1900-02-29": false,
		"2026-02-29": false, "2026-04-31": false, "2026-13-01": false, "2026-00-10": false,
		"2026-1-01": false, "26-01-01xx": false, "2026/01/01": false, "2026-01-00": false,
	} {
		if got := isDate(s); got != want {
			t.Errorf("isDate(%q) = %v, want %v", s, got, want)
		}
	}
}

// A quoted field may span lines; later lines keep their numbers. A line
// break inside an id or name is a control character and is refused
// (text.go).
func TestReadCSVMultilineQuotedField(t *testing.T) {
	in := "specimen,lot,supplier,tensile [MPa]\nA,L1,\"Mill\nNorth\",1000\nB,L1,M,x\n"
	_, err := ReadCSV(strings.NewReader(in), "m.csv")
	want := "m.csv:2:10: the supplier holds the control character line feed (U+000A); remove control characters: ids and names are plain one-line text (export the file again as UTF-8 text)\n" +
		`m.csv:4:8: tensile: "x" is not a number; write a decimal number such as 1034.5, or leave the cell empty for a missing value`
	if err == nil || err.Error() != want {
		t.Fatalf("got %v\nwant %s", err, want)
	}
}

// With the id index spilled to disk every 4 ids, repeats in different runs
// are still found, located and reported with the first line.
func TestDuplicateIDsAcrossSpilledRuns(t *testing.T) {
	defer func(c int) { idMemCap = c }(idMemCap)
	idMemCap = 4
	var b strings.Builder
	b.WriteString("specimen,lot,tensile [MPa]\n")
	for i := 0; i < 20; i++ {
		fmt.Fprintf(&b, "S%d,L1,%d\n", i, 900+i)
	}
	b.WriteString("S3,L1,950\nS17,L1,951\nS21,L1,952\n") // lines 22, 23, 24
	_, err := ReadCSV(strings.NewReader(b.String()), "r.csv")
	want := "r.csv:22:1: duplicate specimen id (the same id as on line 5); specimen ids must be unique; rename or remove one of them\n" +
		"r.csv:23:1: duplicate specimen id (the same id as on line 19); specimen ids must be unique; rename or remove one of them"
	if err == nil || err.Error() != want {
		t.Fatalf("got\n%v\nwant\n%s", err, want)
	}
	d, err := ReadCSV(strings.NewReader(strings.SplitN(b.String(), "S3,L1,950", 2)[0]), "r.csv")
	if err != nil || d.Len() != 20 {
		t.Fatalf("no duplicates: %v", err)
	}
}

// Input Go's number parser would take but a results file never holds, and
// inputs that must not make the reader hold the whole file.
func TestReadCSVOddInput(t *testing.T) {
	for _, c := range []struct{ name, in, want string }{
		{"hex float", "specimen,lot,tensile [MPa]\nS1,L1,0x1p10\n", `r.csv:2:7: tensile: "0x1p10" is not a number`},
		{"digit separator", "specimen,lot,tensile [MPa]\nS1,L1,1_000\n", `r.csv:2:7: tensile: "1_000" is not a number`},
		{"empty unit", "specimen,lot,tensile []\nS1,L1,1000\n", `r.csv:1:14: property column "tensile" has no unit`},
		{"bare carriage returns", "specimen,lot,tensile [MPa]\r" + strings.Repeat("S,L1,1000\r", 120000), `r.csv:1:1: cannot read the CSV: line longer than 1048576 bytes; the file seems to end its lines with a bare carriage return`},
		{"no line ends", strings.Repeat("a", 3<<20), `r.csv:1:1: cannot read the CSV: line longer than 1048576 bytes; each specimen goes on its own line`},
		{"long value", "specimen,lot,tensile [MPa]\nS1,L1," + strings.Repeat("9x", 100) + "\n", `r.csv:2:7: tensile: "9x9x9x9x9x9x9x9x9x9x9x9x9x9x9x9x9x9x9x9x"... is not a number`},
	} {
		_, err := ReadCSV(strings.NewReader(c.in), "r.csv")
		if err == nil || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("%s: got %v\nwant prefix %s", c.name, err, c.want)
		}
	}
}
