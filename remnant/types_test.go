package remnant

import (
	"strings"
	"testing"
)

// The words are fixed by the catalogue format (DESIGN.md: remnant types are
// the words BH, NS, WD, none, star).
func TestTypeWords(t *testing.T) {
	for _, tc := range []struct {
		typ  Type
		word string
	}{
		{Star, "star"}, {WD, "WD"}, {NS, "NS"}, {BH, "BH"}, {None, "none"},
	} {
		if got := tc.typ.String(); got != tc.word {
			t.Errorf("%d.String() = %q, want %q", tc.typ, got, tc.word)
		}
		for _, s := range []string{tc.word, strings.ToUpper(tc.word), strings.ToLower(tc.word)} {
			got, err := ParseType(s)
			if err != nil || got != tc.typ {
				t.Errorf("ParseType(%q) = %v, %v; want %v", s, got, err, tc.typ)
			}
		}
		b, err := tc.typ.MarshalText()
		if err != nil || string(b) != tc.word {
			t.Errorf("%v.MarshalText() = %q, %v", tc.typ, b, err)
		}
		var u Type
		if err := u.UnmarshalText([]byte(tc.word)); err != nil || u != tc.typ {
			t.Errorf("UnmarshalText(%q) = %v, %v", tc.word, u, err)
		}
	}
	_, err := ParseType("pulsar")
	if err == nil || !strings.Contains(err.Error(), `"pulsar"`) || !strings.Contains(err.Error(), "star, WD, NS, BH, none") {
		t.Errorf("ParseType(pulsar) error = %v, want it to name the value and the allowed words", err)
	}
	if _, err := Type(9).MarshalText(); err == nil {
		t.Error("Type(9).MarshalText() succeeded")
	}
	if got := Type(9).String(); got != "Type(9)" {
		t.Errorf("Type(9).String() = %q", got)
	}
}

func TestFateWords(t *testing.T) {
	for _, tc := range []struct {
		fate Fate
		word string
	}{
		{Alive, "alive"}, {WDFate, "wd"}, {SN, "sn"}, {Failed, "failed"}, {PPISN, "ppisn"}, {PISN, "pisn"},
	} {
		if got := tc.fate.String(); got != tc.word {
			t.Errorf("%d.String() = %q, want %q", tc.fate, got, tc.word)
		}
		got, err := ParseFate(strings.ToUpper(tc.word))
		if err != nil || got != tc.fate {
			t.Errorf("ParseFate(%q) = %v, %v; want %v", tc.word, got, err, tc.fate)
		}
		var u Fate
		if err := u.UnmarshalText([]byte(tc.word)); err != nil || u != tc.fate {
			t.Errorf("UnmarshalText(%q) = %v, %v", tc.word, u, err)
		}
	}
	if _, err := ParseFate("exploded"); err == nil || !strings.Contains(err.Error(), "alive, wd, sn, failed, ppisn, pisn") {
		t.Errorf("ParseFate(exploded) error = %v, want the allowed words", err)
	}
}

func TestEngineAndKickModeWords(t *testing.T) {
	for _, tc := range []struct {
		e    EngineKind
		word string
	}{{Rapid, "rapid"}, {Delayed, "delayed"}} {
		got, err := ParseEngine(tc.word)
		if err != nil || got != tc.e || tc.e.String() != tc.word {
			t.Errorf("ParseEngine(%q) = %v, %v", tc.word, got, err)
		}
		var u EngineKind
		if err := u.UnmarshalText([]byte(strings.ToUpper(tc.word))); err != nil || u != tc.e {
			t.Errorf("UnmarshalText(%q) = %v, %v", tc.word, u, err)
		}
	}
	if _, err := ParseEngine("stochastic"); err == nil || !strings.Contains(err.Error(), "rapid, delayed") {
		t.Errorf("ParseEngine(stochastic) error = %v, want the allowed words", err)
	}
	for _, tc := range []struct {
		m    BHKickMode
		word string
	}{{KickFallback, "fallback"}, {KickMomentum, "momentum"}, {KickFull, "full"}, {KickNone, "none"}} {
		got, err := ParseBHKickMode(tc.word)
		if err != nil || got != tc.m || tc.m.String() != tc.word {
			t.Errorf("ParseBHKickMode(%q) = %v, %v", tc.word, got, err)
		}
		b, err := tc.m.MarshalText()
		if err != nil || string(b) != tc.word {
			t.Errorf("%v.MarshalText() = %q, %v", tc.m, b, err)
		}
	}
	if _, err := ParseBHKickMode("half"); err == nil || !strings.Contains(err.Error(), "fallback, momentum, full, none") {
		t.Errorf("ParseBHKickMode(half) error = %v, want the allowed words", err)
	}
}
