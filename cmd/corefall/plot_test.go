package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// hasMagic reports whether the file at path is a PNG (signature of ISO/IEC 15948, section 5.2) or
// an SVG (XML declaration or <svg> first), as its extension says.
func hasMagic(t *testing.T, path string) bool {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Errorf("%s: %v", path, err)
		return false
	}
	if strings.HasSuffix(path, ".svg") {
		return bytes.HasPrefix(b, []byte("<?xml")) || bytes.HasPrefix(b, []byte("<svg"))
	}
	return bytes.HasPrefix(b, []byte("\x89PNG\r\n\x1a\n"))
}

// TestPlotKinds draws every kind from a small catalogue, the physics and a rate table, as PNG and
// SVG, and the default output name.
func TestPlotKinds(t *testing.T) {
	dir := t.TempDir()
	cat := filepath.Join(dir, "pop.parquet")
	code, _, errs := runCLI(t, "run", "-q", "-o", cat, "--set", "systems=4000", "--set", "binary_fraction=1",
		"--set", "time_limit_myr=30", "--set", "binary.q_min=0.05")
	if code != 0 {
		t.Fatalf("run: exit %d: %s", code, errs)
	}
	rates := filepath.Join(dir, "r.json")
	if err := os.WriteFile(rates, []byte(`{"z":[0,1,2],"rates":{"ns_formation":[1,2,3],"bbh_merger":[0.1,0.2,0]},
"uncertainty":{"ns_formation":[0.1,0.1,0.1],"bbh_merger":[0.01,0.02,0]},"units":"Gpc^-3 yr^-1","sfr":"x",
"cosmology":{"h0":67.66,"omega_m":0.31,"age_gyr":13.79}}`), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := [][]string{
		{cat, "--kind", "mass-spectrum"},
		{cat, "--kind", "mass-spectrum", "--log", cat},
		{cat, "--kind", "kicks"},
		{cat, "--kind", "period-eccentricity"},
		{cat, "--kind", "delay-times"},
		{rates, "--kind", "rates"},
		{"--kind", "initial-final", "--metallicity", "0.0002,0.002,0.0142"},
		{"--kind", "initial-final", "--log", "--set", "explosion.engine=delayed"},
		{"--kind", "cores", "--metallicity", "0.0002"},
	}
	for i, args := range cases {
		for _, ext := range []string{".png", ".svg"} {
			out := filepath.Join(dir, "fig"+string(rune('a'+i))+ext)
			code, stdout, errs := runCLI(t, append([]string{"plot", "-o", out}, args...)...)
			if code != 0 {
				t.Errorf("plot %v: exit %d: %s", args, code, errs)
				continue
			}
			if !strings.Contains(stdout, "wrote "+out) {
				t.Errorf("plot %v: stdout %q does not say where it wrote", args, stdout)
			}
			if !hasMagic(t, out) {
				t.Errorf("plot %v: %s is not a %s image", args, out, ext)
			}
		}
	}
	// Without -o: <catalogue name>-<kind>.png in the current directory.
	t.Chdir(dir)
	if code, _, errs := runCLI(t, "plot", cat, "--kind", "kicks"); code != 0 {
		t.Fatalf("plot without -o: %s", errs)
	}
	if !hasMagic(t, filepath.Join(dir, "pop-kicks.png")) {
		t.Error("plot without -o did not write pop-kicks.png")
	}
	if code, _, errs := runCLI(t, "plot", "--kind", "initial-final"); code != 0 || !hasMagic(t, filepath.Join(dir, "initial-final.png")) {
		t.Errorf("initial-final without -o: exit %d %s", code, errs)
	}
}

// TestPlotBadInput: mistakes fail with exit 1 and a message naming the flag or file at fault.
func TestPlotBadInput(t *testing.T) {
	dir := t.TempDir()
	cat := filepath.Join(dir, "s.parquet")
	if code, _, errs := runCLI(t, "run", "-q", "-o", cat, "--set", "systems=2000"); code != 0 {
		t.Fatal(errs)
	}
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"plot", cat, "-o", filepath.Join(dir, "x.pdf")}, "-o"},
		{[]string{"plot", cat, "-o", filepath.Join(dir, "x.pdf")}, ".png, .svg"},
		{[]string{"plot", cat, "--kind", "histogram"}, "--kind"},
		{[]string{"plot", "--kind", "mass-spectrum"}, "FILE"},
		{[]string{"plot", cat, "--kind", "initial-final"}, "takes no FILE"},
		{[]string{"plot", cat, "--set", "explosion.engine=delayed"}, "-c/--set"},
		{[]string{"plot", cat, "--metallicity", "0.01"}, "--metallicity"},
		{[]string{"plot", "--kind", "cores", "--metallicity", "0.001,0.01"}, "one"},
		{[]string{"plot", "--kind", "initial-final", "--metallicity", "2"}, "--metallicity"},
		{[]string{"plot", "--kind", "initial-final", "--set", "explosion.engine=fast"}, "explosion.engine"},
		{[]string{"plot", cat, "--kind", "period-eccentricity", "-o", filepath.Join(dir, "pe.png")}, "binary"},
		{[]string{"plot", filepath.Join(dir, "none.parquet")}, "none.parquet"},
		{[]string{"plot", cat, "--dpi", "10"}, "dpi"},
		{[]string{"plot", cat, "-o", cat + ".png", "--kind", "rates"}, "s.parquet"},
	}
	for _, c := range cases {
		code, _, errs := runCLI(t, c.args...)
		if code != exitError || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, message %q; want exit %d naming %q", c.args, code, errs, exitError, c.want)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "pe.png")); err == nil {
		t.Error("a failed plot left an image behind")
	}
}
