package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/popsynth/catalog"
	"github.com/corefall/corefall/remnant"
)

type inspectJSON struct {
	Systems         int64              `json:"systems"`
	Binaries        int64              `json:"binaries"`
	MassRepresented float64            `json:"mass_represented"`
	Counts          map[string]int64   `json:"counts"`
	BHMassQuantiles map[string]float64 `json:"bh_mass_quantiles"`
	Outcomes        map[string]int64   `json:"outcomes,omitempty"`
	Seed            string             `json:"seed"`
	Version         string             `json:"version"`
	GoVersion       string             `json:"go_version"`
	Config          string             `json:"config"`
}

func (a *app) inspectCommand() *cobra.Command {
	var asJSON bool
	cmd := &cobra.Command{
		Use:   "inspect FILE",
		Short: "Summarise a catalogue: provenance, remnant counts, mass quantiles",
		Args:  cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			info, err := popsynth.Inspect(args[0])
			if err != nil {
				return err
			}
			if asJSON {
				return writeJSON(cmd.OutOrStdout(), toInspectJSON(info))
			}
			printInspect(cmd.OutOrStdout(), info)
			return nil
		},
	}
	cmd.Flags().BoolVar(&asJSON, "json", false, "print one JSON object")
	return cmd
}

func toInspectJSON(info popsynth.CatalogueInfo) inspectJSON {
	t := &info.Tally
	j := inspectJSON{
		Systems: t.Systems, Binaries: t.Binaries(), MassRepresented: info.MassRepresented,
		Counts:          map[string]int64{},
		BHMassQuantiles: map[string]float64{},
		Seed:            info.Metadata[catalog.MetaSeed],
		Version:         info.Metadata[catalog.MetaVersion],
		GoVersion:       info.Metadata[catalog.MetaGoVersion],
		Config:          info.Metadata[catalog.MetaConfig],
	}
	for _, typ := range []remnant.Type{remnant.BH, remnant.NS, remnant.WD, remnant.None, remnant.Star} {
		j.Counts[typ.String()] = t.Count(typ)
	}
	if t.BH.N > 0 {
		j.BHMassQuantiles["p05"] = t.BH.Quantile(0.05)
		j.BHMassQuantiles["p50"] = t.BH.Quantile(0.5)
		j.BHMassQuantiles["p95"] = t.BH.Quantile(0.95)
		j.BHMassQuantiles["max"] = t.BH.Max
	}
	if t.Binaries() > 0 {
		j.Outcomes = map[string]int64{}
		for o, n := range t.Outcomes {
			j.Outcomes[popsynth.Outcome(o).String()] = n
		}
	}
	return j
}

// configHighlights picks the lines of the stored config a reader looks for first.
func configHighlights(yamlText string) []string {
	want := []string{"law:", "sample_min:", "sample_max:", "sampling:", "fixed:", "model:", "engine:", "bh_mode:", "binary_fraction:"}
	var out []string
	section := ""
	for _, line := range strings.Split(yamlText, "\n") {
		trimmed := strings.TrimSpace(line)
		if trimmed == "" {
			continue
		}
		if !strings.HasPrefix(line, " ") && strings.HasSuffix(trimmed, ":") {
			section = strings.TrimSuffix(trimmed, ":") + "."
			continue
		}
		if !strings.HasPrefix(line, " ") {
			section = ""
		}
		for _, w := range want {
			if strings.HasPrefix(trimmed, w) {
				out = append(out, section+trimmed)
			}
		}
	}
	return out
}

// printInspect prints a catalogue summary that fits in 80 columns.
func printInspect(w io.Writer, info popsynth.CatalogueInfo) {
	md := info.Metadata
	t := &info.Tally
	fmt.Fprintf(w, "%s\n", info.Path)
	fmt.Fprintf(w, "  made by corefall %s (%s), seed %s\n", md[catalog.MetaVersion], md[catalog.MetaGoVersion], md[catalog.MetaSeed])
	fmt.Fprintf(w, "  %d systems (%d binaries), representing %.6g Msun of stars\n", t.Systems, t.Binaries(), info.MassRepresented)
	if hl := configHighlights(md[catalog.MetaConfig]); len(hl) > 0 {
		fmt.Fprintln(w, "  config:")
		for _, l := range hl {
			fmt.Fprintf(w, "    %s\n", l)
		}
	}
	fmt.Fprintln(w)
	printCounts(w, t)
	if t.BH.N > 0 {
		fmt.Fprintln(w)
		printHistogram(w, &t.BH, "BH mass (Msun)", 50)
	}
	if t.Binaries() > 0 {
		fmt.Fprintln(w)
		fmt.Fprintln(w, "binary outcomes:")
		for o, n := range t.Outcomes {
			fmt.Fprintf(w, "  %-12s %12d\n", popsynth.Outcome(o), n)
		}
	}
}

// printHistogram draws a text histogram of masses, ten bins between the 0th and 100th percentile,
// bars scaled to width characters.
func printHistogram(w io.Writer, h *popsynth.MassHist, title string, width int) {
	const nb = 10
	lo, hi := h.Quantile(0), h.Max
	if hi <= lo {
		hi = lo + 1
	}
	step := (hi - lo) / nb
	var counts [nb]int64
	var most int64
	for i, c := range h.Counts {
		if c == 0 {
			continue
		}
		m := h.BinCentre(i)
		k := int((m - lo) / step)
		k = max(0, min(nb-1, k))
		counts[k] += c
		most = max(most, counts[k])
	}
	fmt.Fprintln(w, title+":")
	for k, c := range counts {
		bar := 0
		if most > 0 {
			bar = int(float64(c) / float64(most) * float64(width))
		}
		fmt.Fprintf(w, "  %6.1f-%6.1f %s %d\n", lo+float64(k)*step, lo+float64(k+1)*step, strings.Repeat("#", bar), c)
	}
}
