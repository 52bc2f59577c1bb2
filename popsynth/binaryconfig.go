package popsynth

// BinaryConfig holds the statistics of initial binaries and what to do with interacting systems.
// It is used when binary_fraction > 0.
type BinaryConfig struct {
	// QExponent is kappa of the mass-ratio distribution f(q) ~ q^kappa on [QMin, 1]; 0 is uniform,
	// -0.1 follows Sana et al. (2012).
	QExponent float64 `mapstructure:"q_exponent" yaml:"q_exponent"`
	QMin      float64 `mapstructure:"q_min" yaml:"q_min"`
	// Orbit is sana2012 (f(log P) ~ (log P)^period_exponent) or opik (flat in log separation).
	Orbit           string  `mapstructure:"orbit" yaml:"orbit"`
	LogPeriodMin    float64 `mapstructure:"log_period_min" yaml:"log_period_min"`
	LogPeriodMax    float64 `mapstructure:"log_period_max" yaml:"log_period_max"`
	PeriodExponent  float64 `mapstructure:"period_exponent" yaml:"period_exponent"`
	SeparationMinAU float64 `mapstructure:"separation_min_au" yaml:"separation_min_au"`
	SeparationMaxAU float64 `mapstructure:"separation_max_au" yaml:"separation_max_au"`
	// Eccentricity is thermal (f(e) = 2e), circular, or sana2012 (f(e) ~ e^-0.45), up to EccentricityMax.
	Eccentricity    string  `mapstructure:"eccentricity" yaml:"eccentricity"`
	EccentricityMax float64 `mapstructure:"eccentricity_max" yaml:"eccentricity_max"`
	// Interacting says what to do with systems whose star would fill its Roche lobe: keep (write
	// them with outcome "interacting" and their initial parameters) or drop.
	Interacting string `mapstructure:"interacting" yaml:"interacting"`
	// FractionMasses and FractionValues, when given, make the binary fraction depend on the primary
	// mass: linear in log mass between the listed masses (Msun), constant beyond the ends. They
	// replace binary_fraction, which must then be 0.
	FractionMasses []float64 `mapstructure:"fraction_masses" yaml:"fraction_masses"`
	FractionValues []float64 `mapstructure:"fraction_values" yaml:"fraction_values"`
}

// binariesOn reports whether a configuration makes any binaries.
func (c Config) binariesOn() bool {
	return c.BinaryFraction > 0 || len(c.Binary.FractionMasses) > 0
}

func (c BinaryConfig) validate(fraction float64) error {
	if len(c.FractionMasses) != len(c.FractionValues) {
		return bad("binary.fraction_values", c.FractionValues, "needs one value per mass of binary.fraction_masses (%d)", len(c.FractionMasses))
	}
	if len(c.FractionMasses) > 0 && fraction != 0 {
		return bad("binary_fraction", fraction, "must be 0 when binary.fraction_masses gives a mass-dependent fraction (set one or the other)")
	}
	for i, m := range c.FractionMasses {
		if !finite(m) || m <= 0 || (i > 0 && m <= c.FractionMasses[i-1]) {
			return bad("binary.fraction_masses", c.FractionMasses, "masses must be finite, > 0 and strictly increasing")
		}
	}
	for _, f := range c.FractionValues {
		if !(f >= 0 && f <= 1) {
			return bad("binary.fraction_values", c.FractionValues, "every fraction must lie in [0, 1]")
		}
	}
	if !finite(c.QExponent) || c.QExponent < -3 || c.QExponent > 3 {
		return bad("binary.q_exponent", c.QExponent, "must lie in [-3, 3] (0 is uniform, -0.1 after Sana et al. 2012)")
	}
	if !finite(c.QMin) || c.QMin <= 0 || c.QMin >= 1 {
		return bad("binary.q_min", c.QMin, "must lie in (0, 1)")
	}
	if err := oneOf("binary.orbit", c.Orbit, "sana2012", "opik"); err != nil {
		return err
	}
	switch c.Orbit {
	case "sana2012":
		if !finite(c.LogPeriodMin) || c.LogPeriodMin <= 0 {
			return bad("binary.log_period_min", c.LogPeriodMin, "must be > 0 (log10 of the period in days; Sana et al. 2012 use 0.15)")
		}
		if !finite(c.LogPeriodMax) || c.LogPeriodMax <= c.LogPeriodMin || c.LogPeriodMax > 12 {
			return bad("binary.log_period_max", c.LogPeriodMax, "must lie in (binary.log_period_min, 12]")
		}
		if !finite(c.PeriodExponent) || c.PeriodExponent <= -1 || c.PeriodExponent > 5 {
			return bad("binary.period_exponent", c.PeriodExponent, "must lie in (-1, 5] (Sana et al. 2012: -0.55)")
		}
	case "opik":
		if err := positive("binary.separation_min_au", c.SeparationMinAU); err != nil {
			return err
		}
		if !finite(c.SeparationMaxAU) || c.SeparationMaxAU <= c.SeparationMinAU {
			return bad("binary.separation_max_au", c.SeparationMaxAU, "must be > binary.separation_min_au (%v)", c.SeparationMinAU)
		}
	}
	if err := oneOf("binary.eccentricity", c.Eccentricity, "thermal", "circular", "sana2012"); err != nil {
		return err
	}
	if !finite(c.EccentricityMax) || c.EccentricityMax <= 0 || c.EccentricityMax >= 1 {
		return bad("binary.eccentricity_max", c.EccentricityMax, "must lie in (0, 1)")
	}
	return oneOf("binary.interacting", c.Interacting, "keep", "drop")
}
