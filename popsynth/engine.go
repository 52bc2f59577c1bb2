package popsynth

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"

	"github.com/corefall/corefall/imf"
	"github.com/corefall/corefall/popsynth/catalog"
)

// Engine is the Monte Carlo population engine: it samples systems, evolves every star to its
// remnant and fills columnar batches of the catalogue. Build one with NewEngine; an Engine is
// read-only while it runs and may run several times.
type Engine struct {
	cfg     Config
	full    imf.IMF // the whole IMF, for normalisation
	sampler imf.IMF // the IMF restricted to [sample_min, sample_max]
	metal   metallicitySampler
	phys    Physics
	bin     *binarySetup // nil when the run makes no binaries
	schema  *catalog.Schema
	col     columns
}

// NewEngine checks cfg and builds the physics it names. Errors name the offending key.
func NewEngine(cfg Config) (*Engine, error) {
	if err := cfg.Validate(); err != nil {
		return nil, err
	}
	e := &Engine{cfg: cfg, metal: newMetallicitySampler(cfg.Metallicity)}
	var err error
	if e.full, err = NewIMF(cfg.IMF); err != nil {
		return nil, err
	}
	if e.sampler, err = imf.Restrict(e.full, cfg.IMF.SampleMin, cfg.IMF.SampleMax); err != nil {
		return nil, fmt.Errorf("config: imf.sample_min/imf.sample_max: %w", err)
	}
	if e.phys, err = cfg.Physics(); err != nil {
		return nil, err
	}
	if err := e.checkCoverage(); err != nil {
		return nil, err
	}
	if cfg.binariesOn() {
		if e.bin, err = newBinarySetup(cfg); err != nil {
			return nil, err
		}
	}
	e.schema, err = catalog.NewSchema(catalog.Columns(e.bin != nil))
	if err != nil {
		return nil, err
	}
	e.col = indexColumns(e.schema, e.bin != nil)
	return e, nil
}

// checkCoverage makes sure the core model answers over the whole sampled mass and metallicity range
// before anything runs (a table model only covers its grid).
func (e *Engine) checkCoverage() error {
	zlo, zhi := e.metal.bounds()
	mlo, mhi := e.cfg.IMF.SampleMin, e.cfg.IMF.SampleMax
	if e.cfg.binariesOn() {
		mlo = math.Min(mlo, e.cfg.IMF.SampleMin*e.cfg.Binary.QMin)
	}
	for _, z := range []float64{zlo, zhi} {
		for _, m := range []float64{mlo, mhi} {
			if _, err := e.phys.Core.Core(m, z); err != nil {
				return fmt.Errorf("core model cannot evolve the sampled range (masses %v-%v Msun, metallicity %v-%v): %w; "+
					"narrow imf.sample_min/imf.sample_max (and binary.q_min) or the metallicity keys, or extend the grid", mlo, mhi, zlo, zhi, err)
			}
		}
	}
	return nil
}

// Config returns the engine's configuration.
func (e *Engine) Config() Config { return e.cfg }

// Schema returns the catalogue schema the engine fills.
func (e *Engine) Schema() *catalog.Schema { return e.schema }

// MassRepresented returns the total stellar mass (Msun) of the population the catalogue stands for:
// every star of the full IMF range [imf.min, imf.max], sampled or not, companions included. Rate
// studies divide event counts by it.
func (e *Engine) MassRepresented() float64 {
	// The primaries (and single stars): N sampled stand for N / NumberFraction(sample range) stars
	// of the whole IMF, of mean mass <m> each.
	primaries := imf.MassRepresented(e.full, e.cfg.IMF.SampleMin, e.cfg.IMF.SampleMax, int(e.cfg.Systems))
	if e.bin == nil {
		return primaries
	}
	// Each of those systems carries on average meanCompanionMass of companions besides <m>.
	return primaries * (1 + e.bin.meanCompanionMass(e.full)/e.full.Mean())
}

// Progress is called by Run with the number of systems written so far.
type Progress func(done int64)

// Run evolves all systems. It calls emit with each batch in index order from one goroutine (the
// batch is reused after emit returns) and progress after each. It stops early, returning the
// context's error, when ctx is cancelled, and returns the first error of emit.
func (e *Engine) Run(ctx context.Context, emit func(*catalog.Batch) error, progress Progress) (Tally, error) {
	n := e.cfg.Systems
	nb := (n + BatchSize - 1) / BatchSize
	workers := e.cfg.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = int(min(int64(workers), nb))
	ctx, cancel := context.WithCancelCause(ctx)
	defer cancel(nil)

	type result struct {
		index int64
		batch *catalog.Batch
		err   error
	}
	// A worker takes a free buffer before it takes the next batch index, so the lowest batch not
	// yet written is always held by a running worker and the writer can never starve.
	free := make(chan *catalog.Batch, workers+2)
	for range workers + 2 {
		free <- catalog.NewBatch(e.schema, BatchSize)
	}
	results := make(chan result, workers+2)
	tallies := make([]Tally, workers)
	var (
		mu   sync.Mutex
		next int64
		wg   sync.WaitGroup
	)
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				var buf *catalog.Batch
				select {
				case <-ctx.Done():
					return
				case buf = <-free:
				}
				mu.Lock()
				b := next
				next++
				mu.Unlock()
				if b >= nb {
					return
				}
				err := e.fillBatch(b, buf, &tallies[w])
				results <- result{b, buf, err}
			}
		}()
	}
	go func() { wg.Wait(); close(results) }()

	pending := make(map[int64]*catalog.Batch)
	var (
		want int64
		done int64
		fail error
	)
	for r := range results {
		if fail != nil {
			continue
		}
		if r.err != nil {
			fail = r.err
			cancel(fail)
			continue
		}
		pending[r.index] = r.batch
		for {
			buf, ok := pending[want]
			if !ok {
				break
			}
			delete(pending, want)
			if err := emit(buf); err != nil {
				fail = err
				cancel(fail)
				break
			}
			done += int64(min(int64(BatchSize), e.cfg.Systems-want*BatchSize))
			want++
			free <- buf
			if progress != nil {
				progress(done)
			}
		}
	}
	var t Tally
	for i := range tallies {
		t.Merge(&tallies[i])
	}
	if fail != nil {
		return t, fail
	}
	if err := ctx.Err(); err != nil {
		return t, context.Cause(ctx)
	}
	if want != nb {
		return t, fmt.Errorf("popsynth: internal error: wrote %d of %d batches", want, nb)
	}
	return t, nil
}

// fillBatch evolves the systems of batch b into out, drawing only from the stream of (seed, b).
func (e *Engine) fillBatch(b int64, out *catalog.Batch, t *Tally) error {
	first := b * BatchSize
	count := min(int64(BatchSize), e.cfg.Systems-first)
	out.Reset(int(count))
	e.col.clearNullable(out)
	src := Stream(e.cfg.Seed, uint64(b))
	var cache coreCache
	rows := 0 // rows kept so far; a dropped system's row is overwritten by the next one
	for i := range int(count) {
		id := first + int64(i)
		var err error
		drop := false
		if e.bin != nil {
			err = e.evolveSystem(id, rows, out, t, src, &cache, &drop)
		} else {
			err = e.evolveSingle(id, rows, out, t, src, &cache)
		}
		if err != nil {
			return fmt.Errorf("system %d: %w", id, err)
		}
		if !drop {
			rows++
		}
	}
	out.Reset(rows) // shrinks to the kept rows; their values stay
	t.Systems += count
	return nil
}

func (e *Engine) evolveSingle(id int64, i int, out *catalog.Batch, t *Tally, src *rand.Rand, cache *coreCache) error {
	m := e.sampler.Rand(src)
	z := e.metal.draw(src)
	var s StarResult
	if err := e.phys.star(&s, m, z, src, cache); err != nil {
		return err
	}
	e.col.putSystem(out, i, id, z)
	e.col.star.put(out, i, &s)
	t.AddStar(s.Remnant.Type, s.Remnant.Mass)
	t.Outcomes[Single]++
	return nil
}
