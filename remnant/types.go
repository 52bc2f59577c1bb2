package remnant

import (
	"fmt"
	"strings"
)

// Type is the kind of object a star leaves: still a star, a white dwarf, a
// neutron star, a black hole, or nothing at all. Its text form is one of the
// words "star", "WD", "NS", "BH" and "none".
type Type uint8

// The remnant types.
const (
	Star Type = iota // still a star (not yet at the end of its life)
	WD               // white dwarf
	NS               // neutron star
	BH               // black hole
	None             // no remnant: the star was disrupted (pair-instability supernova)
)

var typeWords = [...]string{Star: "star", WD: "WD", NS: "NS", BH: "BH", None: "none"}

// String returns "star", "WD", "NS", "BH" or "none".
func (t Type) String() string {
	if int(t) < len(typeWords) {
		return typeWords[t]
	}
	return fmt.Sprintf("Type(%d)", uint8(t))
}

// ParseType returns the Type named by s, one of "star", "WD", "NS", "BH",
// "none" (letter case is ignored).
func ParseType(s string) (Type, error) {
	for i, w := range typeWords {
		if strings.EqualFold(s, w) {
			return Type(i), nil
		}
	}
	return 0, fmt.Errorf("remnant: unknown remnant type %q, want one of %s", s, strings.Join(typeWords[:], ", "))
}

// MarshalText implements encoding.TextMarshaler with the words of String.
func (t Type) MarshalText() ([]byte, error) {
	if int(t) >= len(typeWords) {
		return nil, fmt.Errorf("remnant: invalid Type %d", uint8(t))
	}
	return []byte(typeWords[t]), nil
}

// UnmarshalText implements encoding.TextUnmarshaler with ParseType.
func (t *Type) UnmarshalText(b []byte) error {
	v, err := ParseType(string(b))
	if err != nil {
		return err
	}
	*t = v
	return nil
}

// Fate is how a star ended. Its text form is one of the words "alive",
// "wd", "sn", "failed", "ppisn" and "pisn".
type Fate uint8

// The fates.
const (
	Alive  Fate = iota // still a star; set by callers that follow stars in time
	WDFate             // "wd": the core never collapses; the star ends as a white dwarf
	SN                 // "sn": core collapse with a successful explosion (fallback fraction < 1)
	Failed             // "failed": core collapse with no explosion, everything falls back (f_fb = 1)
	PPISN              // "ppisn": pulsational pair instability sheds mass, then the core collapses
	PISN               // "pisn": a pair-instability supernova disrupts the star; no remnant
)

var fateWords = [...]string{Alive: "alive", WDFate: "wd", SN: "sn", Failed: "failed", PPISN: "ppisn", PISN: "pisn"}

// String returns "alive", "wd", "sn", "failed", "ppisn" or "pisn".
func (f Fate) String() string {
	if int(f) < len(fateWords) {
		return fateWords[f]
	}
	return fmt.Sprintf("Fate(%d)", uint8(f))
}

// ParseFate returns the Fate named by s, one of "alive", "wd", "sn",
// "failed", "ppisn", "pisn" (letter case is ignored).
func ParseFate(s string) (Fate, error) {
	for i, w := range fateWords {
		if strings.EqualFold(s, w) {
			return Fate(i), nil
		}
	}
	return 0, fmt.Errorf("remnant: unknown fate %q, want one of %s", s, strings.Join(fateWords[:], ", "))
}

// MarshalText implements encoding.TextMarshaler with the words of String.
func (f Fate) MarshalText() ([]byte, error) {
	if int(f) >= len(fateWords) {
		return nil, fmt.Errorf("remnant: invalid Fate %d", uint8(f))
	}
	return []byte(fateWords[f]), nil
}

// UnmarshalText implements encoding.TextUnmarshaler with ParseFate.
func (f *Fate) UnmarshalText(b []byte) error {
	v, err := ParseFate(string(b))
	if err != nil {
		return err
	}
	*f = v
	return nil
}

// EngineKind selects one of the two supernova engines of Fryer et al. (2012,
// ApJ 749, 91): "rapid" (the explosion develops within ~0.1-0.2 s of bounce)
// or "delayed" (it develops later; this fills the gap between neutron-star and
// black-hole masses).
type EngineKind uint8

// The supernova engines of Fryer et al. (2012).
const (
	Rapid EngineKind = iota
	Delayed
)

var engineWords = [...]string{Rapid: "rapid", Delayed: "delayed"}

// String returns "rapid" or "delayed".
func (e EngineKind) String() string {
	if int(e) < len(engineWords) {
		return engineWords[e]
	}
	return fmt.Sprintf("EngineKind(%d)", uint8(e))
}

// ParseEngine returns the EngineKind named by s, "rapid" or "delayed"
// (letter case is ignored).
func ParseEngine(s string) (EngineKind, error) {
	for i, w := range engineWords {
		if strings.EqualFold(s, w) {
			return EngineKind(i), nil
		}
	}
	return 0, fmt.Errorf("remnant: unknown supernova engine %q, want one of %s", s, strings.Join(engineWords[:], ", "))
}

// MarshalText implements encoding.TextMarshaler with the words of String.
func (e EngineKind) MarshalText() ([]byte, error) {
	if int(e) >= len(engineWords) {
		return nil, fmt.Errorf("remnant: invalid EngineKind %d", uint8(e))
	}
	return []byte(engineWords[e]), nil
}

// UnmarshalText implements encoding.TextUnmarshaler with ParseEngine.
func (e *EngineKind) UnmarshalText(b []byte) error {
	v, err := ParseEngine(string(b))
	if err != nil {
		return err
	}
	*e = v
	return nil
}

// BHKickMode says how the natal kick of a black hole relates to the
// Maxwellian kick drawn for a neutron star. Its text form is one of
// "fallback", "momentum", "full" and "none".
type BHKickMode uint8

// The black-hole kick modes.
const (
	// KickFallback scales the neutron-star kick by 1 - f_fb, the fraction of
	// the ejecta that escapes (Fryer et al. 2012, ApJ 749, 91): black holes
	// formed by direct collapse get no kick.
	KickFallback BHKickMode = iota
	// KickMomentum gives the black hole the momentum of a neutron star of
	// mass Kicks.RefNSMass: the speed is scaled by RefNSMass / M_BH.
	KickMomentum
	// KickFull gives black holes the same speed distribution as neutron stars.
	KickFull
	// KickNone gives black holes no kick.
	KickNone
)

var kickWords = [...]string{KickFallback: "fallback", KickMomentum: "momentum", KickFull: "full", KickNone: "none"}

// String returns "fallback", "momentum", "full" or "none".
func (m BHKickMode) String() string {
	if int(m) < len(kickWords) {
		return kickWords[m]
	}
	return fmt.Sprintf("BHKickMode(%d)", uint8(m))
}

// ParseBHKickMode returns the BHKickMode named by s, one of "fallback",
// "momentum", "full", "none" (letter case is ignored).
func ParseBHKickMode(s string) (BHKickMode, error) {
	for i, w := range kickWords {
		if strings.EqualFold(s, w) {
			return BHKickMode(i), nil
		}
	}
	return 0, fmt.Errorf("remnant: unknown black-hole kick mode %q, want one of %s", s, strings.Join(kickWords[:], ", "))
}

// MarshalText implements encoding.TextMarshaler with the words of String.
func (m BHKickMode) MarshalText() ([]byte, error) {
	if int(m) >= len(kickWords) {
		return nil, fmt.Errorf("remnant: invalid BHKickMode %d", uint8(m))
	}
	return []byte(kickWords[m]), nil
}

// UnmarshalText implements encoding.TextUnmarshaler with ParseBHKickMode.
func (m *BHKickMode) UnmarshalText(b []byte) error {
	v, err := ParseBHKickMode(string(b))
	if err != nil {
		return err
	}
	*m = v
	return nil
}
