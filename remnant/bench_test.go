package remnant

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Package-level sinks keep the compiler from discarding benchmarked work.
var (
	sinkCore    Core
	sinkRemnant Remnant
	sinkKick    [3]float64
)

// benchStars is a fixed spread of (mass, metallicity) pairs over the massive
// stars a population samples, so that every branch of the relations is used.
var benchStars = func() [][2]float64 {
	src := rand.New(rand.NewPCG(1, 2))
	s := make([][2]float64, 1024)
	for i := range s {
		s[i] = [2]float64{8 * math.Pow(10, 1.6*src.Float64()), 1e-4 * math.Pow(10, 2.3*src.Float64())} // 8-320 Msun, Z 1e-4 to 0.02
	}
	return s
}()

func BenchmarkBuiltinCore(b *testing.B) {
	m := DefaultBuiltin()
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		s := benchStars[i&1023]
		sinkCore, _ = m.Core(s[0], s[1])
		i++
	}
}

// BenchmarkPreparedCore is the engine's path when every star has its own metallicity.
func BenchmarkPreparedCore(b *testing.B) {
	m := DefaultBuiltin().Prepare()
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		s := benchStars[i&1023]
		sinkCore, _ = m.Core(s[0], s[1])
		i++
	}
}

// BenchmarkBuiltinZCore is the engine's path for a fixed metallicity (or a list of them).
func BenchmarkBuiltinZCore(b *testing.B) {
	bz, err := DefaultBuiltin().Prepare().AtMetallicity(0.0142)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		sinkCore, _ = bz.Core(benchStars[i&1023][0])
		i++
	}
}

func BenchmarkTableCore(b *testing.B) {
	masses := []float64{8, 10, 12, 15, 20, 25, 30, 40, 50, 60, 80, 100, 120, 150, 200}
	metals := []float64{1e-4, 3e-4, 1e-3, 3e-3, 0.006, 0.01, 0.0142, 0.02, 0.03}
	t, err := NewTable(DemoGrid(DefaultBuiltin(), masses, metals))
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		s := benchStars[i&1023]
		sinkCore, _ = t.Core(s[0], s[1])
		i++
	}
}

func benchmarkDecide(b *testing.B, e EngineKind) {
	m := DefaultBuiltin()
	p := DefaultPrescription()
	p.Engine = e
	cores := make([]Core, len(benchStars))
	for i, s := range benchStars {
		cores[i], _ = m.Core(s[0], s[1])
	}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		sinkRemnant = p.Decide(cores[i&1023])
		i++
	}
}

func BenchmarkDecideRapid(b *testing.B)   { benchmarkDecide(b, Rapid) }
func BenchmarkDecideDelayed(b *testing.B) { benchmarkDecide(b, Delayed) }

func BenchmarkKicksDraw(b *testing.B) {
	k := DefaultKicks()
	src := rand.New(rand.NewPCG(3, 4))
	r := Remnant{Type: BH, Mass: 10, FallbackFraction: 0.3}
	b.ReportAllocs()
	for b.Loop() {
		sinkKick = k.Draw(r, src)
	}
}
