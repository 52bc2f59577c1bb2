package popsynth

import (
	"context"
	"path/filepath"
	"strconv"
	"testing"

	"github.com/corefall/corefall/popsynth/catalog"
)

// benchEngine runs the engine over n systems per iteration and reports systems per second.
func benchEngine(b *testing.B, n int, set ...string) {
	cfg := load(b, append([]string{"systems=" + itoa(n)}, set...)...)
	e, err := NewEngine(cfg)
	if err != nil {
		b.Fatal(err)
	}
	discard := func(*catalog.Batch) error { return nil }
	b.ReportAllocs()
	for b.Loop() {
		if _, err := e.Run(context.Background(), discard, nil); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "systems/s")
}

// BenchmarkEngineSingle is the whole single-star engine without output (all cores).
func BenchmarkEngineSingle(b *testing.B) { benchEngine(b, 1<<21) }

// BenchmarkEngineSingle1Worker is the same on one worker, for the scaling figure.
func BenchmarkEngineSingle1Worker(b *testing.B) { benchEngine(b, 1<<20, "workers=1") }

// BenchmarkEngineBinary is the whole binary engine without output (every system a binary).
func BenchmarkEngineBinary(b *testing.B) { benchEngine(b, 1<<20, "binary_fraction=1") }

// BenchmarkWriteCatalogue is the engine with the zstd Parquet writer.
func BenchmarkWriteCatalogue(b *testing.B) {
	const n = 1 << 21
	e, err := NewEngine(load(b, "systems="+itoa(n)))
	if err != nil {
		b.Fatal(err)
	}
	path := filepath.Join(b.TempDir(), "c.parquet")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := e.WriteCatalogue(context.Background(), path, nil); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "systems/s")
}

func itoa(n int) string {
	return strconv.Itoa(n)
}

// BenchmarkEngineBinary1Worker is the binary engine on one worker, for profiling.
func BenchmarkEngineBinary1Worker(b *testing.B) {
	benchEngine(b, 1<<19, "binary_fraction=1", "workers=1")
}
