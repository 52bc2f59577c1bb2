package rates

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
)

// SFR is a cosmic star-formation history: the comoving star-formation rate
// density psi(z) in Msun yr^-1 Mpc^-3 (source-frame years, comoving Mpc).
type SFR interface {
	// Density returns psi(z) in Msun yr^-1 Mpc^-3. It returns NaN where the
	// history is not defined.
	Density(z float64) float64
	// Name describes the history for output and provenance.
	Name() string
}

// ParametricSFR is the four-parameter form of Madau & Dickinson (2014,
// ARA&A 52, 415; formula from memory, peak z ~ 1.9 as their abstract states):
//
//	psi(z) = A (1+z)^B / (1 + ((1+z)/C)^D)   Msun yr^-1 Mpc^-3,
//
// rising as (1+z)^B at low redshift, falling as (1+z)^(B-D) at high redshift,
// and peaking where (1+z)^D = B C^D / (D - B). A is in Msun yr^-1 Mpc^-3;
// B, C, D are dimensionless. The normalisation A belongs to the IMF the
// history was derived with (Salpeter for Madau & Dickinson 2014, Kroupa for
// Madau & Fragos 2017): scale A when the catalogue uses another IMF.
type ParametricSFR struct {
	A, B, C, D float64
	Label      string // returned by Name when not empty
}

// MadauDickinson2014 returns psi(z) = 0.015 (1+z)^2.7 / (1 + ((1+z)/2.9)^5.6)
// Msun yr^-1 Mpc^-3 (Madau & Dickinson 2014, ARA&A 52, 415; Salpeter
// IMF over 0.1-100 Msun), which peaks at z ≈ 1.86.
func MadauDickinson2014() ParametricSFR {
	return ParametricSFR{A: 0.015, B: 2.7, C: 2.9, D: 5.6, Label: "Madau & Dickinson (2014)"}
}

// MadauFragos2017 returns psi(z) = 0.01 (1+z)^2.6 / (1 + ((1+z)/3.2)^6.2)
// Msun yr^-1 Mpc^-3 (Madau & Fragos 2017, ApJ 840, 39; Kroupa IMF; from memory).
func MadauFragos2017() ParametricSFR {
	return ParametricSFR{A: 0.01, B: 2.6, C: 3.2, D: 6.2, Label: "Madau & Fragos (2017)"}
}

// Density returns psi(z) in Msun yr^-1 Mpc^-3, or NaN for z < 0 or NaN.
func (p ParametricSFR) Density(z float64) float64 {
	if !(z >= 0) {
		return math.NaN()
	}
	zp := 1 + z
	return p.A * math.Pow(zp, p.B) / (1 + math.Pow(zp/p.C, p.D))
}

// Name returns Label, or the formula with its parameters if Label is empty.
func (p ParametricSFR) Name() string {
	if p.Label != "" {
		return p.Label
	}
	return fmt.Sprintf("%g (1+z)^%g / (1 + ((1+z)/%g)^%g)", p.A, p.B, p.C, p.D)
}

// Validate reports whether the parameters give a finite, non-negative
// history: A >= 0, C > 0, and B, D finite.
func (p ParametricSFR) Validate() error {
	switch {
	case !(p.A >= 0) || math.IsInf(p.A, 0):
		return fmt.Errorf("rates: SFR normalisation A = %v Msun/yr/Mpc^3; want a finite value >= 0", p.A)
	case math.IsNaN(p.B) || math.IsInf(p.B, 0):
		return fmt.Errorf("rates: SFR low-redshift slope B = %v; want a finite value", p.B)
	case !(p.C > 0) || math.IsInf(p.C, 0):
		return fmt.Errorf("rates: SFR turnover C = %v; want a finite value > 0", p.C)
	case math.IsNaN(p.D) || math.IsInf(p.D, 0):
		return fmt.Errorf("rates: SFR high-redshift slope D = %v; want a finite value", p.D)
	}
	return nil
}

// TableSFR is a star-formation history given at points (Z[i], Psi[i]),
// redshift and Msun yr^-1 Mpc^-3, linearly interpolated in z between them.
// It is defined only on [Z[0], Z[len-1]]: Density returns NaN outside it and
// At returns an error. Build it with NewTableSFR or ParseSFRTable.
type TableSFR struct {
	Z, Psi []float64
	Label  string
}

// NewTableSFR validates and copies a tabulated history: at least two points,
// equal lengths, finite strictly increasing redshifts >= 0, finite
// psi >= 0. The label names the table in output.
func NewTableSFR(z, psi []float64, label string) (TableSFR, error) {
	if len(z) != len(psi) {
		return TableSFR{}, fmt.Errorf("rates: SFR table has %d redshifts but %d rates; want equal lengths", len(z), len(psi))
	}
	if len(z) < 2 {
		return TableSFR{}, fmt.Errorf("rates: SFR table has %d points; want at least 2", len(z))
	}
	for i := range z {
		if !(z[i] >= 0) || math.IsInf(z[i], 0) {
			return TableSFR{}, fmt.Errorf("rates: SFR table point %d: redshift %v; want a finite value >= 0", i, z[i])
		}
		if i > 0 && !(z[i] > z[i-1]) {
			return TableSFR{}, fmt.Errorf("rates: SFR table point %d: redshift %v after %v; want strictly increasing redshifts", i, z[i], z[i-1])
		}
		if !(psi[i] >= 0) || math.IsInf(psi[i], 0) {
			return TableSFR{}, fmt.Errorf("rates: SFR table point %d (z = %v): rate %v Msun/yr/Mpc^3; want a finite value >= 0", i, z[i], psi[i])
		}
	}
	return TableSFR{
		Z:     append([]float64(nil), z...),
		Psi:   append([]float64(nil), psi...),
		Label: label,
	}, nil
}

// ParseSFRTable reads a CSV table whose first line (after blank lines and
// lines starting with '#') is the header "redshift,sfr" and whose other
// lines are pairs z, psi (Msun yr^-1 Mpc^-3), and returns it as a TableSFR
// labelled label. The values are validated as by NewTableSFR.
func ParseSFRTable(r io.Reader, label string) (TableSFR, error) {
	sc := bufio.NewScanner(r)
	var z, psi []float64
	header := false
	line := 0
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if text == "" || strings.HasPrefix(text, "#") {
			continue
		}
		fields := strings.Split(text, ",")
		for i := range fields {
			fields[i] = strings.TrimSpace(fields[i])
		}
		if !header {
			if len(fields) != 2 || fields[0] != "redshift" || fields[1] != "sfr" {
				return TableSFR{}, fmt.Errorf("rates: SFR table line %d: header %q; want \"redshift,sfr\"", line, text)
			}
			header = true
			continue
		}
		if len(fields) != 2 {
			return TableSFR{}, fmt.Errorf("rates: SFR table line %d: %d fields; want 2 (redshift,sfr)", line, len(fields))
		}
		zv, err := strconv.ParseFloat(fields[0], 64)
		if err != nil {
			return TableSFR{}, fmt.Errorf("rates: SFR table line %d: redshift %q is not a number", line, fields[0])
		}
		pv, err := strconv.ParseFloat(fields[1], 64)
		if err != nil {
			return TableSFR{}, fmt.Errorf("rates: SFR table line %d: sfr %q is not a number", line, fields[1])
		}
		z = append(z, zv)
		psi = append(psi, pv)
	}
	if err := sc.Err(); err != nil {
		return TableSFR{}, fmt.Errorf("rates: reading SFR table: %w", err)
	}
	if !header {
		return TableSFR{}, fmt.Errorf("rates: SFR table is empty; want the header \"redshift,sfr\" and at least 2 rows")
	}
	return NewTableSFR(z, psi, label)
}

// At returns psi(z) in Msun yr^-1 Mpc^-3, or an error naming the table's
// range if z lies outside it.
func (t TableSFR) At(z float64) (float64, error) {
	n := len(t.Z)
	if n < 2 || !(z >= t.Z[0] && z <= t.Z[n-1]) {
		lo, hi := math.NaN(), math.NaN()
		if n > 0 {
			lo, hi = t.Z[0], t.Z[n-1]
		}
		return math.NaN(), fmt.Errorf("rates: SFR table %q: redshift %v outside its range [%v, %v]", t.Name(), z, lo, hi)
	}
	i := sort.SearchFloat64s(t.Z, z) // t.Z[i-1] < z <= t.Z[i]
	if i == 0 {
		return t.Psi[0], nil
	}
	f := (z - t.Z[i-1]) / (t.Z[i] - t.Z[i-1])
	return t.Psi[i-1] + f*(t.Psi[i]-t.Psi[i-1]), nil
}

// Density returns psi(z) in Msun yr^-1 Mpc^-3, or NaN outside the table.
func (t TableSFR) Density(z float64) float64 {
	v, _ := t.At(z)
	return v
}

// Name returns Label, or "table" if Label is empty.
func (t TableSFR) Name() string {
	if t.Label != "" {
		return t.Label
	}
	return "table"
}

// Validate reports whether t satisfies the conditions of NewTableSFR.
func (t TableSFR) Validate() error {
	_, err := NewTableSFR(t.Z, t.Psi, t.Label)
	return err
}
