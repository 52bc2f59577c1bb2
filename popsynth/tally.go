package popsynth

import (
	"math"

	"github.com/corefall/corefall/remnant"
)

// Outcome is what became of a system as a whole.
type Outcome uint8

// Outcomes, as written in the catalogue's outcome column.
const (
	Single      Outcome = iota // born without a companion
	Bound                      // a binary that stayed bound through every supernova
	Disrupted                  // a binary unbound by a supernova
	Interacting                // a binary whose star would fill its Roche lobe (evolved no further)
	numOutcomes
)

var outcomeNames = [...]string{"single", "bound", "disrupted", "interacting"}

// String returns the word used in the catalogue.
func (o Outcome) String() string {
	if int(o) < len(outcomeNames) {
		return outcomeNames[o]
	}
	return "unknown"
}

// OutcomeNames returns the outcome words in Outcome order.
func OutcomeNames() []string { return outcomeNames[:] }

// ParseOutcome returns the Outcome named s.
func ParseOutcome(s string) (Outcome, bool) {
	for i, n := range outcomeNames {
		if n == s {
			return Outcome(i), true
		}
	}
	return 0, false
}

// massBinWidth is the width (Msun) of the histogram bins behind the mass quantiles of a Tally, so
// quantiles are exact to half of it.
const massBinWidth = 0.01

// massHistMax is the largest mass (Msun) the histogram resolves; heavier remnants go to the last bin
// (the maximum is still exact).
const massHistMax = 1000

// MassHist is a fixed-width histogram of remnant masses (Msun) that answers quantiles to within
// half a bin (0.005 Msun) in memory independent of the number of remnants.
type MassHist struct {
	Counts []int64
	N      int64
	Max    float64
}

// Add counts one remnant of mass m.
func (h *MassHist) Add(m float64) {
	if h.Counts == nil {
		h.Counts = make([]int64, int(massHistMax/massBinWidth))
	}
	i := int(m / massBinWidth)
	if i >= len(h.Counts) {
		i = len(h.Counts) - 1
	}
	if i < 0 {
		i = 0
	}
	h.Counts[i]++
	h.N++
	if m > h.Max {
		h.Max = m
	}
}

// BinCentre returns the mass (Msun) at the centre of bin i of Counts.
func (h *MassHist) BinCentre(i int) float64 { return (float64(i) + 0.5) * massBinWidth }

// Merge adds the counts of o to h.
func (h *MassHist) Merge(o *MassHist) {
	if o.N == 0 {
		return
	}
	if h.Counts == nil {
		h.Counts = make([]int64, len(o.Counts))
	}
	for i, c := range o.Counts {
		h.Counts[i] += c
	}
	h.N += o.N
	h.Max = math.Max(h.Max, o.Max)
}

// Quantile returns the p-quantile (0 <= p <= 1) of the masses as the centre of the bin that holds
// it, capped at Max; NaN when empty.
func (h *MassHist) Quantile(p float64) float64 {
	if h.N == 0 {
		return math.NaN()
	}
	target := int64(math.Ceil(p * float64(h.N)))
	if target < 1 {
		target = 1
	}
	var cum int64
	for i, c := range h.Counts {
		cum += c
		if cum >= target {
			return math.Min(h.BinCentre(i), h.Max)
		}
	}
	return h.Max
}

// Tally counts a population's remnants and outcomes. Counts are over stars (a binary adds two), by
// remnant type; Outcomes are over systems.
type Tally struct {
	Systems  int64    // systems evolved (or, read back, rows)
	Dropped  int64    // interacting binaries left out of the catalogue (binary.interacting = drop)
	Counts   [8]int64 // indexed by remnant.Type
	Outcomes [numOutcomes]int64
	BH, NS   MassHist
}

// AddStar counts one star's remnant.
func (t *Tally) AddStar(typ remnant.Type, mass float64) {
	t.Counts[typ]++
	switch typ {
	case remnant.BH:
		t.BH.Add(mass)
	case remnant.NS:
		t.NS.Add(mass)
	}
}

// Binaries returns the number of binaries: the systems whose outcome is not single.
func (t *Tally) Binaries() int64 {
	return t.Outcomes[Bound] + t.Outcomes[Disrupted] + t.Outcomes[Interacting]
}

// Count returns the number of remnants of type typ.
func (t *Tally) Count(typ remnant.Type) int64 { return t.Counts[typ] }

// Merge adds o to t.
func (t *Tally) Merge(o *Tally) {
	t.Systems += o.Systems
	t.Dropped += o.Dropped
	for i := range t.Counts {
		t.Counts[i] += o.Counts[i]
	}
	for i := range t.Outcomes {
		t.Outcomes[i] += o.Outcomes[i]
	}
	t.BH.Merge(&o.BH)
	t.NS.Merge(&o.NS)
}
