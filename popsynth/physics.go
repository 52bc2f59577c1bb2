package popsynth

import (
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/corefall/corefall/imf"
	"github.com/corefall/corefall/remnant"
)

// NewIMF returns the full initial mass function named by c (over [imf.min, imf.max]).
func NewIMF(c IMFConfig) (imf.IMF, error) {
	var (
		f   imf.IMF
		err error
	)
	switch c.Law {
	case "salpeter":
		f, err = imf.NewSalpeter(c.Min, c.Max)
	case "kroupa2001":
		f, err = imf.NewKroupa2001(c.Min, c.Max)
	case "chabrier2003":
		f, err = imf.NewChabrier2003(c.Min, c.Max)
	case "broken-power-law":
		f, err = imf.NewBrokenPowerLaw(c.Breaks, c.Slopes)
	default:
		return nil, oneOf("imf.law", c.Law, "salpeter", "kroupa2001", "chabrier2003", "broken-power-law")
	}
	if err != nil {
		return nil, fmt.Errorf("config: imf: %w", err)
	}
	return f, nil
}

// Prescription returns the remnant prescription set by the explosion, pair_instability and
// white_dwarf keys.
func (c Config) Prescription() (remnant.Prescription, error) {
	p := remnant.DefaultPrescription()
	eng, err := remnant.ParseEngine(c.Explosion.Engine)
	if err != nil {
		return p, bad("explosion.engine", c.Explosion.Engine, "must be rapid or delayed")
	}
	p.Engine = eng
	p.CollapseMinCO = c.Explosion.CollapseMinCO
	p.DirectCollapseCO = c.Explosion.DirectCollapseCO
	p.MaxNSMass = c.Explosion.MaxNSMass
	p.PairInstability = c.PairInstability.Enabled
	p.PulsationMinCO = c.PairInstability.PulsationMinCO
	p.PISNMinCO = c.PairInstability.PISNMinCO
	p.PISNMaxCO = c.PairInstability.PISNMaxCO
	p.WDSlope = c.WhiteDwarf.Slope
	p.WDIntercept = c.WhiteDwarf.Intercept
	p.ChandrasekharMass = c.WhiteDwarf.MaxMass
	if err := p.Validate(); err != nil {
		return p, fmt.Errorf("config: remnant prescription: %w", err)
	}
	return p, nil
}

// KickModel returns the natal-kick model set by the kicks keys.
func (c Config) KickModel() (remnant.Kicks, error) {
	k := remnant.DefaultKicks()
	mode, err := remnant.ParseBHKickMode(c.Kicks.BHMode)
	if err != nil {
		return k, bad("kicks.bh_mode", c.Kicks.BHMode, "must be fallback, momentum, full or none")
	}
	k.NSSigma = c.Kicks.NSSigma
	k.BHMode = mode
	k.RefNSMass = c.Kicks.ReferenceNSMass
	if err := k.Validate(); err != nil {
		return k, fmt.Errorf("config: kicks: %w", err)
	}
	return k, nil
}

// CoreModel returns the pre-collapse core model set by the core keys; a table model reads its grid.
func (c Config) CoreModel() (remnant.CoreModel, error) {
	switch c.Core.Model {
	case "builtin":
		b := c.Core.Builtin.Model()
		if err := b.Validate(); err != nil {
			return nil, fmt.Errorf("config: core.builtin: %w", err)
		}
		return b.Prepare(), nil
	case "table":
		rows, err := ReadStellarTable(c.Core.Table)
		if err != nil {
			return nil, err
		}
		t, err := remnant.NewTable(rows)
		if err != nil {
			return nil, fmt.Errorf("core.table %s: %w", c.Core.Table, err)
		}
		return t, nil
	}
	return nil, oneOf("core.model", c.Core.Model, "builtin", "table")
}

// metallicitySampler draws a system's metallicity as the metallicity keys say.
type metallicitySampler struct {
	sampling     string
	fixed        float64
	values       []float64
	lnMin, lnMax float64
}

func newMetallicitySampler(c MetallicityConfig) metallicitySampler {
	return metallicitySampler{
		sampling: c.Sampling, fixed: c.Fixed, values: c.Values,
		lnMin: math.Log(c.Min), lnMax: math.Log(c.Max),
	}
}

func (s *metallicitySampler) draw(src *rand.Rand) float64 {
	switch s.sampling {
	case "list":
		return s.values[src.IntN(len(s.values))]
	case "log-uniform":
		return math.Exp(s.lnMin + src.Float64()*(s.lnMax-s.lnMin))
	}
	return s.fixed
}

// bounds returns the smallest and largest metallicity the sampler can draw.
func (s *metallicitySampler) bounds() (lo, hi float64) {
	switch s.sampling {
	case "list":
		lo, hi = math.Inf(1), math.Inf(-1)
		for _, v := range s.values {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		return lo, hi
	case "log-uniform":
		return math.Exp(s.lnMin), math.Exp(s.lnMax)
	}
	return s.fixed, s.fixed
}

// Physics is everything that turns one star into its remnant: the core model, the remnant
// prescription, the kick model and the age at which the population is observed.
type Physics struct {
	Core         remnant.CoreModel
	Prescription remnant.Prescription
	Kicks        remnant.Kicks
	TimeLimitMyr float64

	builtin *remnant.Prepared // Core, when it is the builtin model (cached per metallicity)
}

// Physics builds the physics set by c's core, explosion, pair_instability, white_dwarf and kicks keys.
func (c Config) Physics() (Physics, error) {
	p := Physics{TimeLimitMyr: c.TimeLimitMyr}
	var err error
	if p.Prescription, err = c.Prescription(); err != nil {
		return p, err
	}
	if p.Kicks, err = c.KickModel(); err != nil {
		return p, err
	}
	if p.Core, err = c.CoreModel(); err != nil {
		return p, err
	}
	p.builtin, _ = p.Core.(*remnant.Prepared)
	return p, nil
}

// StarResult is one star's life and death.
type StarResult struct {
	Core    remnant.Core
	Remnant remnant.Remnant
	Kick    [3]float64 // natal kick velocity, km/s
}

// KickSpeed returns the magnitude of the natal kick, km/s.
func (s *StarResult) KickSpeed() float64 {
	return math.Sqrt(s.Kick[0]*s.Kick[0] + s.Kick[1]*s.Kick[1] + s.Kick[2]*s.Kick[2])
}

// Star evolves one star of initial mass m (Msun) and metallicity z to its remnant, drawing its kick
// from src. A star whose lifetime exceeds TimeLimitMyr is still a star (type star, fate alive).
func (p *Physics) Star(m, z float64, src *rand.Rand) (StarResult, error) {
	var s StarResult
	err := p.star(&s, m, z, src, nil)
	return s, err
}

// coreCache holds the builtin core model at the metallicity of the last star a worker evolved, so
// that a run at one metallicity (or a few) computes the metallicity factors once per batch.
type coreCache struct {
	bz remnant.BuiltinZ
	ok bool
}

// core returns the core of a star of mass m and metallicity z, using and updating cache when the
// core model is the builtin one.
func (p *Physics) core(m, z float64, cache *coreCache) (remnant.Core, error) {
	b := p.builtin
	if b == nil || cache == nil {
		return p.Core.Core(m, z)
	}
	if !cache.ok || cache.bz.Metallicity() != z {
		bz, err := b.AtMetallicity(z)
		if err != nil {
			return remnant.Core{}, err
		}
		cache.bz, cache.ok = bz, true
	}
	return cache.bz.Core(m)
}

// star evolves one star into *s (see Star), with the core model cached per metallicity in cache.
func (p *Physics) star(s *StarResult, m, z float64, src *rand.Rand, cache *coreCache) error {
	c, err := p.core(m, z, cache)
	if err != nil {
		return err
	}
	s.Core = c
	if c.LifetimeMyr > p.TimeLimitMyr {
		s.Remnant = remnant.Remnant{Type: remnant.Star, Fate: remnant.Alive}
		s.Kick = [3]float64{}
		return nil
	}
	s.Remnant = p.Prescription.Decide(c)
	s.Kick = p.Kicks.Draw(s.Remnant, src)
	return nil
}
