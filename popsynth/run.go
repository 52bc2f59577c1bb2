package popsynth

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"runtime"
	"strconv"
	"time"

	"github.com/corefall/corefall/popsynth/catalog"
)

// Version is corefall's version, recorded in every catalogue.
const Version = "0.1.0"

// MetaDropped is the catalogue metadata key that counts interacting binaries left out of the
// catalogue (binary.interacting = drop); they still count in corefall.systems and the mass represented.
const MetaDropped = "corefall.dropped_interacting"

// Summary describes a finished run.
type Summary struct {
	Tally
	Path            string
	MassRepresented float64 // Msun
	Seconds         float64 // wall time of the run
}

// SystemsPerSecond returns the run's throughput.
func (s Summary) SystemsPerSecond() float64 {
	if s.Seconds <= 0 {
		return 0
	}
	return float64(s.Systems) / s.Seconds
}

// Metadata returns the key-value metadata that a catalogue made by e carries: the effective config
// as YAML, the seed, the versions, the number of systems and the stellar mass represented.
//
// The recorded config is the effective one with two execution details normalised, so that they do
// not change the file's bytes: workers is recorded as 0 (the catalogue is the same for any number of
// workers) and output.path as the file's base name.
func (e *Engine) Metadata() map[string]string { return e.metadataFor(e.cfg.Output.Path) }

func (e *Engine) metadataFor(path string) map[string]string {
	rec := e.cfg
	rec.Workers = 0
	rec.Output.Path = filepath.Base(path)
	return map[string]string{
		catalog.MetaConfig:          rec.YAML(),
		catalog.MetaSeed:            strconv.FormatUint(e.cfg.Seed, 10),
		catalog.MetaVersion:         Version,
		catalog.MetaGoVersion:       runtime.Version(),
		catalog.MetaSystems:         strconv.FormatInt(e.cfg.Systems, 10),
		catalog.MetaMassRepresented: strconv.FormatFloat(e.MassRepresented(), 'g', 10, 64),
	}
}

// WriteCatalogue runs e and writes its catalogue to path in format, under a temporary name that is
// renamed to path only when the catalogue is complete. On any error, or when ctx is cancelled, the
// temporary file is removed and path keeps whatever it held before.
func (e *Engine) WriteCatalogue(ctx context.Context, path string, progress Progress) (Summary, error) {
	start := time.Now()
	format, err := catalog.ParseFormat(e.cfg.Output.Format)
	if err != nil {
		return Summary{}, err
	}
	w, err := catalog.Create(path, e.schema, catalog.Options{
		Format:       format,
		RowGroupRows: e.cfg.Output.RowGroupRows,
		Metadata:     e.metadataFor(path),
	})
	if err != nil {
		return Summary{}, err
	}
	tally, err := e.Run(ctx, w.Write, progress)
	if err == nil {
		err = w.SetMetadata(catalog.MetaBinaries, strconv.FormatInt(tally.Binaries(), 10))
	}
	if err == nil && e.bin != nil {
		err = w.SetMetadata(MetaDropped, strconv.FormatInt(tally.Dropped, 10))
	}
	if err == nil {
		err = w.Close()
	}
	if err != nil {
		w.Abort()
		if errors.Is(err, context.Canceled) {
			return Summary{}, err
		}
		return Summary{}, fmt.Errorf("writing %s: %w", path, err)
	}
	return Summary{
		Tally:           tally,
		Path:            path,
		MassRepresented: e.MassRepresented(),
		Seconds:         time.Since(start).Seconds(),
	}, nil
}
