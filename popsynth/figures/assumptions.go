package figures

import (
	"fmt"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/corefall/corefall/popsynth"
)

// Assumption is one modelling choice of a configuration, as a figure names it.
type Assumption struct {
	Key  string // what is chosen, e.g. "engine"
	Text string // the choice in words, e.g. "rapid engine"
}

// g formats a number compactly.
func g(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

// imfName names an IMF law as the literature does.
func imfName(law string) string {
	switch law {
	case "salpeter":
		return "Salpeter IMF"
	case "kroupa2001":
		return "Kroupa IMF"
	case "chabrier2003":
		return "Chabrier IMF"
	case "broken-power-law":
		return "broken power-law IMF"
	}
	return law + " IMF"
}

// metallicityText describes how a configuration picks metallicities.
func metallicityText(m popsynth.MetallicityConfig) string {
	switch m.Sampling {
	case "list":
		vs := make([]string, len(m.Values))
		for i, v := range m.Values {
			vs[i] = g(v)
		}
		return "Z in {" + strings.Join(vs, ", ") + "}"
	case "log-uniform":
		return "log Z uniform, Z = " + g(m.Min) + "-" + g(m.Max)
	}
	return "Z = " + g(m.Fixed)
}

// Assumptions lists the modelling choices of cfg, headline ones first: engine, metallicity, IMF,
// then the core model, pair instability, kicks, the neutron-star mass limit, the time limit and the
// binary statistics.
func Assumptions(cfg popsynth.Config) []Assumption {
	core := "builtin cores"
	if cfg.Core.Model == "table" {
		core = "cores from " + filepath.Base(cfg.Core.Table)
	}
	pi := "no pair instability"
	if cfg.PairInstability.Enabled {
		pi = "PISN for CO " + g(cfg.PairInstability.PISNMinCO) + "-" + g(cfg.PairInstability.PISNMaxCO) + " Msun"
	}
	a := []Assumption{
		{"engine", cfg.Explosion.Engine + " engine"},
		{"metallicity", metallicityText(cfg.Metallicity)},
		{"imf", fmt.Sprintf("%s, %s-%s Msun sampled", imfName(cfg.IMF.Law), g(cfg.IMF.SampleMin), g(cfg.IMF.SampleMax))},
		{"core", core},
		{"direct_collapse", "direct collapse above CO " + g(cfg.Explosion.DirectCollapseCO) + " Msun"},
		{"pair_instability", pi},
		{"ns_kick", "NS kick sigma " + g(cfg.Kicks.NSSigma) + " km/s"},
		{"bh_kick", "BH kicks " + cfg.Kicks.BHMode},
		{"max_ns", "NS up to " + g(cfg.Explosion.MaxNSMass) + " Msun"},
		{"time_limit", "age " + g(cfg.TimeLimitMyr) + " Myr"},
		{"binary_fraction", "binary fraction " + g(cfg.BinaryFraction)},
	}
	if cfg.BinaryFraction > 0 {
		b := cfg.Binary
		orbit := "Sana periods"
		if b.Orbit == "opik" {
			orbit = "Opik separations"
		}
		a = append(a,
			Assumption{"orbit", orbit},
			Assumption{"q_exponent", "f(q) ~ q^" + g(b.QExponent)},
			Assumption{"q_min", "q >= " + g(b.QMin)},
			Assumption{"eccentricity", b.Eccentricity + " eccentricities"},
		)
	}
	return a
}

// headline is the number of leading Assumptions a title always shows (engine, metallicity, IMF).
const headline = 3

// titleAndLabels returns a figure title, "heading" followed by the assumptions every catalogue
// shares (at least the headline ones, engine, metallicity and IMF, when they are shared), and one
// legend label per catalogue: its name followed by the assumptions that differ between catalogues.
func titleAndLabels(heading string, infos []Info) (title string, labels []string) {
	labels = make([]string, len(infos))
	all := make([][]Assumption, len(infos))
	for i, in := range infos {
		labels[i] = in.Name
		if in.HasConfig {
			all[i] = Assumptions(in.Config)
		}
	}
	// Keys in the order of their first appearance, and each catalogue's text per key ("" if absent).
	var keys []string
	texts := make([]map[string]string, len(infos))
	for i, as := range all {
		texts[i] = make(map[string]string, len(as))
		for _, a := range as {
			if !containsKey(keys, a.Key) {
				keys = append(keys, a.Key)
			}
			texts[i][a.Key] = a.Text
		}
	}
	var common []string
	for k, key := range keys {
		shared := true
		for i := range infos {
			if all[i] == nil || texts[i][key] != texts[0][key] {
				shared = false
			}
		}
		switch {
		case shared && k < headline:
			common = append(common, texts[0][key])
		case !shared:
			for i := range infos {
				if t := texts[i][key]; t != "" {
					labels[i] += ", " + t
				}
			}
		}
	}
	for i := range infos {
		if !infos[i].HasConfig {
			labels[i] += " (no readable configuration in its metadata)"
		}
	}
	title = heading
	if len(common) > 0 {
		title += "\n" + strings.Join(common, "; ")
	}
	return title, labels
}

func containsKey(keys []string, k string) bool {
	for _, x := range keys {
		if x == k {
			return true
		}
	}
	return false
}
