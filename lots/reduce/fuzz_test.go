package reduce

import (
	"errors"
	"math"
	"strings"
	"testing"

	"lotproof/lots"
)

// FuzzParseBytes: any bytes give either records or a located
// *lots.InputError (every problem at "f.rec:line:column"), never a panic;
// a parsed record has a force, strain and line for every point, all finite,
// and positive dimensions. The seeds run as ordinary tests; `go test -fuzz
// FuzzParseBytes ./lots/reduce/` explores further.
func FuzzParseBytes(f *testing.F) {
	sp := alu
	sp.Points = 40
	if b, err := Synthesize(sp); err == nil {
		f.Add(b)
	}
	f.Add([]byte(""))
	f.Add([]byte("@record\nspecimen: A\n@data\n1 2\n"))
	f.Add([]byte("@record\nspecimen: A\nlot: L\ndiameter: 8\ngauge length: 40\nforce unit: kN\nlength unit: mm\n@data\n0 0\n1e308 1e308\nnan 1\n@end\n"))
	f.Add([]byte("@record\nspecimen: A\x00\u202E\nlot: L\n@data\n@end\n@end\n@record\n"))
	f.Add([]byte("@data\n1,2;3\t4\n@record\ncolumns: strain force time\nstrain unit: %\n"))
	f.Add([]byte("@record\nspecimen: A\nlot: L\ndiameter: 8\ngauge length: 40\nforce unit: kN\nlength unit: mm\n@data\n0 0\n1e36 1\n1 1e300\n0x1p3 1_000\n@end\n"))
	f.Fuzz(func(t *testing.T, b []byte) {
		recs, err := ParseBytes(b, "f.rec")
		if err != nil {
			var ie *lots.InputError
			if !errors.As(err, &ie) || len(ie.Problems) == 0 {
				t.Fatalf("error is not a located input error: %T %v", err, err)
			}
			for _, p := range ie.Problems {
				if !strings.HasPrefix(p.Where, "f.rec") {
					t.Fatalf("problem not located in the file: %+v", p)
				}
			}
			return
		}
		for _, r := range recs {
			for i := 0; i < r.Len(); i++ {
				f, x, line := r.Point(i)
				if math.IsNaN(f) || math.IsInf(f, 0) || math.IsNaN(x) || math.IsInf(x, 0) || line < 1 {
					t.Fatalf("record %q point %d: force %v strain %v line %d", r.ID, i, f, x, line)
				}
			}
			if !(r.Area > 0) || !(r.Gauge > 0) || math.IsInf(r.Area, 0) || math.IsInf(r.Gauge, 0) {
				t.Fatalf("record %q: area %v gauge %v", r.ID, r.Area, r.Gauge)
			}
		}
	})
}
