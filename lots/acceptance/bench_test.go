package acceptance

import (
	"testing"

	"lotproof/lots"
	"lotproof/spec"
)

// BenchmarkJudgeDemo judges the 64 demo lots (invented data, used here
// for timing only) against both demo specifications.
func BenchmarkJudgeDemo(b *testing.B) {
	d, err := lots.ReadFile("../demo/data/receipts.csv", lots.ReadOptions{})
	if err != nil {
		b.Fatal(err)
	}
	var ss []*spec.Spec
	for _, f := range []string{"../demo/data/spec-steel-bar.yaml", "../demo/data/spec-plate.yaml"} {
		s, err := spec.ReadFile(f)
		if err != nil {
			b.Fatal(err)
		}
		ss = append(ss, s)
	}
	for b.Loop() {
		if _, err := Judge(d, ss, lots.ByLot); err != nil {
			b.Fatal(err)
		}
	}
}
