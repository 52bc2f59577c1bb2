package popsynth

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func writeFile(t *testing.T, name, text string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestDefaultConfigIsValid(t *testing.T) {
	cfg := Default()
	if cfg.Systems != 1000000 || cfg.IMF.Law != "kroupa2001" || cfg.Output.Format != "parquet" {
		t.Errorf("default config decoded wrongly: %+v", cfg)
	}
	if len(KnownKeys()) < 40 {
		t.Errorf("only %d known keys; the default config should list every key", len(KnownKeys()))
	}
}

// TestLayering checks the precedence default < file < environment < --set.
func TestLayering(t *testing.T) {
	file := writeFile(t, "c.yaml", "systems: 10\nimf:\n  law: salpeter\n  min: 0.1\n  max: 100\n  sample_max: 100\n")
	cases := []struct {
		name    string
		src     Sources
		systems int64
		law     string
	}{
		{"default", Sources{}, 1000000, "kroupa2001"},
		{"file", Sources{File: file}, 10, "salpeter"},
		{"env over file", Sources{File: file, Environ: []string{"COREFALL_SYSTEMS=20", "HOME=/x"}}, 20, "salpeter"},
		{"set over env", Sources{File: file, Environ: []string{"COREFALL_SYSTEMS=20"}, Set: []string{"systems=30"}}, 30, "salpeter"},
		{"env underscore key", Sources{Environ: []string{"COREFALL_IMF_LAW=chabrier2003", "COREFALL_IMF_MIN=0.1"}}, 1000000, "chabrier2003"},
	}
	for _, c := range cases {
		cfg, err := Load(c.src)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if cfg.Systems != c.systems || cfg.IMF.Law != c.law {
			t.Errorf("%s: systems %d law %s, want %d %s", c.name, cfg.Systems, cfg.IMF.Law, c.systems, c.law)
		}
		// A file that sets part of a section keeps the other keys of that section.
		if cfg.IMF.SampleMin != 8 {
			t.Errorf("%s: imf.sample_min = %v, want the default 8", c.name, cfg.IMF.SampleMin)
		}
	}
}

func TestSetLists(t *testing.T) {
	for _, v := range []string{"0.0002,0.002", "[0.0002, 0.002]"} {
		cfg, err := Load(Sources{Set: []string{"metallicity.sampling=list", "metallicity.values=" + v}})
		if err != nil {
			t.Fatalf("%s: %v", v, err)
		}
		if len(cfg.Metallicity.Values) != 2 || cfg.Metallicity.Values[1] != 0.002 {
			t.Errorf("%s: values %v", v, cfg.Metallicity.Values)
		}
	}
}

// TestBadInput checks that each kind of bad input is an error naming the key, the value and
// what is allowed.
func TestBadInput(t *testing.T) {
	cases := []struct {
		name string
		src  Sources
		want []string // substrings the message must hold
	}{
		{"misspelt key in file", Sources{File: writeFile(t, "a.yaml", "imf:\n  law: salpeter\n  sampel_min: 5\n")},
			[]string{"a.yaml:3", `"imf.sampel_min"`, `did you mean "imf.sample_min"`}},
		{"unknown top key", Sources{File: writeFile(t, "b.yaml", "sytems: 5\n")}, []string{`"sytems"`, `did you mean "systems"`}},
		{"misspelt --set", Sources{Set: []string{"explosion.engin=rapid"}}, []string{"explosion.engin", `did you mean "explosion.engine"`}},
		{"--set without =", Sources{Set: []string{"systems"}}, []string{"key=value"}},
		{"unknown env", Sources{Environ: []string{"COREFALL_SYSTEM=5"}}, []string{"COREFALL_SYSTEM", "systems"}},
		{"yaml syntax", Sources{File: writeFile(t, "c.yaml", "imf:\n  law: [salpeter\n")}, []string{"c.yaml", "not valid YAML", "line"}},
		{"wrong type", Sources{Set: []string{"systems=many"}}, []string{"systems", "many"}},
		{"zero systems", Sources{Set: []string{"systems=0"}}, []string{"systems = 0", ">= 1"}},
		{"negative mass", Sources{Set: []string{"imf.min=-1"}}, []string{"imf.min = -1", "> 0"}},
		{"sample range outside IMF", Sources{Set: []string{"imf.sample_max=200"}}, []string{"imf.sample_max = 200", "imf.max"}},
		{"sample_min below min", Sources{Set: []string{"imf.sample_min=0.01"}}, []string{"imf.sample_min = 0.01"}},
		{"metallicity zero", Sources{Set: []string{"metallicity.fixed=0"}}, []string{"metallicity.fixed = 0", "(0, 1)"}},
		{"metallicity negative", Sources{Set: []string{"metallicity.fixed=-0.01"}}, []string{"metallicity.fixed"}},
		{"binary fraction", Sources{Set: []string{"binary_fraction=1.5"}}, []string{"binary_fraction = 1.5", "[0, 1]"}},
		{"engine", Sources{Set: []string{"explosion.engine=fast"}}, []string{"explosion.engine", "rapid, delayed"}},
		{"imf law", Sources{Set: []string{"imf.law=kroupa"}}, []string{"imf.law", "kroupa2001"}},
		{"format", Sources{Set: []string{"output.format=xlsx"}}, []string{"output.format", "parquet, arrow, csv"}},
		{"empty list", Sources{Set: []string{"metallicity.sampling=list"}}, []string{"metallicity.values", "at least one"}},
		{"missing table", Sources{Set: []string{"core.model=table"}}, []string{"core.table"}},
		{"value as section", Sources{File: writeFile(t, "d.yaml", "systems:\n  n: 5\n")}, []string{"systems", "value"}},
		{"section as value", Sources{File: writeFile(t, "e.yaml", "imf: 5\n")}, []string{"imf", "section"}},
		{"both binary fractions", Sources{Set: []string{"binary_fraction=0.5", "binary.fraction_masses=[10]", "binary.fraction_values=[0.5]"}}, []string{"binary_fraction", "fraction_masses"}},
		{"fraction table lengths", Sources{Set: []string{"binary.fraction_masses=[10, 20]", "binary.fraction_values=[0.5]"}}, []string{"binary.fraction_values"}},
		{"fraction above 1", Sources{Set: []string{"binary.fraction_masses=[10]", "binary.fraction_values=[1.5]"}}, []string{"binary.fraction_values", "[0, 1]"}},
	}
	for _, c := range cases {
		_, err := Load(c.src)
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q does not mention %q", c.name, err, w)
			}
		}
	}
}

func TestYAMLRoundTrip(t *testing.T) {
	cfg, err := Load(Sources{Set: []string{"imf.law=salpeter", "imf.min=0.1", "imf.max=100", "imf.sample_max=100", "seed=7"}})
	if err != nil {
		t.Fatal(err)
	}
	back, err := ParseYAMLConfig("stored", cfg.YAML())
	if err != nil {
		t.Fatal(err)
	}
	if back.YAML() != cfg.YAML() {
		t.Errorf("config does not survive a YAML round trip:\n%s\nvs\n%s", cfg.YAML(), back.YAML())
	}
}

func TestEditDistance(t *testing.T) {
	for _, c := range []struct {
		a, b string
		d    int
	}{{"", "", 0}, {"abc", "abc", 0}, {"kitten", "sitting", 3}, {"sampel_min", "sample_min", 2}} {
		if got := editDistance(c.a, c.b); got != c.d {
			t.Errorf("editDistance(%q, %q) = %d, want %d (Levenshtein, by hand)", c.a, c.b, got, c.d)
		}
	}
}

// TestShippedConfigs: every example config in configs/ loads and builds an engine.
func TestShippedConfigs(t *testing.T) {
	files, _ := filepath.Glob("../configs/*.yaml")
	if len(files) < 2 {
		t.Fatalf("found %d configs", len(files))
	}
	for _, f := range files {
		if strings.HasPrefix(filepath.Base(f), "sweep") {
			continue // sweep files are checked by package sweep
		}
		cfg, err := Load(Sources{File: f})
		if err != nil {
			t.Errorf("%s: %v", f, err)
			continue
		}
		if _, err := NewEngine(cfg); err != nil {
			t.Errorf("%s: %v", f, err)
		}
	}
}
