package binary

import (
	"math"
	"math/rand/v2"
	"testing"
)

var (
	sinkF  float64
	sinkSN SNResult
)

func BenchmarkKepler(b *testing.B) {
	for _, e := range []float64{0.1, 0.5, 0.9, 0.999} {
		b.Run(fmtE(e), func(b *testing.B) {
			ms := make([]float64, 1024)
			src := rand.New(rand.NewPCG(1, 1))
			for i := range ms {
				ms[i] = 2 * math.Pi * src.Float64()
			}
			b.ReportAllocs()
			i := 0
			for b.Loop() {
				sinkF = Kepler(ms[i&1023], e)
				i++
			}
		})
	}
}

func fmtE(e float64) string {
	switch e {
	case 0.1:
		return "e=0.1"
	case 0.5:
		return "e=0.5"
	case 0.9:
		return "e=0.9"
	}
	return "e=0.999"
}

func BenchmarkSupernova(b *testing.B) {
	src := rand.New(rand.NewPCG(2, 2))
	kicks := make([]Vec3, 1024)
	for i := range kicks {
		kicks[i] = Vec3{265 * src.NormFloat64(), 265 * src.NormFloat64(), 265 * src.NormFloat64()}
	}
	o := Orbit{A: 2, E: 0.5}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		sinkSN = SupernovaRandom(o, 15, 1.4, 10, kicks[i&1023], src)
		i++
	}
}

func BenchmarkMergeTime(b *testing.B) {
	b.Run("eccentric", func(b *testing.B) {
		es := make([]float64, 1024)
		src := rand.New(rand.NewPCG(3, 3))
		for i := range es {
			es[i] = src.Float64()
		}
		b.ReportAllocs()
		i := 0
		for b.Loop() {
			sinkF = MergeTime(10, 8, 0.1, es[i&1023])
			i++
		}
	})
	b.Run("circular", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			sinkF = MergeTime(10, 8, 0.1, 0)
		}
	})
}

func BenchmarkRand(b *testing.B) {
	for _, c := range []struct {
		name string
		d    Distribution
	}{
		{"MassRatio", MassRatio{Kappa: -0.1, QMin: 0.1}},
		{"MassRatioFlat", MassRatio{Kappa: 0, QMin: 0.1}},
		{"SanaPeriod", SanaPeriod{LogPMin: 0.15, LogPMax: 5.5, Exponent: -0.55}},
		{"OpikSeparation", OpikSeparation{AMin: 0.1, AMax: 1e4}},
		{"Thermal", Thermal{}},
		{"Circular", Circular{}},
		{"PowerLawEcc", PowerLawEcc{Exponent: -0.45, EMax: 0.9}},
	} {
		b.Run(c.name, func(b *testing.B) {
			src := rand.New(rand.NewPCG(4, 4))
			b.ReportAllocs()
			for b.Loop() {
				sinkF = c.d.Rand(src)
			}
		})
	}
}
