package popsynth

import (
	"strings"
	"testing"

	"github.com/corefall/corefall/configs"
)

// TestDefaultYAMLListsBuiltin keeps configs/default.yaml's core.builtin section equal to
// remnant.DefaultBuiltin, so every parameter of the builtin model is a documented config key.
// Regenerate the section with: go test ./popsynth -run DefaultYAMLListsBuiltin -v (it prints it).
func TestDefaultYAMLListsBuiltin(t *testing.T) {
	want := DefaultBuiltinYAML()
	if !strings.Contains(string(configs.Default), want) {
		t.Errorf("configs/default.yaml lacks the core.builtin section; it must read:\n%s", want)
	}
}

func TestBuiltinKeys(t *testing.T) {
	for name, key := range map[string]string{
		"HeCoreMaxFraction": "he_core_max_fraction",
		"MSWindFraction":    "ms_wind_fraction",
		"COBaseFraction":    "co_base_fraction",
		"WRLimitMass":       "wr_limit_mass",
	} {
		if got := snakeCase(name); got != key {
			t.Errorf("snakeCase(%q) = %q, want %q", name, got, key)
		}
	}
	cfg, err := Load(Sources{Set: []string{"core.builtin.he_core_max_fraction=0.45"}})
	if err != nil {
		t.Fatal(err)
	}
	if m := cfg.Core.Builtin.Model(); m.HeCoreMaxFraction != 0.45 {
		t.Errorf("core.builtin.he_core_max_fraction did not reach the model: %v", m.HeCoreMaxFraction)
	}
	if _, err := Load(Sources{Set: []string{"core.builtin.he_core_max_fractio=0.45"}}); err == nil ||
		!strings.Contains(err.Error(), "core.builtin.he_core_max_fraction") {
		t.Errorf("misspelt builtin key: %v", err)
	}
}
