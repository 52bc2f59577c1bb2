package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runCLI runs corefall in-process with args and returns exit code, stdout and stderr.
func runCLI(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	a := &app{stdout: &out, stderr: &errb, environ: nil}
	code := a.execute(context.Background(), args)
	return code, out.String(), errb.String()
}

func decodeJSON(t *testing.T, text string) map[string]any {
	t.Helper()
	var m map[string]any
	if err := json.Unmarshal([]byte(text), &m); err != nil {
		t.Fatalf("not one JSON object: %v\n%s", err, text)
	}
	return m
}

func hasKeys(t *testing.T, what string, m map[string]any, keys ...string) {
	t.Helper()
	for _, k := range keys {
		if _, ok := m[k]; !ok {
			t.Errorf("%s JSON lacks key %q (DESIGN.md fixes it): %v", what, k, m)
		}
	}
}

// TestRemnantJSON checks the remnant command's JSON keys and a worked value of the Fryer et al.
// (2012) rapid engine (REFERENCES.md, computed): M_CO = 9, M_fin = 25 gives a1 = 0.25 - 1.275/24,
// b1 = 1 - 11 a1, f_fb = 9 a1 + b1 = 0.60625, M_fb = 24 f_fb = 14.55, M_bar = 1 + M_fb = 15.55 and a
// BH of M_grav = 0.9 M_bar = 13.995 Msun.
func TestRemnantJSON(t *testing.T) {
	code, out, errs := runCLI(t, "remnant", "--co-core", "9", "--final-mass", "25", "--engine", "rapid", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	m := decodeJSON(t, out)
	hasKeys(t, "remnant", m, "type", "mass", "baryonic_mass", "proto_mass", "fallback_mass", "fallback_fraction")
	if m["type"] != "BH" || math.Abs(m["mass"].(float64)-13.995) > 0.001 {
		t.Errorf("rapid 9/25: got %v %v, want BH 13.995 (REFERENCES.md worked value)", m["type"], m["mass"])
	}
}

func TestStarJSON(t *testing.T) {
	code, out, errs := runCLI(t, "star", "--mass", "20", "--metallicity", "0.0142", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	m := decodeJSON(t, out)
	hasKeys(t, "star", m, "initial_mass", "metallicity", "lifetime_myr", "final_mass", "he_core_mass", "co_core_mass", "remnant")
	hasKeys(t, "star.remnant", m["remnant"].(map[string]any), "type", "mass", "baryonic_mass", "proto_mass", "fallback_mass", "fallback_fraction")
	// Text form reads as an account of the star's life.
	code, out, _ = runCLI(t, "star", "--mass", "20", "--metallicity", "0.0142")
	if code != 0 || !strings.Contains(out, "lives") || !strings.Contains(out, "->") {
		t.Errorf("star text output:\n%s", out)
	}
}

// TestInspiralJSON: the Hulse-Taylor pulsar PSR B1913+16 (Weisberg & Huang 2016 parameters) merges
// in 300.6 Myr by Peters' (1964) integral (REFERENCES.md, computed; the literature quotes ~300 Myr).
func TestInspiralJSON(t *testing.T) {
	code, out, errs := runCLI(t, "inspiral", "--m1", "1.4398", "--m2", "1.3886", "--period-days", "0.322997448918", "--eccentricity", "0.6171340", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	m := decodeJSON(t, out)
	hasKeys(t, "inspiral", m, "merge_time_gyr", "separation_au", "eccentricity")
	if got := m["merge_time_gyr"].(float64); math.Abs(got-0.3006) > 0.0015 {
		t.Errorf("Hulse-Taylor merge time %v Gyr, want 0.3006 (REFERENCES.md)", got)
	}
}

func TestRunInspectVersion(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "cat.parquet")
	code, out, errs := runCLI(t, "run", "--set", "systems=20000", "--set", "binary_fraction=0.5", "-o", path)
	if code != 0 {
		t.Fatalf("run exit %d: %s", code, errs)
	}
	for _, w := range []string{"wrote", "BH", "NS", "mass represented", "systems/s"} {
		if !strings.Contains(out, w) {
			t.Errorf("run summary lacks %q:\n%s", w, out)
		}
	}
	code, out, errs = runCLI(t, "inspect", path, "--json")
	if code != 0 {
		t.Fatalf("inspect exit %d: %s", code, errs)
	}
	m := decodeJSON(t, out)
	hasKeys(t, "inspect", m, "systems", "binaries", "mass_represented", "counts", "bh_mass_quantiles", "config")
	hasKeys(t, "inspect.counts", m["counts"].(map[string]any), "BH", "NS", "WD", "none", "star")
	hasKeys(t, "inspect.bh_mass_quantiles", m["bh_mass_quantiles"].(map[string]any), "p05", "p50", "p95", "max")
	if m["systems"].(float64) != 20000 || m["binaries"].(float64) == 0 {
		t.Errorf("inspect: systems %v binaries %v", m["systems"], m["binaries"])
	}
	code, out, _ = runCLI(t, "inspect", path)
	if code != 0 {
		t.Fatal("inspect text failed")
	}
	for i, line := range strings.Split(out, "\n") {
		if len([]rune(line)) > 80 {
			t.Errorf("inspect line %d is %d columns wide (want <= 80): %q", i+1, len(line), line)
		}
	}
	for _, w := range []string{"corefall", "seed", "binary outcomes", "BH mass"} {
		if !strings.Contains(out, w) {
			t.Errorf("inspect text lacks %q:\n%s", w, out)
		}
	}
	code, out, _ = runCLI(t, "version")
	if code != 0 || !strings.HasPrefix(out, "corefall ") || !strings.Contains(out, "go1.") {
		t.Errorf("version: %q", out)
	}
}

// TestBadInputCLI: bad flags and files fail with exit 1 and a message naming the flag or file.
func TestBadInputCLI(t *testing.T) {
	dir := t.TempDir()
	notOurs := filepath.Join(dir, "x.parquet")
	if err := os.WriteFile(notOurs, []byte("hello, this is not a catalogue\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"star", "--mass", "-3", "--metallicity", "0.01"}, "--mass"},
		{[]string{"star", "--mass", "20", "--metallicity", "0"}, "--metallicity"},
		{[]string{"remnant", "--co-core", "9", "--final-mass", "5"}, "--co-core"},
		{[]string{"remnant", "--co-core", "9", "--final-mass", "25", "--engine", "fast"}, "--engine"},
		{[]string{"inspiral", "--m1", "1", "--m2", "1"}, "--separation-au"},
		{[]string{"inspiral", "--m1", "1", "--m2", "1", "--separation-au", "1", "--eccentricity", "1"}, "--eccentricity"},
		{[]string{"run", "--set", "systems=0", "-o", filepath.Join(dir, "a.parquet")}, "systems"},
		{[]string{"run", "--set", "imf.sampel_min=3", "-o", filepath.Join(dir, "a.parquet")}, "imf.sample_min"},
		{[]string{"run", "-c", filepath.Join(dir, "missing.yaml")}, "missing.yaml"},
		{[]string{"inspect", notOurs}, "x.parquet"},
		{[]string{"inspect", filepath.Join(dir, "nothing.parquet")}, "nothing.parquet"},
	}
	for _, c := range cases {
		code, _, errs := runCLI(t, c.args...)
		if code != exitError {
			t.Errorf("%v: exit %d, want %d", c.args, code, exitError)
		}
		if !strings.Contains(errs, c.want) {
			t.Errorf("%v: message %q does not name %q", c.args, errs, c.want)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "a.parquet")); err == nil {
		t.Error("a failed run left a file under the output name")
	}
}

func TestConfigCommands(t *testing.T) {
	code, out, _ := runCLI(t, "config", "defaults")
	if code != 0 || !strings.Contains(out, "imf:") {
		t.Errorf("config defaults: %d %q", code, out)
	}
	code, out, _ = runCLI(t, "config", "show", "--set", "imf.law=salpeter", "--set", "imf.min=0.1", "--set", "imf.max=100", "--set", "imf.sample_max=100")
	if code != 0 || !strings.Contains(out, "law: salpeter") {
		t.Errorf("config show: %d %q", code, out)
	}
	code, out, _ = runCLI(t, "config", "check")
	if code != 0 || !strings.HasPrefix(out, "ok") {
		t.Errorf("config check: %d %q", code, out)
	}
}

// TestRatesCommand checks the JSON keys fixed by the rates issue and the CSV form.
func TestRatesCommand(t *testing.T) {
	path := filepath.Join(t.TempDir(), "c.parquet")
	if code, _, errs := runCLI(t, "run", "--quiet", "--set", "systems=20000", "--set", "binary_fraction=0.5", "-o", path); code != 0 {
		t.Fatal(errs)
	}
	code, out, errs := runCLI(t, "rates", path, "--z-max", "2", "--dz", "0.5", "--json")
	if code != 0 {
		t.Fatal(errs)
	}
	m := decodeJSON(t, out)
	hasKeys(t, "rates", m, "z", "rates", "uncertainty", "units", "cosmology", "sfr")
	kinds := []string{"ns_formation", "bh_formation", "bbh_merger", "bhns_merger", "nsns_merger"}
	hasKeys(t, "rates.rates", m["rates"].(map[string]any), kinds...)
	hasKeys(t, "rates.uncertainty", m["uncertainty"].(map[string]any), kinds...)
	hasKeys(t, "rates.cosmology", m["cosmology"].(map[string]any), "h0", "omega_m", "age_gyr")
	if z := m["z"].([]any); len(z) != 5 || z[0].(float64) != 0 {
		t.Errorf("z grid %v, want 0, 0.5, ..., 2", z)
	}
	if m["units"] != "Gpc^-3 yr^-1" {
		t.Errorf("units %v", m["units"])
	}
	code, out, _ = runCLI(t, "rates", path, "--z-max", "1", "--dz", "0.5", "--csv")
	if code != 0 || !strings.HasPrefix(out, "z,ns_formation,ns_formation_uncertainty") || strings.Count(out, "\n") != 4 {
		t.Errorf("rates --csv:\n%s", out)
	}
	code, _, errs = runCLI(t, "rates", path, "--sfr", "nonsense")
	if code != exitError || !strings.Contains(errs, "--sfr") {
		t.Errorf("bad --sfr: %d %s", code, errs)
	}
}
