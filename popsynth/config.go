package popsynth

// Config is the typed, validated configuration of a corefall run. Its keys (the mapstructure tags,
// joined with dots) are the names users write in YAML files, COREFALL_* environment variables and
// --set flags; configs/default.yaml lists every one with its default.
type Config struct {
	Systems        int64   `mapstructure:"systems" yaml:"systems"`
	Seed           uint64  `mapstructure:"seed" yaml:"seed"`
	Workers        int     `mapstructure:"workers" yaml:"workers"`
	BinaryFraction float64 `mapstructure:"binary_fraction" yaml:"binary_fraction"`
	TimeLimitMyr   float64 `mapstructure:"time_limit_myr" yaml:"time_limit_myr"`

	IMF             IMFConfig             `mapstructure:"imf" yaml:"imf"`
	Metallicity     MetallicityConfig     `mapstructure:"metallicity" yaml:"metallicity"`
	Core            CoreConfig            `mapstructure:"core" yaml:"core"`
	Explosion       ExplosionConfig       `mapstructure:"explosion" yaml:"explosion"`
	PairInstability PairInstabilityConfig `mapstructure:"pair_instability" yaml:"pair_instability"`
	WhiteDwarf      WhiteDwarfConfig      `mapstructure:"white_dwarf" yaml:"white_dwarf"`
	Kicks           KicksConfig           `mapstructure:"kicks" yaml:"kicks"`
	Binary          BinaryConfig          `mapstructure:"binary" yaml:"binary"`
	Output          OutputConfig          `mapstructure:"output" yaml:"output"`
}

// IMFConfig chooses the initial mass function and the sampled mass range (Msun).
type IMFConfig struct {
	Law       string    `mapstructure:"law" yaml:"law"`
	Min       float64   `mapstructure:"min" yaml:"min"`
	Max       float64   `mapstructure:"max" yaml:"max"`
	SampleMin float64   `mapstructure:"sample_min" yaml:"sample_min"`
	SampleMax float64   `mapstructure:"sample_max" yaml:"sample_max"`
	Breaks    []float64 `mapstructure:"breaks" yaml:"breaks"`
	Slopes    []float64 `mapstructure:"slopes" yaml:"slopes"`
}

// MetallicityConfig says how each system's metallicity Z (mass fraction) is chosen.
type MetallicityConfig struct {
	Sampling string    `mapstructure:"sampling" yaml:"sampling"`
	Fixed    float64   `mapstructure:"fixed" yaml:"fixed"`
	Values   []float64 `mapstructure:"values" yaml:"values"`
	Min      float64   `mapstructure:"min" yaml:"min"`
	Max      float64   `mapstructure:"max" yaml:"max"`
}

// CoreConfig chooses the pre-collapse core model.
type CoreConfig struct {
	Model   string        `mapstructure:"model" yaml:"model"`
	Table   string        `mapstructure:"table" yaml:"table"`
	Builtin BuiltinConfig `mapstructure:"builtin" yaml:"builtin"`
}

// ExplosionConfig holds the supernova engine and the core-collapse thresholds (Msun).
type ExplosionConfig struct {
	Engine           string  `mapstructure:"engine" yaml:"engine"`
	CollapseMinCO    float64 `mapstructure:"collapse_min_co" yaml:"collapse_min_co"`
	DirectCollapseCO float64 `mapstructure:"direct_collapse_co" yaml:"direct_collapse_co"`
	MaxNSMass        float64 `mapstructure:"max_ns_mass" yaml:"max_ns_mass"`
}

// PairInstabilityConfig holds the CO-core thresholds (Msun) of pulsational and full pair instability.
type PairInstabilityConfig struct {
	Enabled        bool    `mapstructure:"enabled" yaml:"enabled"`
	PulsationMinCO float64 `mapstructure:"pulsation_min_co" yaml:"pulsation_min_co"`
	PISNMinCO      float64 `mapstructure:"pisn_min_co" yaml:"pisn_min_co"`
	PISNMaxCO      float64 `mapstructure:"pisn_max_co" yaml:"pisn_max_co"`
}

// WhiteDwarfConfig holds the linear initial-final mass relation of white dwarfs.
type WhiteDwarfConfig struct {
	Slope     float64 `mapstructure:"slope" yaml:"slope"`
	Intercept float64 `mapstructure:"intercept" yaml:"intercept"`
	MaxMass   float64 `mapstructure:"max_mass" yaml:"max_mass"`
}

// KicksConfig holds the natal-kick model.
type KicksConfig struct {
	NSSigma         float64 `mapstructure:"ns_sigma" yaml:"ns_sigma"`
	BHMode          string  `mapstructure:"bh_mode" yaml:"bh_mode"`
	ReferenceNSMass float64 `mapstructure:"reference_ns_mass" yaml:"reference_ns_mass"`
}

// OutputConfig says where and how the catalogue is written.
type OutputConfig struct {
	Path         string `mapstructure:"path" yaml:"path"`
	Format       string `mapstructure:"format" yaml:"format"`
	RowGroupRows int    `mapstructure:"row_group_rows" yaml:"row_group_rows"`
}
