package lots

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"lotproof/lots/scale"
)

// onlyReader hides everything but Read (standard input from a pipe).
type onlyReader struct{ r io.Reader }

func (o onlyReader) Read(p []byte) (int, error) { return o.r.Read(p) }

// lotsOf reads data with ReadCSV and Group: the reference ScanLots must match.
func lotsOf(t *testing.T, data []byte, by GroupBy) (*Dataset, []*Lot) {
	t.Helper()
	d, err := ReadCSV(bytes.NewReader(data), "x.csv")
	if err != nil {
		t.Fatal(err)
	}
	groups, err := d.Group(by, nil)
	if err != nil {
		t.Fatal(err)
	}
	var out []*Lot
	for i, g := range groups {
		out = append(out, d.Lot(g, i))
	}
	return d, out
}

func sameLots(t *testing.T, what string, got, want []*Lot) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d lots, want %d", what, len(got), len(want))
	}
	for i := range want {
		g, w := got[i], want[i]
		if g.Key != w.Key || g.Supplier != w.Supplier || g.Material != w.Material || g.Mixed != w.Mixed || g.Index != w.Index ||
			!reflect.DeepEqual(g.Lines, w.Lines) || g.Len() != w.Len() {
			t.Fatalf("%s: lot %d is %q/%q/%v n=%d, want %q/%q/%v n=%d", what, i, g.Key, g.Supplier, g.Mixed, g.Len(), w.Key, w.Supplier, w.Mixed, w.Len())
		}
		for j := 0; j < w.Len(); j++ {
			if g.ID(j) != w.ID(j) {
				t.Fatalf("%s: lot %s specimen %d is %q, want %q", what, w.Key, j, g.ID(j), w.ID(j))
			}
			for p := range w.Values {
				a, b := g.Values[p][j], w.Values[p][j]
				if a != b && !(math.IsNaN(a) && math.IsNaN(b)) {
					t.Fatalf("%s: lot %s specimen %d property %d is %v, want %v", what, w.Key, j, p, a, b)
				}
			}
		}
	}
}

// ScanLots hands over exactly the lots of ReadCSV + Group, in the same
// order, whether the file is grouped by lot (one lot held at a time),
// interleaved (read twice, the second time into the column store) or read
// from a pipe (column store at once); files of several reader buffers.
func TestScanLotsMatchesReadCSV(t *testing.T) {
	for _, tc := range []struct {
		name string
		o    scale.Options
		by   GroupBy
	}{
		{"grouped", scale.Options{Specimens: 20000, Lots: 400}, ByLot},
		{"interleaved", scale.Options{Specimens: 20000, Lots: 400, Interleave: 7}, ByLot},
		{"by heat", scale.Options{Specimens: 20000, Lots: 400}, ByHeat},
		{"one lot", scale.Options{Specimens: 3, Lots: 1}, ByLot},
	} {
		var buf bytes.Buffer
		if _, err := scale.Write(&buf, tc.o); err != nil {
			t.Fatal(err)
		}
		// Some missing values and a mixed supplier.
		data := bytes.Replace(buf.Bytes(), []byte(",Birchfold,"), []byte(",Birchfold Two,"), 3)
		data = bytes.Replace(data, []byte(",2026-01-05,1"), []byte(",2026-01-05,"), 50)
		want, wantLots := lotsOf(t, data, tc.by)
		for _, src := range []struct {
			name string
			r    io.Reader
		}{{"seekable", bytes.NewReader(data)}, {"pipe", onlyReader{bytes.NewReader(data)}}} {
			var got []*Lot
			begins := 0
			d, err := ScanLots(src.r, "x.csv", LotScan{By: tc.by, Begin: func(*Dataset) { begins++; got = got[:0] },
				Lot: func(l *Lot) error { got = append(got, l); return nil }})
			if err != nil {
				t.Fatal(err)
			}
			what := tc.name + ", " + src.name
			sameLots(t, what, got, wantLots)
			if d.Digest != want.Digest || d.Bytes != want.Bytes || !reflect.DeepEqual(d.Missing, want.Missing) || !reflect.DeepEqual(d.Properties, want.Properties) {
				t.Errorf("%s: dataset %s %d %v, want %s %d %v", what, d.Digest, d.Bytes, d.Missing, want.Digest, want.Bytes, want.Missing)
			}
			wantBegins := 1
			if tc.o.Interleave > 1 && src.name == "seekable" {
				wantBegins = 2 // read again into the column store
			}
			if begins != wantBegins {
				t.Errorf("%s: %d passes, want %d", what, begins, wantBegins)
			}
		}
	}
}

// ScanLots reports bad input exactly as ReadCSV does, and a specimen
// without a heat as Group does, after the whole file checked out.
func TestScanLotsErrorsAsReadCSV(t *testing.T) {
	head := "specimen,lot,heat,tensile [MPa]\n"
	for _, data := range []string{
		head + "a,L1,H1,1000\nb,L1,H1,1010\nc,L2,H2,x\na,L2,H2,1000\n",
		head + "a,L1,H1,1000\nb,L2,,1010\nc,L1,H1,1000\n",
		head + "a,L1,H1,1000\nb,L2,,1010\nc,L1,H1,1000\nc,L3,H1,1000\n",
		head,
		"",
	} {
		for _, by := range []GroupBy{ByLot, ByHeat} {
			var want error
			d, err := ReadCSV(strings.NewReader(data), "x.csv")
			if err != nil {
				want = err
			} else if _, err := d.Group(by, nil); err != nil {
				want = err
			}
			_, got := ScanLots(strings.NewReader(data), "x.csv", LotScan{By: by, Lot: func(*Lot) error { return nil }})
			if (got == nil) != (want == nil) || got != nil && got.Error() != want.Error() {
				t.Errorf("%q by %s: error %v, want %v", data, by, got, want)
			}
		}
	}
}

// A repeated id found on the other core sends ScanLots back to the start
// with the check in line: the messages, their order and the count of the
// rest are those of ReadCSV, with the repeat early, late (after several
// batches), beside other problems, and across spilled runs.
func TestScanLotsDuplicateIDsAsReadCSV(t *testing.T) {
	var b strings.Builder
	b.WriteString("specimen,lot,heat,tensile [MPa]\n")
	for i := 0; i < 10000; i++ {
		fmt.Fprintf(&b, "S%d,L%d,H1,%d\n", i, i/10, 900+i%50)
	}
	base := b.String()
	inputs := []string{
		base + "S5,L9,H1,900\n",
		base + "S9999,L9,H1,x\nS17,,H1,1\n",
		"specimen,lot,tensile [MPa]\nA,L1,1\nB,L1,x\nA,L1,2\n" + strings.Repeat("C,L2,3\n", 30),
		strings.Replace(base, "S20,", "S7,", 1),
		base,
	}
	for _, memCap := range []int{idMemCap, 1000} {
		func() {
			// The second time, both checks spill: the in-line index and the
			// runs sorted on another core (a repeat across them).
			defer func(c, r int) { idMemCap, idRunLen = c, r }(idMemCap, idRunLen)
			idMemCap, idRunLen = memCap, min(memCap, idRunLen)
			for i, in := range inputs {
				_, want := ReadCSV(strings.NewReader(in), "r.csv")
				_, got := ScanLots(strings.NewReader(in), "r.csv", LotScan{By: ByLot, Lot: func(*Lot) error { return nil }})
				if (got == nil) != (want == nil) || got != nil && got.Error() != want.Error() {
					t.Errorf("input %d, memory cap %d: got\n%v\nwant\n%v", i, memCap, got, want)
				}
			}
		}()
	}
}

// TestRescanFileChecksTheDigest: the second reading calls fn for every
// specimen in file order, and refuses a file whose SHA-256 is not the one
// of the first reading (it changed in between).
func TestRescanFileChecksTheDigest(t *testing.T) {
	name := filepath.Join(t.TempDir(), "r.csv")
	if err := os.WriteFile(name, []byte("specimen,lot,tensile [MPa]\nA1,L1,100\nA2,L1,101\nB1,L2,99\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	d, err := ScanLotsFile(name, ReadOptions{}, LotScan{By: ByLot, Lot: func(*Lot) error { return nil }})
	if err != nil {
		t.Fatal(err)
	}
	var ids []string
	if err := RescanFile(name, d.Digest, func(s *Specimen) error { ids = append(ids, strings.Clone(s.ID)); return nil }); err != nil {
		t.Fatal(err)
	}
	if strings.Join(ids, " ") != "A1 A2 B1" {
		t.Errorf("specimens %v, want A1 A2 B1 in file order", ids)
	}
	if err := os.WriteFile(name, []byte("specimen,lot,tensile [MPa]\nA1,L1,100\nA2,L1,102\nB1,L2,99\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	err = RescanFile(name, d.Digest, func(*Specimen) error { return nil })
	var ie *InputError
	if !errors.As(err, &ie) || !strings.Contains(err.Error(), "changed while it was being read") {
		t.Errorf("changed file: %v, want an input error saying it changed", err)
	}
}
