package catalog

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/ipc"
	"github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
)

// ReadBatchRows is the largest number of rows in a batch returned by a
// Reader of a Parquet or CSV file (fewer for a schema of more than about
// 100 columns; see batchRows); an Arrow IPC file is returned in the record
// batches it holds, which in files written here have at most ReadBatchRows
// rows.
const ReadBatchRows = 1 << 16

// readBatchBytes bounds the memory of a batch read from a Parquet or CSV
// file, whose number of columns the file sets: batchRows keeps wide schemas
// from multiplying ReadBatchRows into gigabytes.
const readBatchBytes = 64 << 20

// batchRows returns the rows in a batch of ncol columns: ReadBatchRows, or
// fewer if ncol columns of up to 9 bytes a row (a float64 or int64 value
// and a validity flag) would need more than readBatchBytes.
func batchRows(ncol int) int {
	return max(1, min(ReadBatchRows, readBatchBytes/(9*max(ncol, 1))))
}

// Reader streams the rows of a catalogue written by this package.
type Reader struct {
	path    string
	f       *os.File
	format  Format
	schema  *Schema
	meta    map[string]string
	numRows int64
	batch   *Batch
	next    func() error // fills r.batch; io.EOF at the end
	err     error        // set after a decoder panic: returned by every later Next
	release func()
	lut     [][]int16 // per column: dictionary index -> category index

	// With OpenColumns: the wanted columns. Parquet decodes only those
	// (want); Arrow and CSV decode all and Next hands out the subset
	// (proj, out, outSchema).
	want      []string
	proj      []int
	out       *Batch
	outSchema *Schema
}

// Open opens a catalogue for reading. The format is detected from the
// content: "PAR1" starts a Parquet file, "ARROW1" an Arrow IPC file,
// anything else is read as CSV. A file without the corefall.schema_version
// metadata is refused.
func Open(path string) (*Reader, error) { return open(path, nil) }

// OpenColumns is Open for a reader that returns only the named columns, in
// the file's order. Parquet files decode only those columns, which makes
// reading a few columns of a wide catalogue much faster. A name the file
// does not have is an error.
func OpenColumns(path string, names ...string) (*Reader, error) {
	if len(names) == 0 {
		return nil, fmt.Errorf("catalog: OpenColumns %s: no column names given", path)
	}
	return open(path, names)
}

// project returns the positions in s of the columns named in want (in s's
// order) and the schema of those columns.
func project(s *Schema, want []string, path string) ([]int, *Schema, error) {
	keep := map[string]bool{}
	for _, n := range want {
		if s.Index(n) < 0 {
			return nil, nil, fmt.Errorf("catalog: %s has no column %q", path, n)
		}
		keep[n] = true
	}
	var idx []int
	var cols []Column
	for i, c := range s.cols {
		if keep[c.Name] {
			idx = append(idx, i)
			cols = append(cols, c)
		}
	}
	sub, err := NewSchema(cols)
	return idx, sub, err
}

func open(path string, want []string) (*Reader, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("catalog: cannot open %s: %w", path, err)
	}
	st, err := f.Stat()
	if err != nil {
		f.Close()
		return nil, fmt.Errorf("catalog: cannot open %s: %w", path, err)
	}
	if st.IsDir() {
		f.Close()
		return nil, fmt.Errorf("catalog: %s is a directory, not a catalogue file", path)
	}
	if st.Size() == 0 {
		f.Close()
		return nil, fmt.Errorf("catalog: %s is empty (0 bytes), not a corefall catalogue; was its writer interrupted before Close?", path)
	}
	var magic [6]byte
	n, _ := f.ReadAt(magic[:], 0)
	r := &Reader{path: path, f: f, numRows: -1, want: want}
	switch {
	case n >= 4 && string(magic[:4]) == "PAR1":
		r.format = Parquet
	case n >= 6 && string(magic[:6]) == arrowMagic:
		r.format = Arrow
	default:
		r.format = CSV
	}
	err = guard(func() error {
		switch r.format {
		case Parquet:
			return r.openParquet(st.Size())
		case Arrow:
			return r.openArrow(st.Size())
		}
		return r.openCSV(st.Size())
	})
	if errors.Is(err, errPanic) {
		err = r.corrupt("cannot read the "+r.format.String()+" metadata", err)
	}
	if err == nil {
		err = r.checkOurs()
	}
	if err != nil {
		r.Close()
		return nil, err
	}
	r.batch = NewBatch(r.schema, 0)
	r.lut = make([][]int16, len(r.schema.cols))
	if r.want != nil && r.format != Parquet {
		if r.proj, r.outSchema, err = project(r.schema, r.want, path); err != nil {
			r.Close()
			return nil, err
		}
		r.out = &Batch{Schema: r.outSchema, Cols: make([]ColumnData, len(r.proj))}
	}
	return r, nil
}

func (r *Reader) checkOurs() error {
	v, ok := r.meta[MetaSchemaVersion]
	if !ok {
		return fmt.Errorf("catalog: %s is not a corefall catalogue (missing %s metadata)", r.path, MetaSchemaVersion)
	}
	if v != SchemaVersion {
		return fmt.Errorf("catalog: %s has catalogue schema version %q; this program reads version %q (use a matching corefall version)", r.path, v, SchemaVersion)
	}
	return nil
}

func (r *Reader) corrupt(what string, err error) error {
	return fmt.Errorf("catalog: %s: %s (the file is truncated or corrupt; was its writer interrupted?): %w", r.path, what, err)
}

// Path returns the path given to Open.
func (r *Reader) Path() string { return r.path }

// Format returns the detected file format.
func (r *Reader) Format() Format { return r.format }

// Schema returns the catalogue's schema, rebuilt from the file.
func (r *Reader) Schema() *Schema {
	if r.outSchema != nil {
		return r.outSchema
	}
	return r.schema
}

// Metadata returns a copy of the file-level metadata.
func (r *Reader) Metadata() map[string]string {
	out := make(map[string]string, len(r.meta))
	for k, v := range r.meta {
		out[k] = v
	}
	return out
}

// NumRows returns the number of rows when the file records it cheaply
// (Parquet), or -1 (Arrow IPC, CSV).
func (r *Reader) NumRows() int64 { return r.numRows }

// Next returns the next batch of rows, or io.EOF after the last one. The
// batch and its slices belong to the Reader and are overwritten by the next
// call; copy what you keep.
func (r *Reader) Next() (*Batch, error) {
	if r.next == nil {
		return nil, fmt.Errorf("catalog: %s: reader is closed", r.path)
	}
	if r.err != nil {
		return nil, r.err
	}
	if err := guard(r.next); err != nil {
		if errors.Is(err, errPanic) {
			// The decoder's state is unknown after a panic: stop here.
			r.err = r.corrupt("reading rows", err)
			return nil, r.err
		}
		return nil, err
	}
	if r.proj != nil {
		r.out.Len = r.batch.Len
		for k, j := range r.proj {
			r.out.Cols[k] = r.batch.Cols[j]
		}
		return r.out, nil
	}
	return r.batch, nil
}

// errPanic marks an error made from a panic by guard.
var errPanic = errors.New("decoder panic")

// guard runs fn and turns a panic in it into an error wrapping errPanic.
// arrow-go and the Parquet decoders panic on some inconsistent inputs that
// the structural checks do not rule out; a panic, unlike running out of
// memory, can be recovered, so the checks bound every allocation and this
// is the last guard.
func guard(fn func() error) (err error) {
	defer func() {
		if p := recover(); p != nil {
			err = fmt.Errorf("%w: %v", errPanic, p)
		}
	}()
	return fn()
}

// Close releases the file.
func (r *Reader) Close() error {
	if r.release != nil {
		// After a decoder panic the decoder's state is unknown: a panic
		// while releasing it is not passed on.
		_ = guard(func() error { r.release(); return nil })
		r.release = nil
	}
	r.next = nil
	if r.f == nil {
		return nil
	}
	err := r.f.Close()
	r.f = nil
	return err
}

func (r *Reader) openParquet(size int64) error {
	// Check the structure first: arrow-go allocates whatever lengths the
	// file declares (see parquetcheck.go).
	footerStart, err := checkParquetFooter(r.f, size)
	if err != nil {
		return r.corruptParquet(err)
	}
	alloc := newCappedAllocator(size)
	props := parquet.NewReaderProperties(alloc)
	pr, err := file.NewParquetReader(r.f, file.WithReadProps(props))
	if err != nil {
		return r.corrupt("cannot read the Parquet footer", err)
	}
	r.meta = map[string]string{}
	var arrowSchema *string
	for _, kv := range pr.MetaData().KeyValueMetadata() {
		if kv.Key == "ARROW:schema" {
			arrowSchema = kv.Value
		}
		if kv.Key == "ARROW:schema" || kv.Value == nil {
			continue
		}
		r.meta[kv.Key] = *kv.Value
	}
	if _, ok := r.meta[MetaSchemaVersion]; !ok {
		return nil // checkOurs reports it
	}
	if arrowSchema != nil {
		// pqarrow decodes the stored Arrow schema with arrow-go's IPC
		// reader, which trusts the lengths in it (see arrowcheck.go).
		if err := checkArrowSchemaValue(*arrowSchema); err != nil {
			return r.corruptParquet(err)
		}
	}
	if err := checkParquetChunks(r.f, pr.MetaData(), footerStart, size); err != nil {
		return r.corruptParquet(err)
	}
	rows := batchRows(pr.MetaData().Schema.NumColumns())
	if n := pr.NumRows(); n >= 0 && n < int64(rows) {
		rows = max(int(n), 1) // a small file needs no larger batch
	}
	fr, err := pqarrow.NewFileReader(pr, pqarrow.ArrowReadProperties{BatchSize: int64(rows)}, alloc)
	if err != nil {
		return r.corrupt("cannot read the Parquet schema", err)
	}
	as, err := fr.Schema()
	if err != nil {
		return r.corrupt("cannot read the Parquet schema", err)
	}
	if r.schema, err = schemaFromArrow(as); err != nil {
		return fmt.Errorf("catalog: %s: %w", r.path, err)
	}
	r.numRows = pr.NumRows()
	var leaves []int // nil: every column
	if r.want != nil {
		// The catalogue's schema is flat: field i is Parquet leaf column i.
		if leaves, r.schema, err = project(r.schema, r.want, r.path); err != nil {
			return err
		}
	}
	rr, err := fr.GetRecordReader(context.Background(), leaves, nil)
	if err != nil {
		return r.corrupt("cannot start reading rows", err)
	}
	r.release = rr.Release
	r.next = func() error {
		if !rr.Next() {
			if err := rr.Err(); err != nil && !errors.Is(err, io.EOF) {
				return r.corrupt("reading rows", err)
			}
			return io.EOF
		}
		return r.fromRecord(rr.RecordBatch())
	}
	return nil
}

func (r *Reader) openArrow(size int64) error {
	// Check the structure first: arrow-go allocates whatever lengths the
	// file declares (see arrowcheck.go).
	a, err := checkArrowFile(r.f, size)
	if err != nil {
		return r.corruptArrow(err)
	}
	var fr *ipc.FileReader
	err = guard(func() (err error) {
		fr, err = ipc.NewFileReader(r.f, ipc.WithAllocator(newCappedAllocator(size)))
		return err
	})
	if err != nil {
		return r.corrupt("cannot read the Arrow IPC footer", err)
	}
	if fr.NumRecords() != len(a.batches) {
		fr.Close()
		return r.corruptArrow(fmt.Errorf("arrow-go sees %d record batches, the footer holds %d", fr.NumRecords(), len(a.batches)))
	}
	as := fr.Schema()
	r.meta = map[string]string{}
	md := as.Metadata()
	for i, k := range md.Keys() {
		r.meta[k] = md.Values()[i]
	}
	if _, ok := r.meta[MetaSchemaVersion]; !ok {
		fr.Close()
		return nil
	}
	if r.schema, err = schemaFromArrow(as); err != nil {
		fr.Close()
		return fmt.Errorf("catalog: %s: %w", r.path, err)
	}
	cols, err := arrowColumns(as)
	if err != nil {
		fr.Close()
		return fmt.Errorf("catalog: %s: %w", r.path, err)
	}
	r.release = func() { fr.Close() }
	check := newArrowChecker(size)
	next := 0
	r.next = func() error {
		if next == len(a.batches) {
			return io.EOF
		}
		// The batch's metadata are checked against the schema before
		// arrow-go reads them.
		if _, err := check.message(r.f, a.batches[next], 3, "record batch", next, cols); err != nil {
			return r.corruptArrow(err)
		}
		rec, err := fr.Read()
		next++
		if err != nil {
			return r.corrupt(fmt.Sprintf("reading record batch %d", next-1), err)
		}
		return r.fromRecord(rec)
	}
	return nil
}

func (r *Reader) corruptParquet(err error) error {
	return fmt.Errorf("catalog: %s: corrupt Parquet file: %w (the file is truncated or corrupt; was its writer interrupted?)", r.path, err)
}

func (r *Reader) corruptArrow(err error) error {
	return fmt.Errorf("catalog: %s: corrupt Arrow IPC file: %w (the file is truncated or corrupt; was its writer interrupted?)", r.path, err)
}

// fromRecord copies an Arrow record into r.batch.
func (r *Reader) fromRecord(rec arrow.RecordBatch) error {
	if int(rec.NumCols()) != len(r.schema.cols) {
		return r.corrupt("record batch column count", fmt.Errorf("%d columns, schema has %d", rec.NumCols(), len(r.schema.cols)))
	}
	n := int(rec.NumRows())
	b := r.batch
	b.Reset(n)
	for i, c := range r.schema.cols {
		col := rec.Column(i)
		d := &b.Cols[i]
		if c.Nullable {
			for k := range d.Valid {
				d.Valid[k] = col.IsValid(k)
			}
		} else if col.NullN() > 0 {
			return r.corrupt("reading column "+c.Name, fmt.Errorf("%d missing values in a column that is not nullable", col.NullN()))
		}
		switch c.Kind {
		case Float32:
			a, ok := col.(*array.Float32)
			if !ok {
				return r.typeErr(c, col)
			}
			copy(d.F32, a.Float32Values())
		case Float64:
			a, ok := col.(*array.Float64)
			if !ok {
				return r.typeErr(c, col)
			}
			copy(d.F64, a.Float64Values())
		case Int64:
			a, ok := col.(*array.Int64)
			if !ok {
				return r.typeErr(c, col)
			}
			copy(d.I64, a.Int64Values())
		case Category:
			if err := r.categories(i, c, col, d.Cat); err != nil {
				return err
			}
		}
	}
	return nil
}

func (r *Reader) typeErr(c Column, col arrow.Array) error {
	return fmt.Errorf("catalog: %s: column %q holds %s values, schema says %s", r.path, c.Name, col.DataType(), c.Kind)
}

// categories translates a dictionary (or plain string) column into
// indices of the column's categories.
func (r *Reader) categories(i int, c Column, col arrow.Array, out []uint8) error {
	index := func(word string) (int16, error) {
		for k, w := range c.Categories {
			if w == word {
				return int16(k), nil
			}
		}
		return -1, fmt.Errorf("catalog: %s: column %q holds %q, which is not one of its categories %v", r.path, c.Name, word, c.Categories)
	}
	switch a := col.(type) {
	case *array.Dictionary:
		dict, ok := a.Dictionary().(*array.String)
		if !ok {
			return r.typeErr(c, col)
		}
		lut := r.lut[i][:0]
		for k := 0; k < dict.Len(); k++ {
			v := int16(-1)
			if dict.IsValid(k) {
				var err error
				if v, err = index(dict.Value(k)); err != nil {
					return err
				}
			}
			lut = append(lut, v)
		}
		r.lut[i] = lut
		for k := range out {
			if !a.IsValid(k) {
				out[k] = 0
				continue
			}
			j := a.GetValueIndex(k)
			if j < 0 || j >= len(lut) || lut[j] < 0 {
				return r.corrupt("reading column "+c.Name, fmt.Errorf("dictionary index %d out of range", j))
			}
			out[k] = uint8(lut[j])
		}
	case *array.String:
		for k := range out {
			out[k] = 0
			if a.IsValid(k) {
				v, err := index(a.Value(k))
				if err != nil {
					return err
				}
				out[k] = uint8(v)
			}
		}
	default:
		return r.typeErr(c, col)
	}
	return nil
}

// csvState is the position of a CSV reader.
type csvState struct {
	br   *bufio.Reader
	line int
}

func (r *Reader) openCSV(size int64) error {
	r.meta = map[string]string{}
	var colsJSON string
	haveCols := false
	st := &csvState{br: bufio.NewReaderSize(r.f, 1<<20)}
	// Leading comment lines, then the header.
	var header []byte
	for {
		line, err := st.readLine()
		if err != nil {
			if err == io.EOF {
				return fmt.Errorf("catalog: %s is not a corefall catalogue (missing %s metadata)", r.path, MetaSchemaVersion)
			}
			return fmt.Errorf("catalog: reading %s: %w", r.path, err)
		}
		if len(line) > 0 && line[0] == '#' {
			k, v, ok := parseComment(line)
			if !ok {
				continue // a free-form comment
			}
			if k == csvColumnsKey {
				colsJSON, haveCols = v, true
			} else {
				r.meta[k] = v
			}
			continue
		}
		header = line
		break
	}
	if _, ok := r.meta[MetaSchemaVersion]; !ok {
		return nil
	}
	if !haveCols {
		return fmt.Errorf("catalog: %s: CSV catalogue without the %s comment line describing its columns", r.path, csvColumnsKey)
	}
	s, err := schemaFromJSON([]byte(colsJSON))
	if err != nil {
		return fmt.Errorf("catalog: %s: %s line: %w", r.path, csvColumnsKey, err)
	}
	r.schema = s
	names := bytes.Split(bytes.TrimSuffix(header, []byte{'\r'}), []byte{','})
	if len(names) != len(s.cols) {
		return fmt.Errorf("catalog: %s line %d: header has %d columns, the %s line describes %d", r.path, st.line, len(names), csvColumnsKey, len(s.cols))
	}
	for i, nm := range names {
		if string(nm) != s.cols[i].Name {
			return fmt.Errorf("catalog: %s line %d: header column %d is %q, expected %q", r.path, st.line, i+1, nm, s.cols[i].Name)
		}
	}
	if err := r.csvTrailer(size); err != nil {
		return err
	}
	fields := make([][]byte, len(s.cols))
	// A row takes at least one byte per column (its commas and newline).
	rows := int(min(int64(batchRows(len(s.cols))), size/int64(len(s.cols))+1))
	var total int64
	r.next = func() error {
		b := r.batch
		b.Reset(rows)
		n := 0
		for n < rows {
			line, err := st.readLine()
			if err == io.EOF {
				break
			}
			if err != nil {
				return fmt.Errorf("catalog: reading %s line %d: %w", r.path, st.line, err)
			}
			if len(line) == 0 || line[0] == '#' {
				continue
			}
			if err := r.parseRow(line, fields, n); err != nil {
				return fmt.Errorf("catalog: %s line %d: %w", r.path, st.line, err)
			}
			n++
		}
		if n == 0 {
			// A CSV file cut at a line end still parses: compare with the
			// recorded number of systems when there is one.
			if v, ok := r.meta[MetaSystems]; ok {
				if want, err := strconv.ParseInt(v, 10, 64); err == nil && want != total {
					return fmt.Errorf("catalog: %s has %d rows but its %s metadata says %d: the file is truncated or was edited", r.path, total, MetaSystems, want)
				}
			}
			return io.EOF
		}
		total += int64(n)
		b.Reset(n)
		return nil
	}
	return nil
}

// csvMaxLine bounds the length of a CSV line. Rows take a few hundred
// bytes and the longest comment line, the effective configuration, a few
// kilobytes; a longer line means a damaged file or not a catalogue at all.
const csvMaxLine = 16 << 20

// readLine returns the next line without its newline. A last line without a
// newline means the file was cut short.
func (st *csvState) readLine() ([]byte, error) {
	line, err := st.br.ReadSlice('\n')
	if err == bufio.ErrBufferFull {
		long := append([]byte(nil), line...)
		for err == bufio.ErrBufferFull && len(long) <= csvMaxLine {
			line, err = st.br.ReadSlice('\n')
			long = append(long, line...)
		}
		if len(bytes.TrimSuffix(long, []byte{'\n'})) > csvMaxLine {
			return nil, fmt.Errorf("line %d is longer than %d bytes, far longer than any catalogue line (is the file damaged?)", st.line+1, csvMaxLine)
		}
		line = long
	}
	if err == io.EOF && len(line) > 0 {
		st.line++
		return nil, fmt.Errorf("line %d has no line end: the file is truncated (was its writer interrupted?)", st.line)
	}
	if err != nil {
		return nil, err
	}
	st.line++
	line = line[:len(line)-1]
	return bytes.TrimSuffix(line, []byte{'\r'}), nil
}

// parseComment parses "# key=<JSON string>".
func parseComment(line []byte) (key, value string, ok bool) {
	rest := bytes.TrimSpace(line[1:])
	eq := bytes.IndexByte(rest, '=')
	if eq <= 0 {
		return "", "", false
	}
	if err := json.Unmarshal(rest[eq+1:], &value); err != nil {
		return "", "", false
	}
	return string(bytes.TrimSpace(rest[:eq])), value, true
}

// csvTrailer reads the metadata comment lines after the last row.
func (r *Reader) csvTrailer(size int64) error {
	for window := int64(1 << 16); ; window *= 4 {
		if window > 4*csvMaxLine {
			return fmt.Errorf("catalog: %s: the comment lines after the last row, or the last line, take more than %d bytes (is the file damaged?)", r.path, window/4)
		}
		start := max(size-window, 0)
		buf := make([]byte, size-start)
		if _, err := r.f.ReadAt(buf, start); err != nil && err != io.EOF {
			return fmt.Errorf("catalog: reading %s: %w", r.path, err)
		}
		lines := bytes.Split(bytes.TrimSuffix(buf, []byte{'\n'}), []byte{'\n'})
		first := 0
		if start > 0 {
			first = 1 // probably a partial line
		}
		k := len(lines)
		for k > first && len(lines[k-1]) > 0 && lines[k-1][0] == '#' {
			k--
		}
		if k == first && start > 0 {
			continue // all comments so far: look further back
		}
		for _, line := range lines[k:] {
			if key, v, ok := parseComment(line); ok && key != csvColumnsKey {
				r.meta[key] = v
			}
		}
		return nil
	}
}

func (r *Reader) parseRow(line []byte, fields [][]byte, row int) error {
	n := 0
	for {
		if n == len(fields) {
			return fmt.Errorf("more than %d fields", len(fields))
		}
		c := bytes.IndexByte(line, ',')
		if c < 0 {
			fields[n] = line
			n++
			break
		}
		fields[n] = line[:c]
		line = line[c+1:]
		n++
	}
	if n != len(fields) {
		return fmt.Errorf("%d fields, expected %d", n, len(fields))
	}
	for i, c := range r.schema.cols {
		d := &r.batch.Cols[i]
		f := fields[i]
		if len(f) == 0 {
			if !c.Nullable {
				return fmt.Errorf("column %q is empty but not nullable", c.Name)
			}
			d.Valid[row] = false
			switch c.Kind {
			case Float32:
				d.F32[row] = 0
			case Float64:
				d.F64[row] = 0
			case Category:
				d.Cat[row] = 0
			}
			continue
		}
		if c.Nullable {
			d.Valid[row] = true
		}
		switch c.Kind {
		case Float32:
			v, err := strconv.ParseFloat(string(f), 32)
			if err != nil {
				return fmt.Errorf("column %q: %q is not a number", c.Name, f)
			}
			d.F32[row] = float32(v)
		case Float64:
			v, err := strconv.ParseFloat(string(f), 64)
			if err != nil {
				return fmt.Errorf("column %q: %q is not a number", c.Name, f)
			}
			d.F64[row] = v
		case Int64:
			v, err := strconv.ParseInt(string(f), 10, 64)
			if err != nil {
				return fmt.Errorf("column %q: %q is not an integer", c.Name, f)
			}
			d.I64[row] = v
		case Category:
			found := false
			for k, w := range c.Categories {
				if w == string(f) {
					d.Cat[row] = uint8(k)
					found = true
					break
				}
			}
			if !found {
				return fmt.Errorf("column %q: %q is not one of %v", c.Name, f, c.Categories)
			}
		}
	}
	return nil
}
