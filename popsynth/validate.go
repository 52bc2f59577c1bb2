package popsynth

import (
	"fmt"
	"math"
	"strings"

	"github.com/corefall/corefall/popsynth/catalog"
)

// KeyError is a configuration value that is not allowed. Its message names the key, the value and
// what is allowed.
type KeyError struct {
	Key     string
	Value   any
	Allowed string
}

func (e *KeyError) Error() string {
	return fmt.Sprintf("config: %s = %v is not allowed: %s", e.Key, e.Value, e.Allowed)
}

func bad(key string, value any, allowed string, args ...any) error {
	return &KeyError{Key: key, Value: value, Allowed: fmt.Sprintf(allowed, args...)}
}

// finite reports whether x is neither NaN nor infinite.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func positive(key string, x float64) error {
	if !finite(x) || x <= 0 {
		return bad(key, x, "must be a finite number > 0")
	}
	return nil
}

func nonNegative(key string, x float64) error {
	if !finite(x) || x < 0 {
		return bad(key, x, "must be a finite number >= 0")
	}
	return nil
}

func oneOf(key, value string, allowed ...string) error {
	for _, a := range allowed {
		if value == a {
			return nil
		}
	}
	return bad(key, fmt.Sprintf("%q", value), "must be one of %s", strings.Join(allowed, ", "))
}

// Validate checks every key of c and returns the first problem found.
func (c Config) Validate() error {
	checks := []func() error{
		func() error {
			if c.Systems <= 0 {
				return bad("systems", c.Systems, "must be a whole number >= 1")
			}
			return nil
		},
		func() error {
			if c.Workers < 0 {
				return bad("workers", c.Workers, "must be >= 0 (0 means one per CPU core)")
			}
			return nil
		},
		func() error {
			if !(c.BinaryFraction >= 0 && c.BinaryFraction <= 1) {
				return bad("binary_fraction", c.BinaryFraction, "must lie in [0, 1]")
			}
			return nil
		},
		func() error { return positive("time_limit_myr", c.TimeLimitMyr) },
		c.IMF.validate,
		c.Metallicity.validate,
		c.Core.validate,
		c.Explosion.validate,
		c.PairInstability.validate,
		c.WhiteDwarf.validate,
		c.Kicks.validate,
		func() error { return c.Binary.validate(c.BinaryFraction) },
		c.Output.validate,
	}
	for _, check := range checks {
		if err := check(); err != nil {
			return err
		}
	}
	return nil
}

func (c IMFConfig) validate() error {
	if err := oneOf("imf.law", c.Law, "salpeter", "kroupa2001", "chabrier2003", "broken-power-law"); err != nil {
		return err
	}
	if c.Law == "broken-power-law" {
		if len(c.Breaks) < 2 {
			return bad("imf.breaks", c.Breaks, "broken-power-law needs at least two breaks (min and max), increasing")
		}
		if len(c.Slopes) != len(c.Breaks)-1 {
			return bad("imf.slopes", c.Slopes, "needs one slope per segment: %d for %d breaks", len(c.Breaks)-1, len(c.Breaks))
		}
		for i, b := range c.Breaks {
			if !finite(b) || b <= 0 || (i > 0 && b <= c.Breaks[i-1]) {
				return bad("imf.breaks", c.Breaks, "breaks must be finite, > 0 and strictly increasing")
			}
		}
		if c.Min != c.Breaks[0] || c.Max != c.Breaks[len(c.Breaks)-1] {
			return bad("imf.min", c.Min, "for broken-power-law imf.min and imf.max must equal the first and last of imf.breaks (%v and %v); imf.max is %v",
				c.Breaks[0], c.Breaks[len(c.Breaks)-1], c.Max)
		}
		for _, s := range c.Slopes {
			if !finite(s) {
				return bad("imf.slopes", c.Slopes, "slopes must be finite numbers")
			}
		}
	} else if len(c.Breaks) > 0 || len(c.Slopes) > 0 {
		return bad("imf.breaks", c.Breaks, "imf.breaks and imf.slopes are only used with imf.law = broken-power-law; leave them empty for %s", c.Law)
	}
	if err := positive("imf.min", c.Min); err != nil {
		return err
	}
	if !finite(c.Max) || c.Max <= c.Min {
		return bad("imf.max", c.Max, "must be finite and > imf.min (%v)", c.Min)
	}
	if !finite(c.SampleMin) || c.SampleMin < c.Min || c.SampleMin >= c.Max {
		return bad("imf.sample_min", c.SampleMin, "must lie in [imf.min, imf.max) = [%v, %v)", c.Min, c.Max)
	}
	if !finite(c.SampleMax) || c.SampleMax <= c.SampleMin || c.SampleMax > c.Max {
		return bad("imf.sample_max", c.SampleMax, "must lie in (imf.sample_min, imf.max] = (%v, %v]", c.SampleMin, c.Max)
	}
	return nil
}

func (c MetallicityConfig) validate() error {
	if err := oneOf("metallicity.sampling", c.Sampling, "fixed", "list", "log-uniform"); err != nil {
		return err
	}
	z := func(key string, x float64) error {
		if !finite(x) || x <= 0 || x >= 1 {
			return bad(key, x, "a metallicity is a mass fraction: must lie in (0, 1), e.g. 0.0142 (solar)")
		}
		return nil
	}
	switch c.Sampling {
	case "fixed":
		return z("metallicity.fixed", c.Fixed)
	case "list":
		if len(c.Values) == 0 {
			return bad("metallicity.values", c.Values, "metallicity.sampling = list needs at least one value, e.g. [0.0002, 0.002, 0.0142]")
		}
		seen := make(map[float64]bool)
		for _, v := range c.Values {
			if err := z("metallicity.values", v); err != nil {
				return err
			}
			if seen[v] {
				return bad("metallicity.values", c.Values, "values must be distinct (%v repeats)", v)
			}
			seen[v] = true
		}
	case "log-uniform":
		if err := z("metallicity.min", c.Min); err != nil {
			return err
		}
		if err := z("metallicity.max", c.Max); err != nil {
			return err
		}
		if c.Max <= c.Min {
			return bad("metallicity.max", c.Max, "must be > metallicity.min (%v)", c.Min)
		}
	}
	return nil
}

func (c CoreConfig) validate() error {
	if err := oneOf("core.model", c.Model, "builtin", "table"); err != nil {
		return err
	}
	if c.Model == "table" && c.Table == "" {
		return bad("core.table", `""`, "core.model = table needs the path of a stellar-model grid (CSV or Parquet)")
	}
	return c.Builtin.validate()
}

func (c ExplosionConfig) validate() error {
	if err := oneOf("explosion.engine", c.Engine, "rapid", "delayed"); err != nil {
		return err
	}
	if err := positive("explosion.collapse_min_co", c.CollapseMinCO); err != nil {
		return err
	}
	if !finite(c.DirectCollapseCO) || c.DirectCollapseCO <= c.CollapseMinCO {
		return bad("explosion.direct_collapse_co", c.DirectCollapseCO, "must be > explosion.collapse_min_co (%v)", c.CollapseMinCO)
	}
	if !finite(c.MaxNSMass) || c.MaxNSMass < 1 || c.MaxNSMass > 5 {
		return bad("explosion.max_ns_mass", c.MaxNSMass, "must lie in [1, 5] Msun (2.0-2.5 is usual)")
	}
	return nil
}

func (c PairInstabilityConfig) validate() error {
	if err := positive("pair_instability.pulsation_min_co", c.PulsationMinCO); err != nil {
		return err
	}
	if !finite(c.PISNMinCO) || c.PISNMinCO < c.PulsationMinCO {
		return bad("pair_instability.pisn_min_co", c.PISNMinCO, "must be >= pair_instability.pulsation_min_co (%v)", c.PulsationMinCO)
	}
	if !finite(c.PISNMaxCO) || c.PISNMaxCO < c.PISNMinCO {
		return bad("pair_instability.pisn_max_co", c.PISNMaxCO, "must be >= pair_instability.pisn_min_co (%v)", c.PISNMinCO)
	}
	return nil
}

func (c WhiteDwarfConfig) validate() error {
	if err := nonNegative("white_dwarf.slope", c.Slope); err != nil {
		return err
	}
	if err := nonNegative("white_dwarf.intercept", c.Intercept); err != nil {
		return err
	}
	return positive("white_dwarf.max_mass", c.MaxMass)
}

func (c KicksConfig) validate() error {
	if err := nonNegative("kicks.ns_sigma", c.NSSigma); err != nil {
		return err
	}
	if err := oneOf("kicks.bh_mode", c.BHMode, "fallback", "momentum", "full", "none"); err != nil {
		return err
	}
	return positive("kicks.reference_ns_mass", c.ReferenceNSMass)
}

func (c OutputConfig) validate() error {
	if strings.TrimSpace(c.Path) == "" {
		return bad("output.path", `""`, "needs a file name, e.g. catalogue.parquet")
	}
	if _, err := catalog.ParseFormat(c.Format); err != nil {
		return bad("output.format", fmt.Sprintf("%q", c.Format), "must be one of parquet, arrow, csv")
	}
	if c.RowGroupRows < 1024 || c.RowGroupRows > 1<<26 {
		return bad("output.row_group_rows", c.RowGroupRows, "must lie in [1024, 67108864]")
	}
	return nil
}
