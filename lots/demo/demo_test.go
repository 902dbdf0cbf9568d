package demo

import (
	"bytes"
	"testing"
)

// The embedded files are exactly what the generator makes from Seed, so
// the scenario can be regenerated and audited.
func TestEmbeddedMatchesGenerator(t *testing.T) {
	for name, want := range Generate(Seed) {
		got, err := Read(name)
		if err != nil {
			t.Errorf("%s: %v (run go run ./lots/demo/gen)", name, err)
			continue
		}
		if !bytes.Equal(got, want) {
			t.Errorf("%s differs from Generate(Seed); run go run ./lots/demo/gen", name)
		}
	}
	a, b := Generate(1), Generate(1)
	if !bytes.Equal(a["receipts.csv"], b["receipts.csv"]) {
		t.Error("generator is not deterministic for a fixed seed")
	}
}
