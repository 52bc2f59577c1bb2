package rates

import (
	"math"
	"math/rand/v2"
	"testing"
)

var (
	sinkFloat  float64
	sinkResult Result
)

// benchEvents returns n synthetic events: kinds at random, delays
// log-uniform from 3 Myr to 20 Gyr (some beyond the age of the Universe),
// Z log-uniform on [1e-4, 0.03].
func benchEvents(n int) []Event {
	src := rand.New(rand.NewPCG(11, 12))
	evs := make([]Event, n)
	for i := range evs {
		evs[i] = Event{
			Kind:        EventKind(src.IntN(int(numKinds))),
			DelayMyr:    3 * math.Pow(10, 3.82*src.Float64()),
			Metallicity: 1e-4 * math.Pow(300, src.Float64()),
			Weight:      1e-7,
		}
	}
	return evs
}

func benchEstimator() Estimator {
	return Estimator{
		Cosmology:   Planck18(),
		SFR:         MadauDickinson2014(),
		Metallicity: MadauFragos2017Metallicity(0.5),
		Sampling:    LogUniformZ(1e-4, 0.03),
	}
}

func BenchmarkAgeGyr(b *testing.B) {
	c := Planck18()
	b.ReportAllocs()
	for b.Loop() {
		sinkFloat += c.AgeGyr(2)
	}
}

func BenchmarkRedshiftAtAge(b *testing.B) {
	c := Planck18()
	b.ReportAllocs()
	for b.Loop() {
		z, _ := c.RedshiftAtAge(3)
		sinkFloat += z
	}
}

// BenchmarkTallyAdd measures the cost of binning one event.
func BenchmarkTallyAdd(b *testing.B) {
	evs := benchEvents(1 << 16)
	tl, err := benchEstimator().NewTally()
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		if err := tl.Add(evs[i&(len(evs)-1)]); err != nil {
			b.Fatal(err)
		}
		i++
	}
}

// BenchmarkRates200 measures Rates on a 200-point grid for a Tally whose
// delay and metallicity bins are all populated (its cost does not depend on
// the number of events).
func BenchmarkRates200(b *testing.B) {
	tl, err := benchEstimator().NewTally()
	if err != nil {
		b.Fatal(err)
	}
	if err := tl.AddEvents(benchEvents(1_000_000)); err != nil {
		b.Fatal(err)
	}
	zs, _ := RedshiftGrid(9.95, 0.05)
	b.ReportAllocs()
	for b.Loop() {
		res, err := tl.Rates(zs)
		if err != nil {
			b.Fatal(err)
		}
		sinkResult = res
	}
}

// BenchmarkTenMillionEvents is the whole job: a new Tally, 10 million
// events (a 100 000-event batch added 100 times, as a catalogue reader
// would pass record batches), and Rates on a 200-point grid.
func BenchmarkTenMillionEvents(b *testing.B) {
	evs := benchEvents(100_000)
	zs, _ := RedshiftGrid(9.95, 0.05)
	est := benchEstimator()
	b.ReportAllocs()
	for b.Loop() {
		tl, err := est.NewTally()
		if err != nil {
			b.Fatal(err)
		}
		for range 100 {
			if err := tl.AddEvents(evs); err != nil {
				b.Fatal(err)
			}
		}
		res, err := tl.Rates(zs)
		if err != nil {
			b.Fatal(err)
		}
		sinkResult = res
	}
}

// TestHotPathsDoNotAllocate: binning an event and evaluating one grid
// point allocate nothing.
func TestHotPathsDoNotAllocate(t *testing.T) {
	tl, err := benchEstimator().NewTally()
	if err != nil {
		t.Fatal(err)
	}
	evs := benchEvents(1000)
	i := 0
	if n := testing.AllocsPerRun(100, func() {
		if err := tl.Add(evs[i%len(evs)]); err != nil {
			t.Fatal(err)
		}
		i++
	}); n != 0 {
		t.Errorf("Tally.Add: %v allocations per event", n)
	}
	if err := tl.AddEvents(evs); err != nil {
		t.Fatal(err)
	}
	sc := tl.newRateScratch([]float64{0, 1.5, 4})
	if n := testing.AllocsPerRun(5, func() {
		if err := tl.accumulate(sc); err != nil {
			t.Fatal(err)
		}
	}); n != 0 {
		t.Errorf("accumulate: %v allocations per call", n)
	}
}
