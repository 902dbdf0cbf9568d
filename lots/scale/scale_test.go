package scale

import (
	"bytes"
	"strings"
	"testing"
)

// The generator gives the same bytes for the same options, the asked
// numbers of specimens and lots, and interleaves when asked.
func TestWrite(t *testing.T) {
	var a, b, c bytes.Buffer
	o := Options{Specimens: 1003, Lots: 20}
	na, err := Write(&a, o)
	if err != nil {
		t.Fatal(err)
	}
	Write(&b, o)
	if na != int64(a.Len()) || !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Fatal("not deterministic, or the byte count is wrong")
	}
	rows := strings.Split(strings.TrimSuffix(a.String(), "\n"), "\n")
	if rows[0]+"\n" != Header || len(rows) != 1004 {
		t.Fatalf("%d rows", len(rows))
	}
	lots, runs, last := map[string]int{}, 0, ""
	for _, r := range rows[1:] {
		lot := strings.Split(r, ",")[1]
		lots[lot]++
		if lot != last {
			runs++
			last = lot
		}
	}
	if len(lots) != 20 || runs != 20 || lots["L100000"] != 51 || lots["L100019"] != 50 {
		t.Fatalf("%d lots in %d runs, first %d specimens", len(lots), runs, lots["L100000"])
	}
	o.Interleave = 4
	Write(&c, o)
	if strings.Count(c.String(), "\n") != 1004 {
		t.Fatal("interleaving changed the rows")
	}
	if strings.Split(strings.Split(c.String(), "\n")[2], ",")[1] != "L100001" {
		t.Fatal("not interleaved")
	}
}
