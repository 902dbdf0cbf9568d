package lots

import (
	"bytes"
	"encoding/csv"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

// The word-at-a-time split of an unquoted line gives the fields and the
// columns encoding/csv gives (the reference: Go's standard library reader
// of RFC 4180), calls a line printable exactly when every byte is
// printable ASCII (0x20 to 0x7E), and spaced exactly when it holds a
// space; on 20,000 random
// lines of commas, spaces, tabs, control characters, bytes above 0x7E,
// letters and digits, 0 to 70 bytes long (so that commas fall at every
// place of an eight-byte word).
func TestRecordReaderSplitMatchesEncodingCSV(t *testing.T) {
	r := rand.New(rand.NewPCG(12, 34))
	alphabet := []byte(",,,,  \t\x01\x1f\x7f\x80\xc3\xa9\xffaZ09.-_~!")
	var lines [][]byte
	var file bytes.Buffer
	for range 20000 {
		n := 1 + r.IntN(70)
		line := make([]byte, n)
		for i := range line {
			line[i] = alphabet[r.IntN(len(alphabet))]
		}
		if strings.TrimSpace(string(line)) == "" || line[0] == ' ' {
			continue // blank lines are skipped; a leading space is the same either way but keep the cases simple
		}
		lines = append(lines, line)
		file.Write(line)
		file.WriteByte('\n')
	}
	rr := newRecordReader(bytes.NewReader(file.Bytes()), "f.csv")
	cr := csv.NewReader(bytes.NewReader(file.Bytes()))
	cr.FieldsPerRecord = -1
	for i, line := range lines {
		got, err := rr.Read()
		if err != nil {
			t.Fatalf("line %d: %v", i+1, err)
		}
		want, err := cr.Read()
		if err != nil {
			t.Fatalf("encoding/csv, line %d: %v", i+1, err)
		}
		if !slices.Equal(got, want) {
			t.Fatalf("line %d %q: fields %q, encoding/csv %q", i+1, line, got, want)
		}
		for f := range want {
			wl, wc := cr.FieldPos(f)
			if gl, gc := rr.pos(f); gl != wl || gc != wc {
				t.Fatalf("line %d %q field %d at %d:%d, encoding/csv %d:%d", i+1, line, f, gl, gc, wl, wc)
			}
		}
		printable := true
		for _, c := range line {
			printable = printable && c >= 0x20 && c <= 0x7e
		}
		if spaced := bytes.IndexByte(line, ' ') >= 0; rr.printable != printable || rr.spaced != spaced {
			t.Fatalf("line %d %q: printable %v, spaced %v; want %v, %v", i+1, line, rr.printable, rr.spaced, printable, spaced)
		}
	}
}

// Spaces around a field are not part of it (common practice for
// hand-edited CSV): a file with padded fields, in lines that are printable
// ASCII, reads as the same file without the padding, while spaces inside
// a name are kept.
func TestReadCSVTrimsPaddedFields(t *testing.T) {
	plain := "specimen,lot,supplier,material,tensile [MPa]\nS1,L1,Mill A,Bar GX-7,1034.5\nS2,L1,Mill A,Bar GX-7,1040\n"
	padded := "specimen , lot,supplier ,  material  ,tensile [MPa]\n S1,L1 , Mill A,Bar GX-7 ,1034.5 \nS2  ,  L1,Mill A  ,Bar GX-7,  1040\n"
	want, err := ReadCSV(strings.NewReader(plain), "f.csv")
	if err != nil {
		t.Fatal(err)
	}
	got, err := ReadCSV(strings.NewReader(padded), "f.csv")
	if err != nil {
		t.Fatal(err)
	}
	for i := range want.Len() {
		w, g := want.Specimen(i), got.Specimen(i)
		if g.ID != w.ID || g.Lot != w.Lot || g.Supplier != w.Supplier || g.Material != w.Material || !slices.Equal(g.Values, w.Values) {
			t.Errorf("row %d: padded %+v, plain %+v", i+1, g, w)
		}
	}
}
