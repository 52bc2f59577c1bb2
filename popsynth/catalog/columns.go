package catalog

// Names of the standard catalogue columns, in the order Columns gives them.
const (
	ColSystemID         = "system_id"
	ColMetallicity      = "metallicity"
	ColInitialMass      = "initial_mass"
	ColLifetime         = "lifetime_myr"
	ColFinalMass        = "final_mass"
	ColHeCoreMass       = "he_core_mass"
	ColCOCoreMass       = "co_core_mass"
	ColFate             = "fate"
	ColRemnantType      = "remnant_type"
	ColRemnantMass      = "remnant_mass"
	ColFallbackFraction = "fallback_fraction"
	ColKickSpeed        = "kick_speed"

	// Binary columns.
	ColOutcome = "outcome"
	// CompanionPrefix is put before the star columns initial_mass..kick_speed
	// to name the companion's copies, for example "companion_remnant_mass".
	CompanionPrefix          = "companion_"
	ColInitialSeparation     = "initial_separation_au"
	ColInitialPeriod         = "initial_period_days"
	ColInitialEccentricity   = "initial_eccentricity"
	ColFinalSeparation       = "final_separation_au"
	ColFinalPeriod           = "final_period_days"
	ColFinalEccentricity     = "final_eccentricity"
	ColSystemicVelocity      = "systemic_velocity_kms"
	ColRunawaySpeed          = "runaway_speed_kms"
	ColCompanionRunawaySpeed = "companion_runaway_speed_kms"
	ColInspiralTime          = "inspiral_time_myr"
	ColDelayTime             = "delay_time_myr"
)

// Endings of column docs.
const (
	float32Note   = " (float32: 7 significant digits)"
	companionNote = "; null for a single star"
	undefinedNote = "; null where undefined"
	// interactingNote ends the docs of star columns that are null in an interacting binary.
	interactingNote = "; null in an interacting binary, whose evolution is not followed"
)

// Indices of the words of the fate column (Column.Categories order).
const (
	FateWD     uint8 = iota // left a white dwarf
	FateSN                  // exploded as a core-collapse supernova
	FateFailed              // collapsed without a successful explosion
	FatePPISN               // pulsational pair-instability mass loss, then collapse
	FatePISN                // pair-instability supernova: no remnant
	FateAlive               // still burning at the end of the run
)

// Indices of the words of the remnant_type column.
const (
	RemnantBH   uint8 = iota // black hole
	RemnantNS                // neutron star
	RemnantWD                // white dwarf
	RemnantNone              // no remnant (star disrupted by pair instability)
	RemnantStar              // no remnant yet: the star is alive
)

// Indices of the words of the outcome column.
const (
	OutcomeSingle      uint8 = iota // no companion
	OutcomeBound                    // both stars still bound after every collapse
	OutcomeDisrupted                // a supernova unbound the orbit
	OutcomeInteracting              // Roche-lobe contact: evolution beyond this model
)

// FateWords returns the categories of the fate column, indexed by FateWD..FateAlive.
func FateWords() []string { return []string{"wd", "sn", "failed", "ppisn", "pisn", "alive"} }

// RemnantWords returns the categories of the remnant_type column, indexed by RemnantBH..RemnantStar.
func RemnantWords() []string { return []string{"BH", "NS", "WD", "none", "star"} }

// OutcomeWords returns the categories of the outcome column, indexed by OutcomeSingle..OutcomeInteracting.
func OutcomeWords() []string { return []string{"single", "bound", "disrupted", "interacting"} }

// starColumns are the per-star columns initial_mass..kick_speed.
func starColumns() []Column {
	return []Column{
		{Name: ColInitialMass, Unit: "Msun", Kind: Float32, Doc: "zero-age main-sequence mass" + float32Note},
		{Name: ColLifetime, Unit: "Myr", Kind: Float32, Doc: "time from birth to core collapse or to white-dwarf birth" + float32Note},
		{Name: ColFinalMass, Unit: "Msun", Kind: Float32, Doc: "total mass at the end of the star's life" + float32Note},
		{Name: ColHeCoreMass, Unit: "Msun", Kind: Float32, Doc: "helium core mass at the end of the star's life" + float32Note},
		{Name: ColCOCoreMass, Unit: "Msun", Kind: Float32, Doc: "carbon-oxygen core mass at the end of the star's life" + float32Note},
		{Name: ColFate, Unit: "1", Kind: Category, Categories: FateWords(), Doc: "how the star ended: wd, sn (supernova), failed (no explosion), ppisn, pisn, alive"},
		{Name: ColRemnantType, Unit: "1", Kind: Category, Categories: RemnantWords(), Doc: "remnant: BH, NS, WD, none (disrupted) or star (still alive)"},
		{Name: ColRemnantMass, Unit: "Msun", Kind: Float32, Doc: "gravitational mass of the remnant, 0 when none or star" + float32Note},
		{Name: ColFallbackFraction, Unit: "1", Kind: Float32, Doc: "fraction of the ejecta that fell back onto the proto-remnant" + float32Note},
		{Name: ColKickSpeed, Unit: "km/s", Kind: Float32, Doc: "natal kick speed of the remnant" + float32Note},
	}
}

// Columns returns the standard catalogue columns, one row per system.
//
// For single stars (binaries false): system_id, metallicity, then the star
// columns initial_mass, lifetime_myr, final_mass, he_core_mass,
// co_core_mass, fate, remnant_type, remnant_mass, fallback_fraction,
// kick_speed. With binaries true it adds outcome, the companion's copies of
// the star columns (prefixed "companion_", nullable: null for a single
// star), and the orbit columns initial_separation_au, initial_period_days,
// initial_eccentricity, final_separation_au, final_period_days,
// final_eccentricity, systemic_velocity_kms, runaway_speed_kms,
// companion_runaway_speed_kms, inspiral_time_myr, delay_time_myr (nullable:
// null where undefined). The package documentation has the table with units.
func Columns(binaries bool) []Column {
	cols := make([]Column, 0, 34)
	cols = append(cols,
		Column{Name: ColSystemID, Unit: "1", Kind: Int64, Doc: "0-based index of the system in the run"},
		Column{Name: ColMetallicity, Unit: "1", Kind: Float32, Doc: "metallicity Z, mass fraction of elements heavier than helium" + float32Note},
	)
	star := starColumns()
	if binaries {
		// The life after birth of a star in an interacting binary is not followed: null.
		for i := range star {
			if star[i].Name != ColInitialMass {
				star[i].Nullable = true
				star[i].Doc += interactingNote
			}
		}
	}
	cols = append(cols, star...)
	if !binaries {
		return cols
	}
	cols = append(cols, Column{Name: ColOutcome, Unit: "1", Kind: Category, Categories: OutcomeWords(),
		Doc: "single, bound, disrupted (unbound by a supernova) or interacting (Roche-lobe contact, not followed)"})
	for _, c := range starColumns() {
		c.Doc = "companion's " + c.Doc + companionNote
		if c.Name != ColInitialMass {
			c.Doc += interactingNote
		}
		c.Name = CompanionPrefix + c.Name
		c.Nullable = true
		cols = append(cols, c)
	}
	orbit := []Column{
		{Name: ColInitialSeparation, Unit: "AU", Doc: "initial semi-major axis"},
		{Name: ColInitialPeriod, Unit: "d", Doc: "initial orbital period"},
		{Name: ColInitialEccentricity, Unit: "1", Doc: "initial eccentricity"},
		{Name: ColFinalSeparation, Unit: "AU", Doc: "semi-major axis after the last collapse, if still bound"},
		{Name: ColFinalPeriod, Unit: "d", Doc: "orbital period after the last collapse, if still bound"},
		{Name: ColFinalEccentricity, Unit: "1", Doc: "eccentricity after the last collapse, if still bound"},
		{Name: ColSystemicVelocity, Unit: "km/s", Doc: "centre-of-mass speed gained from supernova mass loss and kicks, if still bound"},
		{Name: ColRunawaySpeed, Unit: "km/s", Doc: "primary's speed at infinity in the old centre-of-mass frame, if disrupted"},
		{Name: ColCompanionRunawaySpeed, Unit: "km/s", Doc: "companion's speed at infinity in the old centre-of-mass frame, if disrupted"},
		{Name: ColInspiralTime, Unit: "Myr", Doc: "gravitational-wave inspiral time of a bound pair of compact remnants"},
		{Name: ColDelayTime, Unit: "Myr", Doc: "time from the binary's birth to the merger of its compact remnants"},
	}
	for _, c := range orbit {
		c.Kind = Float32
		c.Nullable = true
		c.Doc += float32Note + undefinedNote
		cols = append(cols, c)
	}
	return cols
}
