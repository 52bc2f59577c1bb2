package rates

import (
	"fmt"
	"math"
	"slices"
	"strings"
)

// EventKind is the type of a rate event: the formation of a neutron star or
// black hole, or the merger of a compact binary.
type EventKind uint8

// The event kinds. Their String values are the keys of Result's JSON form.
const (
	NSFormation EventKind = iota // a neutron star forms (core collapse)
	BHFormation                  // a black hole forms (core collapse)
	BBHMerger                    // two black holes merge
	BHNSMerger                   // a black hole and a neutron star merge
	NSNSMerger                   // two neutron stars merge
	numKinds
)

var kindNames = [numKinds]string{"ns_formation", "bh_formation", "bbh_merger", "bhns_merger", "nsns_merger"}

// String returns the kind's name, for example "bbh_merger".
func (k EventKind) String() string {
	if k < numKinds {
		return kindNames[k]
	}
	return fmt.Sprintf("EventKind(%d)", uint8(k))
}

// ParseEventKind returns the kind named s (as printed by String).
func ParseEventKind(s string) (EventKind, error) {
	for k, name := range kindNames {
		if s == name {
			return EventKind(k), nil
		}
	}
	return 0, fmt.Errorf("rates: event kind %q; want one of %s", s, strings.Join(kindNames[:], ", "))
}

// Event is one catalogue row seen by the rate estimator.
type Event struct {
	Kind EventKind
	// DelayMyr is the time from the birth of the stars to the event, in
	// Myr: the collapse time for a formation, collapse plus inspiral for a
	// merger.
	DelayMyr float64
	// Metallicity is the metal mass fraction Z the system was born with.
	Metallicity float64
	// Weight is the number of real events per solar mass of star formation
	// that the row stands for: 1 / (stellar mass represented by the
	// sub-population the row was drawn in), in Msun^-1. For a catalogue
	// sampled at several fixed metallicities, the sub-population is the part
	// drawn at the row's metallicity; otherwise it is the whole catalogue.
	Weight float64
}

// ZSamplingKind says how a catalogue chose its systems' metallicities.
type ZSamplingKind uint8

// The metallicity sampling schemes.
const (
	// SampledFixed: every system has the same Z. The catalogue then stands
	// for all star formation at every redshift, whatever the cosmic
	// metallicity distribution.
	SampledFixed ZSamplingKind = iota + 1
	// SampledDiscrete: a list of metallicities, each with its own
	// sub-population and its own stellar mass represented.
	SampledDiscrete
	// SampledLogUniform: log10 Z uniform on [log10 Min, log10 Max], one
	// population.
	SampledLogUniform
)

// ZSampling describes how a catalogue sampled metallicity. Build it with
// FixedZ, DiscreteZ or LogUniformZ.
type ZSampling struct {
	Kind     ZSamplingKind
	Values   []float64 // SampledFixed: the one Z; SampledDiscrete: the distinct Z values
	Min, Max float64   // SampledLogUniform: the range of Z
}

// FixedZ describes a catalogue drawn entirely at metallicity z.
func FixedZ(z float64) ZSampling {
	return ZSampling{Kind: SampledFixed, Values: []float64{z}}
}

// DiscreteZ describes a catalogue drawn at the given metallicities, each
// value with its own sub-population.
func DiscreteZ(values ...float64) ZSampling {
	return ZSampling{Kind: SampledDiscrete, Values: slices.Clone(values)}
}

// LogUniformZ describes a catalogue whose metallicities were drawn
// log-uniformly between min and max.
func LogUniformZ(min, max float64) ZSampling {
	return ZSampling{Kind: SampledLogUniform, Min: min, Max: max}
}

// validZ reports whether z is a metal mass fraction in (0, 1].
func validZ(z float64) bool { return z > 0 && z <= 1 }

// Validate reports whether s is complete: one Z in (0, 1] for SampledFixed;
// at least one, all distinct and in (0, 1], for SampledDiscrete;
// 0 < Min < Max <= 1 for SampledLogUniform.
func (s ZSampling) Validate() error {
	switch s.Kind {
	case SampledFixed:
		if len(s.Values) != 1 || !validZ(s.Values[0]) {
			return fmt.Errorf("rates: fixed-metallicity sampling with values %v; want exactly one Z in (0, 1]", s.Values)
		}
	case SampledDiscrete:
		if len(s.Values) == 0 {
			return fmt.Errorf("rates: discrete metallicity sampling with no values; want at least one Z in (0, 1]")
		}
		sorted := slices.Sorted(slices.Values(s.Values))
		for i, z := range sorted {
			if !validZ(z) {
				return fmt.Errorf("rates: discrete metallicity sampling: Z = %v; want Z in (0, 1]", z)
			}
			if i > 0 && math.Abs(math.Log(z/sorted[i-1])) <= zMatchTolerance {
				return fmt.Errorf("rates: discrete metallicity sampling: Z = %v and %v coincide; want distinct values (relative difference > %g)", sorted[i-1], z, zMatchTolerance)
			}
		}
	case SampledLogUniform:
		if !(s.Min > 0 && s.Min < s.Max && s.Max <= 1) {
			return fmt.Errorf("rates: log-uniform metallicity sampling over [%v, %v]; want 0 < Min < Max <= 1", s.Min, s.Max)
		}
	default:
		return fmt.Errorf("rates: metallicity sampling kind %d; want SampledFixed, SampledDiscrete or SampledLogUniform", s.Kind)
	}
	return nil
}

// String describes s, for example "log-uniform Z in [0.0001, 0.03]".
func (s ZSampling) String() string {
	switch s.Kind {
	case SampledFixed:
		if len(s.Values) == 1 {
			return fmt.Sprintf("fixed Z = %g", s.Values[0])
		}
	case SampledDiscrete:
		return fmt.Sprintf("Z in %v", s.Values)
	case SampledLogUniform:
		return fmt.Sprintf("log-uniform Z in [%g, %g]", s.Min, s.Max)
	}
	return fmt.Sprintf("invalid metallicity sampling (kind %d)", s.Kind)
}
