package campaign

import (
	"testing"
)

// BenchmarkCampaign is the planner's speed target: 5 plans x 1,000
// simulated campaigns of the automatic procedure (CV 5%, a normal
// population with 30% of the variance between lots), all cores.
func BenchmarkCampaign(b *testing.B) {
	c := config([]Plan{{3, 6}, {5, 6}, {10, 6}, {3, 18}, {5, 10}}, Population{Normal, 100, 0.05, 0.3}, 1000)
	for i := 0; i < b.N; i++ {
		if _, err := Run(c); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Seconds())/float64(b.N), "s/question")
}
