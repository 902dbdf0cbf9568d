package report

import (
	"io"
	"testing"
)

// BenchmarkSampleDocument measures building the nine plots of the sample
// report (gonum plot to SVG).
func BenchmarkSampleDocument(b *testing.B) {
	for b.Loop() {
		if _, err := sampleDocument(); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkWriteHTML measures writing a built report (SVG checks, id
// namespacing, template).
func BenchmarkWriteHTML(b *testing.B) {
	d, err := sampleDocument()
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for b.Loop() {
		if err := d.WriteHTML(io.Discard); err != nil {
			b.Fatal(err)
		}
	}
}
