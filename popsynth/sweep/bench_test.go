package sweep

import "testing"

var benchSink *Manifest

// BenchmarkPlan measures expanding and validating the 24-task grid of gridSweep (12 cells, each
// loaded with popsynth.Load and built with popsynth.NewEngine).
func BenchmarkPlan(b *testing.B) {
	s, err := ParseSpec("bench.yaml", []byte(gridSweep))
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if benchSink, err = s.Plan(); err != nil {
			b.Fatal(err)
		}
	}
}
