package spec

import (
	"errors"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"

	"lotproof/lots"
)

// FuzzParse: any bytes give either a valid specification or a located
// *lots.InputError, never a panic; a valid one has finite limits, a sane
// rule and text without control or direction characters. The seeds run as
// ordinary tests; `go test -fuzz FuzzParse ./spec/` explores further.
func FuzzParse(f *testing.F) {
	for _, p := range []string{"../testdata/acceptance/spec-test.yaml", "../lots/demo/data/spec-steel-bar.yaml", "../lots/demo/data/spec-plate.yaml"} {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	f.Add([]byte(""))
	f.Add([]byte("a: &x [*x]\n"))
	f.Add([]byte("specification: S\nrevision: A\nmaterial: \"M\\u202E\"\nproperties: {t: {unit: MPa, min: 1}}\nacceptance: {content: 0.9, confidence: 0.9}\n"))
	f.Add([]byte("specification: S\nrevision: A\nmaterial: M\nproperties: {t: {unit: MPa, min: .nan}}\nacceptance: {}\n"))
	f.Add([]byte("a: [[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]\n"))
	f.Add([]byte("specification: S\x00\n"))
	f.Fuzz(func(t *testing.T, b []byte) {
		s, err := Parse("f.yaml", b)
		if err != nil {
			var ie *lots.InputError
			if !errors.As(err, &ie) || len(ie.Problems) == 0 {
				t.Fatalf("error is not a located input error: %T %v", err, err)
			}
			for _, p := range ie.Problems {
				if !strings.HasPrefix(p.Where, "f.yaml") {
					t.Fatalf("problem not located in the file: %+v", p)
				}
			}
			return
		}
		if len(s.Limits) == 0 || len(s.Limits) > MaxProperties {
			t.Fatalf("%d limits", len(s.Limits))
		}
		for _, l := range s.Limits {
			if math.IsInf(l.Min, 0) || math.IsInf(l.Max, 0) || !l.HasMin() && !l.HasMax() {
				t.Fatalf("limit %+v", l)
			}
			if off, _, _ := lots.TextProblem(l.Property); off >= 0 {
				t.Fatalf("property name %q accepted", l.Property)
			}
		}
		for _, v := range []string{s.ID, s.Revision, s.Material, s.Title} {
			if off, _, _ := lots.TextProblem(v); off >= 0 {
				t.Fatalf("text %q accepted", v)
			}
		}
		r := s.Acceptance
		if !(r.Content > 0 && r.Content < 1) || !(r.Confidence > 0 && r.Confidence < 1) || r.MinSpecimens < 1 {
			t.Fatalf("rule %+v", r)
		}
	})
}

// A specification at the property limit is read; one more is refused at
// the properties key, as is one beyond 1 MiB.
func TestParseLimits(t *testing.T) {
	mk := func(n int) []byte {
		var b strings.Builder
		b.WriteString("specification: S\nrevision: A\nmaterial: M\nproperties:\n")
		for i := 0; i < n; i++ {
			fmt.Fprintf(&b, "  p%d: {unit: MPa, min: 1}\n", i)
		}
		b.WriteString("acceptance: {content: 0.9, confidence: 0.9, min_specimens: 2, individual_reject: true, retests: 0, retest_factor: 2}\n")
		return []byte(b.String())
	}
	if s, err := Parse("s.yaml", mk(MaxProperties)); err != nil || len(s.Limits) != MaxProperties {
		t.Fatalf("at the limit: %v", err)
	}
	_, err := Parse("s.yaml", mk(MaxProperties+1))
	if err == nil || !strings.Contains(err.Error(), "s.yaml:5:3: 10001 properties, more than the limit of 10000") {
		t.Fatalf("beyond the limit: %v", err)
	}
	big := append([]byte("title: \""), make([]byte, 1<<20)...)
	_, err = Parse("s.yaml", big)
	if err == nil || !strings.Contains(err.Error(), "s.yaml: the specification is larger than the limit of 1 MiB") {
		t.Fatalf("beyond 1 MiB: %v", err)
	}
	_, err = Parse("s.yaml", []byte("specification: S\nrevision: A\nmaterial: \"Bar\u202E\"\nproperties: {t: {unit: MPa, min: 1}}\nacceptance: {content: 0.9, confidence: 0.9}\n"))
	if err == nil || !strings.Contains(err.Error(), "s.yaml:3:11: material holds the invisible direction character U+202E") {
		t.Fatalf("direction character: %v", err)
	}
}
