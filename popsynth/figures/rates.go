package figures

import (
	"encoding/json"
	"fmt"
	"math"
	"os"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
)

// RateTable is the JSON object written by `corefall rates --json`: rate densities of several
// kinds of event on a redshift grid, with their Monte Carlo standard errors.
type RateTable struct {
	Z           []float64            `json:"z"`
	Rates       map[string][]float64 `json:"rates"`
	Uncertainty map[string][]float64 `json:"uncertainty"`
	Units       string               `json:"units"`
	SFR         string               `json:"sfr"`
	Metallicity string               `json:"metallicity"`
	Cosmology   struct {
		H0     float64 `json:"h0"`
		OmegaM float64 `json:"omega_m"`
		AgeGyr float64 `json:"age_gyr"`
	} `json:"cosmology"`
}

// rateKinds are the keys of a rate table, in drawing order, and their legend words.
var rateKinds = []struct{ key, label string }{
	{"ns_formation", "NS formation"},
	{"bh_formation", "BH formation"},
	{"bbh_merger", "BBH mergers"},
	{"bhns_merger", "BH-NS mergers"},
	{"nsns_merger", "NS-NS mergers"},
}

// ReadRateTable reads and checks the JSON rate table at path.
func ReadRateTable(path string) (RateTable, error) {
	var t RateTable
	data, err := os.ReadFile(path)
	if err != nil {
		return t, err
	}
	if err := json.Unmarshal(data, &t); err != nil {
		return t, fmt.Errorf("%s is not a rate table as `corefall rates --json` writes it: %w", path, err)
	}
	if len(t.Z) == 0 {
		return t, fmt.Errorf("%s: rate table has no \"z\" grid", path)
	}
	if len(t.Rates) == 0 {
		return t, fmt.Errorf("%s: rate table has no \"rates\"", path)
	}
	for k, v := range t.Rates {
		if len(v) != len(t.Z) {
			return t, fmt.Errorf("%s: rates.%s has %d values for %d redshifts", path, k, len(v), len(t.Z))
		}
		if u, ok := t.Uncertainty[k]; ok && len(u) != len(t.Z) {
			return t, fmt.Errorf("%s: uncertainty.%s has %d values for %d redshifts", path, k, len(u), len(t.Z))
		}
	}
	return t, nil
}

// RateSeries is one kind of event of one rate table: rate density and standard error per redshift.
type RateSeries struct {
	Label        string
	Z, Rate, Err []float64
}

// Rates is rate density against redshift with one-standard-error bands.
type Rates struct {
	Title  string
	Units  string
	Series []RateSeries // the kinds with a non-zero rate somewhere
}

// NewRates gathers the non-zero kinds of each table; names label the tables in the legend when
// there are several.
func NewRates(tables []RateTable, names []string) (*Rates, error) {
	if len(tables) == 0 {
		return nil, fmt.Errorf("figures: rates: no rate table given")
	}
	t0 := tables[0]
	f := &Rates{Units: t0.Units}
	if f.Units == "" {
		f.Units = "Gpc^-3 yr^-1"
	}
	f.Title = "Rate densities (source frame)"
	if t0.SFR != "" || t0.Cosmology.H0 > 0 {
		f.Title += fmt.Sprintf("\nSFR %s; H0 = %s km/s/Mpc, Omega_m = %s", t0.SFR, g(t0.Cosmology.H0), g(t0.Cosmology.OmegaM))
	}
	for i, t := range tables {
		if t.Units != "" && t.Units != f.Units {
			return nil, fmt.Errorf("figures: rates: %s is in %q, %s in %q; draw tables with the same units together", names[0], f.Units, names[i], t.Units)
		}
		for _, k := range rateKinds {
			r, ok := t.Rates[k.key]
			if !ok {
				continue
			}
			nonzero := false
			for _, v := range r {
				nonzero = nonzero || v > 0
			}
			if !nonzero {
				continue
			}
			s := RateSeries{Label: k.label, Z: t.Z, Rate: r, Err: t.Uncertainty[k.key]}
			if s.Err == nil {
				s.Err = make([]float64, len(r))
			}
			if len(tables) > 1 {
				s.Label = names[i] + ": " + s.Label
			}
			f.Series = append(f.Series, s)
		}
	}
	if len(f.Series) == 0 {
		return nil, fmt.Errorf("figures: rates: every rate in the table is zero; nothing to draw")
	}
	return f, nil
}

// Plot draws each rate as a line over a band of plus and minus one standard error, on a log axis
// (zero rates break the line).
func (f *Rates) Plot() (*plot.Plot, error) {
	sh := newSheet(f.Title, "redshift z", "rate density ["+f.Units+"]", axes{logY: true})
	a := sh.a
	floor := math.Inf(1)
	for _, s := range f.Series {
		for _, v := range s.Rate {
			if v > 0 {
				floor = math.Min(floor, v)
			}
		}
	}
	floor /= 3
	for i, s := range f.Series {
		var first *plotter.Line
		var firstBand *plotter.Polygon
		for _, run := range positiveRuns(s.Rate) {
			var line, upper, lower plotter.XYs
			for k := run[0]; k < run[1]; k++ {
				line = append(line, a.xy(s.Z[k], s.Rate[k]))
				upper = append(upper, a.xy(s.Z[k], s.Rate[k]+s.Err[k]))
				lower = append(lower, a.xy(s.Z[k], math.Max(floor, s.Rate[k]-s.Err[k])))
			}
			for l, r := 0, len(lower)-1; l < r; l, r = l+1, r-1 {
				lower[l], lower[r] = lower[r], lower[l]
			}
			poly, err := plotter.NewPolygon(append(append(plotter.XYs(nil), upper...), lower...))
			if err != nil {
				return nil, err
			}
			poly.Color = translucent(Colour(i), 0.25)
			poly.LineStyle.Width = 0
			sh.add(poly, upper)
			if firstBand == nil {
				firstBand = poly
			}
			l, err := plotter.NewLine(line)
			if err != nil {
				return nil, err
			}
			l.LineStyle = lineStyle(i)
			sh.add(l, line)
			if first == nil {
				first = l
			}
		}
		if first != nil {
			sh.legend(s.Label, firstBand, first)
		}
	}
	sh.legend("bands: 1 standard error (Monte Carlo)", band{Fill: translucent(Colour(6), 0.2)})
	sh.p.Y.Min = math.Max(sh.p.Y.Min, a.y(floor))
	sh.p.X.Min = math.Min(sh.p.X.Min, 0)
	return sh.finish(), nil
}

// positiveRuns returns the index ranges [i, j) of consecutive positive values.
func positiveRuns(v []float64) [][2]int {
	var runs [][2]int
	for i := 0; i < len(v); {
		if !(v[i] > 0) {
			i++
			continue
		}
		j := i
		for j < len(v) && v[j] > 0 {
			j++
		}
		runs = append(runs, [2]int{i, j})
		i = j
	}
	return runs
}
