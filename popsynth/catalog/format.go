package catalog

import (
	"fmt"
	"strconv"
	"strings"
)

// Format is the file format of a catalogue.
type Format uint8

const (
	// Parquet is Apache Parquet with zstd-compressed pages: the default.
	Parquet Format = iota
	// Arrow is the Apache Arrow IPC file format (Feather v2).
	Arrow
	// CSV is comma-separated text with '#' comment lines for metadata.
	CSV
)

// String returns "parquet", "arrow" or "csv".
func (f Format) String() string {
	switch f {
	case Parquet:
		return "parquet"
	case Arrow:
		return "arrow"
	case CSV:
		return "csv"
	}
	return "Format(" + strconv.Itoa(int(f)) + ")"
}

// ParseFormat parses a format name ("parquet", "arrow" or "csv", any case).
func ParseFormat(s string) (Format, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "parquet":
		return Parquet, nil
	case "arrow":
		return Arrow, nil
	case "csv":
		return CSV, nil
	}
	return 0, fmt.Errorf("catalog: unknown format %q; allowed: parquet, arrow, csv", s)
}

// Standard file-metadata keys. The caller owns their values, except
// MetaSchemaVersion, which every Writer sets to SchemaVersion.
const (
	MetaConfig          = "corefall.config"           // effective configuration, YAML
	MetaSeed            = "corefall.seed"             // master random seed, decimal
	MetaVersion         = "corefall.version"          // program version
	MetaGoVersion       = "corefall.go_version"       // Go toolchain that built the program
	MetaSystems         = "corefall.systems"          // number of systems (rows), decimal
	MetaBinaries        = "corefall.binaries"         // number of binary systems, decimal
	MetaMassRepresented = "corefall.mass_represented" // stellar mass the catalogue represents, Msun
	MetaSchemaVersion   = "corefall.schema_version"   // layout version of the catalogue, SchemaVersion
)

// SchemaVersion is the catalogue layout version written under MetaSchemaVersion.
const SchemaVersion = "1"

// csvColumnsKey is the CSV comment key that holds the column descriptions.
const csvColumnsKey = "corefall.columns"

func checkMetaKey(key string) error {
	switch {
	case key == "":
		return fmt.Errorf("catalog: metadata key is empty; give a name such as %q", MetaSeed)
	case strings.ContainsAny(key, "=\n\r#"):
		return fmt.Errorf("catalog: metadata key %q must not contain '=', '#' or line breaks", key)
	case strings.HasPrefix(key, "ARROW:"), key == csvColumnsKey:
		return fmt.Errorf("catalog: metadata key %q is reserved for the file format", key)
	}
	return nil
}
