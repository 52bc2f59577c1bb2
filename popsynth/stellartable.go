package popsynth

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"

	"github.com/corefall/corefall/remnant"
)

// StellarTableColumns are the columns of a stellar-model grid for core.model = table, masses in
// Msun, lifetime in Myr; max_radius (Rsun) is optional.
var StellarTableColumns = []string{"initial_mass", "metallicity", "final_mass", "he_core_mass", "co_core_mass", "lifetime_myr"}

const optionalRadiusColumn = "max_radius"

// ReadStellarTable reads a stellar-model grid from a CSV file (a header line naming the columns, then
// one model per line; lines starting with # are comments) or a Parquet file (recognised by content).
// Extra columns are ignored. Errors name the file, the line or row, and the column.
func ReadStellarTable(path string) ([]remnant.TableRow, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("core.table: cannot read the stellar-model grid: %w", err)
	}
	rows, err := ParseStellarTable(data)
	if err != nil {
		return nil, fmt.Errorf("core.table %s: %w", path, err)
	}
	return rows, nil
}

// ParseStellarTable parses the contents of a stellar-model grid file, CSV or Parquet.
func ParseStellarTable(data []byte) ([]remnant.TableRow, error) {
	var (
		rows []remnant.TableRow
		err  error
	)
	if bytes.HasPrefix(data, []byte("PAR1")) {
		rows, err = readStellarParquet(data)
	} else {
		rows, err = readStellarCSV(data)
	}
	if err != nil {
		return nil, err
	}
	if len(rows) == 0 {
		return nil, errors.New("the grid has no rows")
	}
	return rows, nil
}

func setRowField(r *remnant.TableRow, col string, x float64) {
	switch col {
	case "initial_mass":
		r.InitialMass = x
	case "metallicity":
		r.Metallicity = x
	case "final_mass":
		r.FinalMass = x
	case "he_core_mass":
		r.HeCoreMass = x
	case "co_core_mass":
		r.COCoreMass = x
	case "lifetime_myr":
		r.LifetimeMyr = x
	case optionalRadiusColumn:
		r.MaxRadius = x
	}
}

// columnPositions maps each wanted column to its position in header, or reports the missing one.
func columnPositions(header []string) (map[string]int, error) {
	pos := make(map[string]int)
	for i, h := range header {
		pos[strings.TrimSpace(h)] = i
	}
	want := make(map[string]int)
	var missing []string
	for _, c := range StellarTableColumns {
		i, ok := pos[c]
		if !ok {
			missing = append(missing, c)
			continue
		}
		want[c] = i
	}
	if len(missing) > 0 {
		return nil, fmt.Errorf("missing column(s) %s; a grid needs %s (and optionally %s)",
			strings.Join(missing, ", "), strings.Join(StellarTableColumns, ", "), optionalRadiusColumn)
	}
	if i, ok := pos[optionalRadiusColumn]; ok {
		want[optionalRadiusColumn] = i
	}
	return want, nil
}

func readStellarCSV(data []byte) ([]remnant.TableRow, error) {
	r := csv.NewReader(bytes.NewReader(data))
	r.Comment = '#'
	r.FieldsPerRecord = -1
	header, err := r.Read()
	if err != nil {
		if errors.Is(err, io.EOF) {
			return nil, errors.New("the file is empty; it needs a header line naming the columns")
		}
		return nil, fmt.Errorf("not a readable CSV file: %w", err)
	}
	pos, err := columnPositions(header)
	if err != nil {
		return nil, err
	}
	var rows []remnant.TableRow
	for {
		rec, err := r.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("not a readable CSV file: %w", err)
		}
		line, _ := r.FieldPos(0)
		var row remnant.TableRow
		for col, i := range pos {
			if i >= len(rec) {
				return nil, fmt.Errorf("line %d has %d fields, but column %s is field %d", line, len(rec), col, i+1)
			}
			x, err := strconv.ParseFloat(strings.TrimSpace(rec[i]), 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, fmt.Errorf("line %d, column %s: %q is not a finite number", line, col, rec[i])
			}
			setRowField(&row, col, x)
		}
		rows = append(rows, row)
	}
	return rows, nil
}

func readStellarParquet(data []byte) ([]remnant.TableRow, error) {
	rdr, err := file.NewParquetReader(bytes.NewReader(data))
	if err != nil {
		return nil, fmt.Errorf("not a readable Parquet file: %w", err)
	}
	defer rdr.Close()
	fr, err := pqarrow.NewFileReader(rdr, pqarrow.ArrowReadProperties{}, memory.DefaultAllocator)
	if err != nil {
		return nil, fmt.Errorf("not a readable Parquet file: %w", err)
	}
	tbl, err := fr.ReadTable(context.Background())
	if err != nil {
		return nil, fmt.Errorf("not a readable Parquet file: %w", err)
	}
	defer tbl.Release()
	header := make([]string, tbl.NumCols())
	for i := range header {
		header[i] = tbl.Schema().Field(i).Name
	}
	pos, err := columnPositions(header)
	if err != nil {
		return nil, err
	}
	rows := make([]remnant.TableRow, tbl.NumRows())
	for col, i := range pos {
		var at int
		for _, chunk := range tbl.Column(i).Data().Chunks() {
			for j := 0; j < chunk.Len(); j++ {
				x, ok := floatAt(chunk, j)
				if !ok || math.IsNaN(x) || math.IsInf(x, 0) {
					return nil, fmt.Errorf("row %d, column %s: missing or not a finite number (type %s)", at+1, col, chunk.DataType())
				}
				setRowField(&rows[at], col, x)
				at++
			}
		}
	}
	return rows, nil
}

// floatAt returns element j of a numeric Arrow array as float64.
func floatAt(a arrow.Array, j int) (float64, bool) {
	if a.IsNull(j) {
		return 0, false
	}
	switch a := a.(type) {
	case *array.Float64:
		return a.Value(j), true
	case *array.Float32:
		return float64(a.Value(j)), true
	case *array.Int64:
		return float64(a.Value(j)), true
	case *array.Int32:
		return float64(a.Value(j)), true
	}
	return 0, false
}
