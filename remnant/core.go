package remnant

import (
	"fmt"
	"math"
)

// Core is a star's state at the end of its life, the input of the remnant
// decision. Masses are in Msun, times in Myr, radii in Rsun.
type Core struct {
	InitialMass float64 // zero-age main-sequence mass, Msun
	Metallicity float64 // metal mass fraction Z
	LifetimeMyr float64 // total lifetime to core collapse (or to white-dwarf formation), Myr
	FinalMass   float64 // mass of the star at the end of its life, Msun
	HeCoreMass  float64 // helium-core mass at the end of its life, Msun
	COCoreMass  float64 // carbon-oxygen-core mass at the end of its life, Msun
	MaxRadius   float64 // largest radius reached in life, Rsun; 0 if unknown
}

// CoreModel maps a star's initial mass (Msun) and metallicity (metal mass
// fraction Z) to its state at the end of its life. Builtin and *Table are
// CoreModels.
type CoreModel interface {
	Core(initialMass, metallicity float64) (Core, error)
}

// MainSequenceLifetime returns the main-sequence lifetime in Myr of a star of
// solar composition and mass m in Msun, from the fit of Eggleton, Fitchett &
// Tout (1989, ApJ 347, 998):
//
//	t_MS = (2550 + 669 m^2.5 + m^4.5) / (0.0327 m^1.5 + 0.346 m^4.5) Myr.
//
// It falls monotonically from 8.5 Gyr at 1 Msun to 22.5 Myr at 10 Msun and
// tends to 2.89 Myr for the most massive stars.
func MainSequenceLifetime(m float64) float64 {
	s := math.Sqrt(m)
	m2 := m * m
	m15 := m * s
	m25 := m2 * s
	m45 := m2 * m2 * s
	return (2550 + 669*m25 + m45) / (0.0327*m15 + 0.346*m45)
}

// Builtin is corefall's own core model: a few relations with named,
// documented parameters that take a star's initial mass M (Msun) and
// metallicity Z to its lifetime, final mass, core masses and largest radius.
// It is meant for massive stars (M above about 5 Msun); for lower masses the
// core masses are only a rough guide (they decide that the star ends as a
// white dwarf; the white-dwarf mass comes from the Prescription).
//
// With zf = (Z/SolarMetallicity)^WindMetallicityExponent, the scaling of
// line-driven winds with metallicity:
//
//  1. Lifetime: t = MainSequenceLifetime(M) (1 + HeBurningFraction).
//  2. Helium core without wind erosion:
//     He0 = min(HeCoreCoefficient M^HeCoreExponent, HeCoreMaxFraction M).
//  3. Main-sequence winds remove the fraction
//     f_H = min(MSWindMaxFraction, MSWindFraction zf (M/MSWindPivotMass)^MSWindExponent)
//     of the star: M1 = M (1 - f_H); He = min(He0, M1) (with the default
//     parameters M1 >= M/2 >= He0, so He = He0).
//  4. After the main sequence, winds and eruptions act on the hydrogen
//     envelope M1 - He. The stripping strength is
//     s = EnvelopeLossFraction zf (M/EnvelopePivotMass)^EnvelopeExponent + e(M),
//     with e(M) rising linearly from 0 at EruptionMinMass to 1 at
//     EruptionFullMass (metallicity-independent eruptions of the most luminous
//     stars). A fraction min(s, 1) of the envelope is lost; s >= 1 means the
//     star is stripped to its helium core.
//  5. Wolf-Rayet winds limit the helium core:
//     He_f = He (1 + (He/S)^WRSharpness)^(-1/WRSharpness), with
//     S = WRLimitMass zf^(-WRLimitExponent). He_f grows with He, so the
//     limit keeps the order of the cores in M. It acts on every core, but
//     with the default parameters only cores of stars that lose their whole
//     envelope come near it (cores still inside an envelope lose at most
//     4.5%).
//  6. Final mass: M_f = He_f if s >= 1, else He_f + (M1 - He)(1 - s).
//  7. Carbon-oxygen core: M_CO = He_f (COBaseFraction + COExtraFraction x),
//     x = He_f^k / (He_f^k + COTransitionMass^k), k = COTransitionExponent.
//  8. Largest radius: R_MS = MSRadiusCoefficient M^MSRadiusExponent (the
//     end of the main sequence); a star that keeps its envelope expands to
//     R_G = GiantRadius (M/GiantPivotMass)^GiantRadiusExponent (Z/SolarMetallicity)^GiantMetallicityExponent
//     (a red supergiant, or for lower masses an asymptotic-giant-branch
//     star). A star stripped early does not expand: R_max = R_MS + w (R_G - R_MS),
//     with w = 1 for s <= 1 (the envelope is kept long enough to expand),
//     falling linearly to 0 at s = NoExpansionStripping.
//
// By construction CO <= He_f <= M_f <= M. With the default parameters (see
// DefaultBuiltin) the helium and CO cores do not decrease with M at fixed Z,
// the final mass does not increase with Z at fixed M, and the lifetime
// falls with M (all three are tested); a stripped star's largest radius is
// its main-sequence radius.
//
// Core does not check the parameters: call Validate once after changing
// them.
type Builtin struct {
	// SolarMetallicity is the metal mass fraction of the Sun, 0.0142
	// (Asplund et al. 2009, ARA&A 47, 481).
	SolarMetallicity float64
	// WindMetallicityExponent is the power of Z/SolarMetallicity by which
	// line-driven winds scale, 0.85 (Vink, de Koter & Lamers 2001, A&A 369,
	// 574; Wolf-Rayet winds scale about as steeply, Vink & de Koter 2005,
	// A&A 442, 587, from memory).
	WindMetallicityExponent float64
	// HeBurningFraction is the duration of core helium burning and later
	// phases as a fraction of the main-sequence lifetime, 0.1 (common
	// practice).
	HeBurningFraction float64

	// HeCoreCoefficient (Msun^(1-HeCoreExponent)) and HeCoreExponent give
	// the helium core of stars up to ~56 Msun, 0.1 M^1.4 (calibrated: 4.4,
	// 6.6 and 9.1 Msun at M = 15, 20, 25, close to published non-rotating
	// models, from memory).
	HeCoreCoefficient, HeCoreExponent float64
	// HeCoreMaxFraction caps the helium core at this fraction of the
	// initial mass, 0.5: with it, helium cores of 64-133 Msun come from
	// stars of ~130-270 Msun, as in Heger & Woosley (2002, ApJ 567, 532).
	HeCoreMaxFraction float64

	// MSWindFraction, MSWindPivotMass (Msun) and MSWindExponent set the
	// fraction of the star lost to winds on the main sequence at solar
	// metallicity, 0.10 (M/40)^1.5 (calibrated); MSWindMaxFraction caps it,
	// 0.5.
	MSWindFraction, MSWindPivotMass, MSWindExponent, MSWindMaxFraction float64

	// EnvelopeLossFraction, EnvelopePivotMass (Msun) and EnvelopeExponent
	// set the fraction of the hydrogen envelope lost after the main
	// sequence by (red supergiant) winds at solar metallicity,
	// 0.6 (M/25)^1.2 (calibrated: at solar metallicity stars above ~38 Msun
	// lose their whole envelope).
	EnvelopeLossFraction, EnvelopePivotMass, EnvelopeExponent float64

	// EruptionMinMass and EruptionFullMass (Msun) bound the ramp of
	// envelope loss by eruptions of luminous blue variables: none below
	// EruptionMinMass (40, about the initial mass at the Humphreys-Davidson
	// limit, Humphreys & Davidson 1979, ApJ 232, 409, from memory), the whole
	// envelope from EruptionFullMass up (85, calibrated so that metal-poor
	// stars leave black holes up to the pair-instability gap but not
	// beyond). Eruptions are not driven by metal lines, so no metallicity
	// scaling is applied (common practice).
	EruptionMinMass, EruptionFullMass float64

	// WRLimitMass (Msun) is the mass towards which Wolf-Rayet winds drive
	// helium cores at solar metallicity, 20 (calibrated so that the heaviest
	// single-star black holes at solar metallicity are ~18 Msun). Because
	// the winds of helium stars grow steeply with mass, their final masses
	// converge (Langer 1989, A&A 220, 135, from memory).
	WRLimitMass float64
	// WRLimitExponent sets how the limit grows at low metallicity,
	// S = WRLimitMass zf^-WRLimitExponent, 1 (calibrated).
	WRLimitExponent float64
	// WRSharpness is the sharpness of the limit, 6 (calibrated: cores
	// well below the limit keep their mass, so that only stripped stars are
	// eroded appreciably).
	WRSharpness float64

	// COBaseFraction and COExtraFraction give the carbon-oxygen core as a
	// fraction of the helium core, from 0.65 for small cores to
	// 0.65 + 0.33 = 0.98 for the largest, with the transition at
	// COTransitionMass (20 Msun) of steepness COTransitionExponent (2)
	// (calibrated: CO cores of 60 and 130 Msun come from helium cores of
	// ~64 and ~133 Msun, matching the pair-instability ranges of Heger &
	// Woosley 2002 and Farmer et al. 2019; a CO core of 1.38 Msun, the
	// default collapse threshold, from an initial mass of ~8.9 Msun).
	COBaseFraction, COExtraFraction, COTransitionMass, COTransitionExponent float64

	// MSRadiusCoefficient (Rsun) and MSRadiusExponent give the radius at
	// the end of the main sequence, 2.0 M^0.6 Rsun (radii grow as M^0.6-0.8:
	// common practice; the coefficient is calibrated, from memory).
	MSRadiusCoefficient, MSRadiusExponent float64
	// GiantRadius (Rsun), GiantPivotMass (Msun) and GiantRadiusExponent give
	// the largest radius of a star that keeps its envelope at solar
	// metallicity, 600 (M/10)^0.6 Rsun (calibrated: red supergiants reach
	// ~500-1500 Rsun at solar metallicity, from memory).
	GiantRadius, GiantPivotMass, GiantRadiusExponent float64
	// GiantMetallicityExponent makes metal-poor giants smaller (bluer),
	// (Z/SolarMetallicity)^0.15 (calibrated).
	GiantMetallicityExponent float64
	// NoExpansionStripping is the stripping strength s from which a star
	// loses its envelope before it can expand, 2 (calibrated: at solar
	// metallicity stars above ~57 Msun keep their main-sequence radius; the
	// most luminous stars do not become red supergiants, Humphreys &
	// Davidson 1979).
	NoExpansionStripping float64
}

// DefaultBuiltin returns the calibrated default parameters of the builtin
// core model.
func DefaultBuiltin() Builtin {
	return Builtin{
		SolarMetallicity:         0.0142,
		WindMetallicityExponent:  0.85,
		HeBurningFraction:        0.1,
		HeCoreCoefficient:        0.1,
		HeCoreExponent:           1.4,
		HeCoreMaxFraction:        0.5,
		MSWindFraction:           0.10,
		MSWindPivotMass:          40,
		MSWindExponent:           1.5,
		MSWindMaxFraction:        0.5,
		EnvelopeLossFraction:     0.6,
		EnvelopePivotMass:        25,
		EnvelopeExponent:         1.2,
		EruptionMinMass:          40,
		EruptionFullMass:         85,
		WRLimitMass:              20,
		WRLimitExponent:          1,
		WRSharpness:              6,
		COBaseFraction:           0.65,
		COExtraFraction:          0.33,
		COTransitionMass:         20,
		COTransitionExponent:     2,
		MSRadiusCoefficient:      2.0,
		MSRadiusExponent:         0.6,
		GiantRadius:              600,
		GiantPivotMass:           10,
		GiantRadiusExponent:      0.6,
		GiantMetallicityExponent: 0.15,
		NoExpansionStripping:     2,
	}
}

// bound is an allowed interval for a parameter; an open end excludes the value.
type bound struct {
	lo, hi         float64
	loOpen, hiOpen bool
}

func (b bound) contains(v float64) bool {
	if math.IsNaN(v) {
		return false
	}
	if v < b.lo || (b.loOpen && v == b.lo) {
		return false
	}
	if v > b.hi || (b.hiOpen && v == b.hi) {
		return false
	}
	return true
}

func (b bound) String() string {
	lo, hi := "<=", "<="
	if b.loOpen {
		lo = "<"
	}
	if b.hiOpen {
		hi = "<"
	}
	return fmt.Sprintf("%g %s x %s %g", b.lo, lo, hi, b.hi)
}

var (
	positive    = bound{0, math.Inf(1), true, true}  // 0 < x < inf
	nonNegative = bound{0, math.Inf(1), false, true} // 0 <= x < inf
	unitClosed  = bound{0, 1, false, false}          // 0 <= x <= 1
	unitPosHigh = bound{0, 1, true, false}           // 0 < x <= 1
	unitLowOpen = bound{0, 1, false, true}           // 0 <= x < 1
	unitOpen    = bound{0, 1, true, true}            // 0 < x < 1
)

// checkParams returns an error naming the first parameter outside its
// allowed interval.
func checkParams(typeName string, ps []param) error {
	for _, p := range ps {
		if !p.b.contains(p.v) {
			return fmt.Errorf("remnant: %s.%s = %g, want %v", typeName, p.name, p.v, p.b)
		}
	}
	return nil
}

type param struct {
	name string
	v    float64
	b    bound
}

// Validate returns an error naming the first parameter of b outside its
// allowed range, and the range.
func (b Builtin) Validate() error {
	err := checkParams("Builtin", []param{
		{"SolarMetallicity", b.SolarMetallicity, unitOpen},
		{"WindMetallicityExponent", b.WindMetallicityExponent, bound{0, 5, false, false}},
		{"HeBurningFraction", b.HeBurningFraction, unitClosed},
		{"HeCoreCoefficient", b.HeCoreCoefficient, positive},
		{"HeCoreExponent", b.HeCoreExponent, bound{0, 5, true, false}},
		{"HeCoreMaxFraction", b.HeCoreMaxFraction, unitPosHigh},
		{"MSWindFraction", b.MSWindFraction, nonNegative},
		{"MSWindPivotMass", b.MSWindPivotMass, positive},
		{"MSWindExponent", b.MSWindExponent, bound{0, 10, false, false}},
		{"MSWindMaxFraction", b.MSWindMaxFraction, unitLowOpen},
		{"EnvelopeLossFraction", b.EnvelopeLossFraction, nonNegative},
		{"EnvelopePivotMass", b.EnvelopePivotMass, positive},
		{"EnvelopeExponent", b.EnvelopeExponent, bound{0, 10, false, false}},
		{"EruptionMinMass", b.EruptionMinMass, positive},
		{"EruptionFullMass", b.EruptionFullMass, positive},
		{"WRLimitMass", b.WRLimitMass, positive},
		{"WRLimitExponent", b.WRLimitExponent, bound{0, 5, false, false}},
		{"WRSharpness", b.WRSharpness, bound{0, 50, true, false}},
		{"COBaseFraction", b.COBaseFraction, unitPosHigh},
		{"COExtraFraction", b.COExtraFraction, unitClosed},
		{"COTransitionMass", b.COTransitionMass, positive},
		{"COTransitionExponent", b.COTransitionExponent, bound{0, 10, true, false}},
		{"MSRadiusCoefficient", b.MSRadiusCoefficient, positive},
		{"MSRadiusExponent", b.MSRadiusExponent, bound{0, 2, false, false}},
		{"GiantRadius", b.GiantRadius, positive},
		{"GiantPivotMass", b.GiantPivotMass, positive},
		{"GiantRadiusExponent", b.GiantRadiusExponent, bound{0, 2, false, false}},
		{"GiantMetallicityExponent", b.GiantMetallicityExponent, bound{-2, 2, false, false}},
		{"NoExpansionStripping", b.NoExpansionStripping, bound{1, math.Inf(1), true, true}},
	})
	if err != nil {
		return err
	}
	if !(b.EruptionFullMass > b.EruptionMinMass) {
		return fmt.Errorf("remnant: Builtin.EruptionFullMass = %g, want > EruptionMinMass = %g", b.EruptionFullMass, b.EruptionMinMass)
	}
	if s := b.COBaseFraction + b.COExtraFraction; s > 1 {
		return fmt.Errorf("remnant: Builtin.COBaseFraction + COExtraFraction = %g, want <= 1 (the CO core lies inside the helium core)", s)
	}
	return nil
}

// checkStar returns an error unless m and z are a valid initial mass (Msun)
// and metallicity.
func checkStar(m, z float64) error {
	if !(m > 0) || math.IsInf(m, 1) {
		return fmt.Errorf("remnant: initial mass %g Msun, want a finite number > 0", m)
	}
	if !(z > 0 && z < 1) {
		return fmt.Errorf("remnant: metallicity %g, want a metal mass fraction 0 < Z < 1", z)
	}
	return nil
}

// Core returns the end state of a star of initial mass m (Msun) and
// metallicity z (metal mass fraction), by the relations in the Builtin doc
// comment. It returns an error if m is not a finite number > 0 or z is not in
// (0, 1). It does not allocate. To evolve many stars, Prepare the model once:
// Prepared.Core gives the same answers faster.
func (b Builtin) Core(m, z float64) (Core, error) {
	p := b.prepare()
	return p.Core(m, z)
}

// Prepared is the builtin model with the constants that depend only on its
// parameters computed once. It is read-only and safe for concurrent use; it
// implements CoreModel.
type Prepared struct {
	b                     Builtin
	lnMSPivot, lnEnvPivot float64
	giantBase             float64 // GiantRadius GiantPivotMass^-GiantRadiusExponent
	lifetimeFactor        float64 // 1 + HeBurningFraction
	sameRadiusExponent    bool    // MSRadiusExponent == GiantRadiusExponent: one power serves both radii
	eruptInvWidth         float64
	noExpansionInvWidth   float64

	// When the exponents of M in the helium-core, envelope-loss and radius relations are all whole
	// multiples of 0.2 (as the defaults are), core evaluates one exp, M^0.2, and builds the powers
	// from it by multiplication.
	fifths                 bool
	kHe, kEnv, kMS, kGiant int
	envPivotPow            float64 // EnvelopePivotMass^-EnvelopeExponent
}

// fifthsOf returns k with e = k/5 for a whole k in [1, 10], or 0.
func fifthsOf(e float64) int {
	k := math.Round(5 * e)
	if k < 1 || k > 10 || math.Abs(5*e-k) > 1e-12 {
		return 0
	}
	return int(k)
}

// Prepare returns b with its constants computed once, for evolving many
// stars. Later changes to b do not affect it.
func (b Builtin) Prepare() *Prepared {
	p := b.prepare()
	return &p
}

func (b Builtin) prepare() Prepared {
	return Prepared{
		b:                   b,
		lnMSPivot:           math.Log(b.MSWindPivotMass),
		lnEnvPivot:          math.Log(b.EnvelopePivotMass),
		giantBase:           b.GiantRadius * math.Exp(-b.GiantRadiusExponent*math.Log(b.GiantPivotMass)),
		lifetimeFactor:      1 + b.HeBurningFraction,
		sameRadiusExponent:  b.MSRadiusExponent == b.GiantRadiusExponent,
		eruptInvWidth:       1 / (b.EruptionFullMass - b.EruptionMinMass),
		noExpansionInvWidth: 1 / (b.NoExpansionStripping - 1),
		kHe:                 fifthsOf(b.HeCoreExponent),
		kEnv:                fifthsOf(b.EnvelopeExponent),
		kMS:                 fifthsOf(b.MSRadiusExponent),
		kGiant:              fifthsOf(b.GiantRadiusExponent),
		envPivotPow:         math.Exp(-b.EnvelopeExponent * math.Log(b.EnvelopePivotMass)),
	}.withFifths()
}

func (p Prepared) withFifths() Prepared {
	p.fifths = p.kHe > 0 && p.kEnv > 0 && p.kMS > 0 && p.kGiant > 0
	return p
}

// Builtin returns the parameters of p.
func (p *Prepared) Builtin() Builtin { return p.b }

// Core returns the end state of a star of initial mass m (Msun) and
// metallicity z, as Builtin.Core does.
func (p *Prepared) Core(m, z float64) (Core, error) {
	if err := checkStar(m, z); err != nil {
		return Core{}, err
	}
	bz := p.atMetallicity(z)
	return bz.core(m), nil
}

// BuiltinZ is the builtin model at one metallicity, with every factor that
// depends only on the metallicity computed once. Build it with
// Prepared.AtMetallicity; its Core gives the same answers as Builtin.Core at
// that metallicity.
type BuiltinZ struct {
	p          *Prepared
	z          float64
	zf         float64 // (Z/Zsun)^WindMetallicityExponent
	wrLimit    float64 // S = WRLimitMass zf^-WRLimitExponent
	giantScale float64 // giantBase (Z/Zsun)^GiantMetallicityExponent
}

// Metallicity returns the metallicity Z of bz.
func (bz *BuiltinZ) Metallicity() float64 { return bz.z }

// AtMetallicity returns the model at metallicity z (metal mass fraction), or
// an error if z is not in (0, 1).
func (p *Prepared) AtMetallicity(z float64) (BuiltinZ, error) {
	if err := checkStar(1, z); err != nil {
		return BuiltinZ{}, err
	}
	return p.atMetallicity(z), nil
}

func (p *Prepared) atMetallicity(z float64) BuiltinZ {
	b := &p.b
	lnz := math.Log(z / b.SolarMetallicity)
	zf := math.Exp(b.WindMetallicityExponent * lnz)
	return BuiltinZ{
		p: p, z: z, zf: zf,
		wrLimit:    b.WRLimitMass * pow(zf, -b.WRLimitExponent),
		giantScale: p.giantBase * math.Exp(b.GiantMetallicityExponent*lnz),
	}
}

// Core returns the end state of a star of initial mass m (Msun) at bz's
// metallicity, or an error if m is not a finite number > 0.
func (bz *BuiltinZ) Core(m float64) (Core, error) {
	if err := checkStar(m, bz.z); err != nil {
		return Core{}, err
	}
	return bz.core(m), nil
}

// powLn returns x^e given ln x, with the shortcuts of pow for common exponents.
func powLn(x, lnx, e float64) float64 {
	switch e {
	case 1, -1, 2, -2, 1.5, 6:
		return pow(x, e)
	}
	return math.Exp(e * lnx)
}

func (bz *BuiltinZ) core(m float64) Core {
	p := bz.p
	b := &p.b
	lnm := math.Log(m)
	zf := bz.zf

	// Powers of M: M^HeCoreExponent, (M/EnvelopePivotMass)^EnvelopeExponent, and M to the two
	// radius exponents.
	var mHe, mEnv, mMS, mG float64
	if p.fifths {
		var pw [11]float64
		pw[1] = math.Exp(0.2 * lnm)
		top := max(p.kHe, p.kEnv, p.kMS, p.kGiant)
		for k := 2; k <= top; k++ {
			pw[k] = pw[k-1] * pw[1]
		}
		mHe, mEnv, mMS, mG = pw[p.kHe], pw[p.kEnv]*p.envPivotPow, pw[p.kMS], pw[p.kGiant]
	} else {
		mHe = powLn(m, lnm, b.HeCoreExponent)
		mEnv = powLn(m/b.EnvelopePivotMass, lnm-p.lnEnvPivot, b.EnvelopeExponent)
		mMS = powLn(m, lnm, b.MSRadiusExponent)
		mG = mMS
		if !p.sameRadiusExponent {
			mG = powLn(m, lnm, b.GiantRadiusExponent)
		}
	}

	he0 := min(b.HeCoreCoefficient*mHe, b.HeCoreMaxFraction*m)

	fH := min(b.MSWindMaxFraction, b.MSWindFraction*zf*powLn(m/b.MSWindPivotMass, lnm-p.lnMSPivot, b.MSWindExponent))
	m1 := m * (1 - fH)
	he := min(he0, m1)

	s := b.EnvelopeLossFraction*zf*mEnv +
		clamp01((m-b.EruptionMinMass)*p.eruptInvWidth)

	// Wolf-Rayet limit: He (1 + r)^(-1/n), r = (He/S)^n, S = WRLimitMass zf^-WRLimitExponent.
	// For r < 1e-4 the binomial series to r^2 is used, saving a log and an
	// exp for most stars: its relative error is below the next term,
	// r^3 (n+1)(2n+1)/(6n^3), 7e-14 for the default n = 6.
	n := b.WRSharpness
	var heF float64
	if r := pow(he/bz.wrLimit, n); r < 1e-4 {
		heF = he * (1 - r/n + (n+1)/(2*n*n)*r*r)
	} else {
		heF = he * pow(1+r, -1/n)
	}

	mf := heF
	if s < 1 {
		mf = heF + (m1-he)*(1-s)
	}

	x := pow(heF/b.COTransitionMass, b.COTransitionExponent)
	co := heF * (b.COBaseFraction + b.COExtraFraction*x/(1+x))

	rMS := b.MSRadiusCoefficient * mMS
	rG := bz.giantScale * mG
	w := clamp01((b.NoExpansionStripping - s) * p.noExpansionInvWidth)
	rMax := rMS + w*max(0, rG-rMS)

	return Core{
		InitialMass: m,
		Metallicity: bz.z,
		LifetimeMyr: MainSequenceLifetime(m) * p.lifetimeFactor,
		FinalMass:   mf,
		HeCoreMass:  heF,
		COCoreMass:  co,
		MaxRadius:   rMax,
	}
}

func clamp01(x float64) float64 {
	return max(0, min(1, x))
}

// pow returns x^e for x > 0. Exponents used by the default parameters take
// shortcuts (math.Pow costs several times exp(e log x) and these
// multiplications); any other exponent goes through exp(e log x), whose
// relative error is about |e log x| times the float64 epsilon (~1e-15 here).
func pow(x, e float64) float64 {
	switch e {
	case 1:
		return x
	case -1:
		return 1 / x
	case 2:
		return x * x
	case -2:
		return 1 / (x * x)
	case 1.5:
		return x * math.Sqrt(x)
	case 6:
		x2 := x * x
		return x2 * x2 * x2
	}
	return math.Exp(e * math.Log(x))
}
