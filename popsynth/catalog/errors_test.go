package catalog

import (
	"bytes"
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/ipc"
	"github.com/apache/arrow-go/v18/arrow/memory"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
)

func wantErr(t *testing.T, err error, parts ...string) {
	t.Helper()
	if err == nil {
		t.Fatalf("no error; want one containing %q", parts)
	}
	for _, p := range parts {
		if !strings.Contains(err.Error(), p) {
			t.Errorf("error %q does not contain %q", err, p)
		}
	}
}

func TestNewSchemaErrors(t *testing.T) {
	ok := Column{Name: "m", Unit: "Msun", Kind: Float32}
	cases := []struct {
		name string
		cols []Column
		want []string
	}{
		{"no columns", nil, []string{"no columns"}},
		{"empty name", []Column{{Unit: "1", Kind: Float32}}, []string{"name", "not allowed"}},
		{"bad name", []Column{{Name: "a,b", Unit: "1", Kind: Float32}}, []string{`"a,b"`, "letters"}},
		{"digit first", []Column{{Name: "1a", Unit: "1", Kind: Float32}}, []string{`"1a"`}},
		{"duplicate", []Column{ok, ok}, []string{`"m"`, "already used"}},
		{"no unit", []Column{{Name: "m", Kind: Float32}}, []string{"unit", `"1"`}},
		{"bad kind", []Column{{Name: "m", Unit: "1", Kind: 9}}, []string{"kind 9", "Float32"}},
		{"nullable int", []Column{{Name: "i", Unit: "1", Kind: Int64, Nullable: true}}, []string{"Nullable", "int64"}},
		{"no categories", []Column{{Name: "c", Unit: "1", Kind: Category}}, []string{"0 categories", "1 to 127"}},
		{"duplicate category", []Column{{Name: "c", Unit: "1", Kind: Category, Categories: []string{"a", "a"}}}, []string{`"a"`, "twice"}},
		{"comma category", []Column{{Name: "c", Unit: "1", Kind: Category, Categories: []string{"a,b"}}}, []string{`"a,b"`}},
		{"categories on float", []Column{{Name: "m", Unit: "1", Kind: Float32, Categories: []string{"a"}}}, []string{"only for Category"}},
		{"multi-line doc", []Column{{Name: "m", Unit: "1", Kind: Float32, Doc: "a\nb"}}, []string{"single line"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := NewSchema(tc.cols)
			wantErr(t, err, tc.want...)
		})
	}
	many := make([]string, MaxCategories+1)
	for i := range many {
		many[i] = "w" + strings.Repeat("x", i)
	}
	_, err := NewSchema([]Column{{Name: "c", Unit: "1", Kind: Category, Categories: many}})
	wantErr(t, err, "128 categories", "1 to 127")
}

func TestStandardColumns(t *testing.T) {
	// The order and units are the catalogue specification (doc.go table).
	single := []struct{ name, unit string }{
		{"system_id", "1"}, {"metallicity", "1"}, {"initial_mass", "Msun"}, {"lifetime_myr", "Myr"},
		{"final_mass", "Msun"}, {"he_core_mass", "Msun"}, {"co_core_mass", "Msun"}, {"fate", "1"},
		{"remnant_type", "1"}, {"remnant_mass", "Msun"}, {"fallback_fraction", "1"}, {"kick_speed", "km/s"},
	}
	cols := Columns(false)
	if len(cols) != len(single) {
		t.Fatalf("Columns(false) has %d columns, want %d", len(cols), len(single))
	}
	for i, w := range single {
		if cols[i].Name != w.name || cols[i].Unit != w.unit || cols[i].Nullable {
			t.Errorf("column %d = %s [%s] nullable=%v, want %s [%s] not nullable", i, cols[i].Name, cols[i].Unit, cols[i].Nullable, w.name, w.unit)
		}
	}
	s := mustSchema(t, Columns(true))
	if got := s.NumColumns(); got != 12+1+10+11 {
		t.Errorf("Columns(true) has %d columns, want 34", got)
	}
	rt := s.Column(s.Index(ColRemnantType))
	if got := strings.Join(rt.Categories, ","); got != "BH,NS,WD,none,star" {
		t.Errorf("remnant_type categories %s", got)
	}
	for _, name := range []string{"companion_initial_mass", "companion_remnant_type", "companion_kick_speed", ColDelayTime, ColCompanionRunawaySpeed} {
		i := s.Index(name)
		if i < 0 {
			t.Errorf("column %s missing", name)
			continue
		}
		if !s.Column(i).Nullable {
			t.Errorf("column %s is not nullable", name)
		}
	}
	if s.Index(ColOutcome) != 12 || s.Index("companion_initial_mass") != 13 || s.Index(ColInitialSeparation) != 23 || s.Index(ColDelayTime) != 33 {
		t.Errorf("binary columns out of order")
	}
	if s.Index("nope") != -1 {
		t.Errorf("Index of a missing column is not -1")
	}
	for _, c := range s.Columns() {
		if c.Kind == Float32 && !strings.Contains(c.Doc, "7 significant digits") {
			t.Errorf("column %s doc does not state float32 precision: %q", c.Name, c.Doc)
		}
	}
}

func TestParseFormat(t *testing.T) {
	for _, f := range []Format{Parquet, Arrow, CSV} {
		got, err := ParseFormat(strings.ToUpper(f.String()))
		if err != nil || got != f {
			t.Errorf("ParseFormat(%q) = %v, %v", f, got, err)
		}
	}
	_, err := ParseFormat("feather")
	wantErr(t, err, `"feather"`, "parquet, arrow, csv")
}

func TestCreateErrors(t *testing.T) {
	s := mustSchema(t, Columns(false))
	dir := t.TempDir()
	_, err := Create(filepath.Join(dir, "missing", "x.parquet"), s, Options{})
	wantErr(t, err, filepath.Join(dir, "missing"), "does not exist", "create it first")
	_, err = Create(dir, s, Options{})
	wantErr(t, err, dir, "directory")
	_, err = Create(filepath.Join(dir, "x"), s, Options{RowGroupRows: -1})
	wantErr(t, err, "RowGroupRows is -1", ">= 0")
	_, err = Create(filepath.Join(dir, "x"), s, Options{Format: 7})
	wantErr(t, err, "format 7", "Parquet, Arrow, CSV")
	_, err = Create(filepath.Join(dir, "x"), s, Options{Metadata: map[string]string{"a=b": "1"}})
	wantErr(t, err, `"a=b"`, "'='")
	_, err = Create(filepath.Join(dir, "x"), s, Options{Metadata: map[string]string{"ARROW:schema": "1"}})
	wantErr(t, err, "reserved")
	_, err = Create(filepath.Join(dir, "x"), s, Options{Metadata: map[string]string{MetaSchemaVersion: "2"}})
	wantErr(t, err, MetaSchemaVersion, `"2"`)
	assertNoFiles(t, dir)
}

func TestWriteRejectsBadBatch(t *testing.T) {
	s := mustSchema(t, Columns(true))
	dir := t.TempDir()
	path := filepath.Join(dir, "x.parquet")
	w, err := Create(path, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer w.Abort()
	b := NewBatch(s, 4)
	b.Reset(4)
	b.Cols[3].F32 = b.Cols[3].F32[:3]
	wantErr(t, w.Write(b), `"lifetime_myr"`, "3 values", "Len is 4")
	b.Reset(4)
	b.Cols[s.Index(ColRemnantType)].Cat[2] = 5
	wantErr(t, w.Write(b), `"remnant_type"`, "row 2", "index 5", "0 to 4")
	b.Reset(4)
	b.Cols[0].Valid = []bool{true, true, true, true}
	wantErr(t, w.Write(b), `"system_id"`, "not nullable")
	other := mustSchema(t, Columns(false))
	wantErr(t, w.Write(NewBatch(other, 1)), "schema differs")
	// A rejected batch does not kill the writer.
	b = NewBatch(s, 4)
	b.Reset(4)
	if err := w.Write(b); err != nil {
		t.Fatalf("valid batch after rejected ones: %v", err)
	}
	wantErr(t, w.SetMetadata("", "x"), "empty")
}

// writeForeignParquet writes a valid Parquet file that is not a catalogue.
func writeForeignParquet(t *testing.T, path string) {
	sc := arrow.NewSchema([]arrow.Field{{Name: "x", Type: arrow.PrimitiveTypes.Float64}}, nil)
	b := array.NewFloat64Builder(memory.DefaultAllocator)
	b.AppendValues([]float64{1, 2, 3}, nil)
	col := b.NewArray()
	rec := array.NewRecordBatch(sc, []arrow.Array{col}, 3)
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	fw, err := pqarrow.NewFileWriter(sc, f, nil, pqarrow.DefaultWriterProps())
	if err != nil {
		t.Fatal(err)
	}
	if err := fw.Write(rec); err != nil {
		t.Fatal(err)
	}
	if err := fw.Close(); err != nil {
		t.Fatal(err)
	}
}

func writeForeignArrow(t *testing.T, path string) {
	sc := arrow.NewSchema([]arrow.Field{{Name: "x", Type: arrow.PrimitiveTypes.Float64}}, nil)
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	fw, err := ipc.NewFileWriter(f, ipc.WithSchema(sc))
	if err != nil {
		t.Fatal(err)
	}
	if err := fw.Close(); err != nil {
		t.Fatal(err)
	}
}

func TestOpenForeignAndBroken(t *testing.T) {
	dir := t.TempDir()
	notOurs := "is not a corefall catalogue (missing corefall.schema_version metadata)"
	cases := []struct {
		name  string
		make  func(path string)
		parts []string
	}{
		{"foreign parquet", func(p string) { writeForeignParquet(t, p) }, []string{notOurs}},
		{"foreign arrow", func(p string) { writeForeignArrow(t, p) }, []string{notOurs}},
		{"foreign csv", func(p string) { os.WriteFile(p, []byte("a,b\n1,2\n"), 0o644) }, []string{notOurs}},
		{"empty", func(p string) { os.WriteFile(p, nil, 0o644) }, []string{"empty (0 bytes)"}},
		{"parquet magic only", func(p string) { os.WriteFile(p, []byte("PAR1garbage"), 0o644) }, []string{"truncated or corrupt"}},
		{"arrow magic only", func(p string) { os.WriteFile(p, []byte("ARROW1\x00\x00garbage"), 0o644) }, []string{"truncated or corrupt"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(dir, strings.ReplaceAll(tc.name, " ", "_"))
			tc.make(path)
			_, err := Open(path)
			wantErr(t, err, append([]string{path}, tc.parts...)...)
		})
	}
	_, err := Open(filepath.Join(dir, "absent.parquet"))
	wantErr(t, err, "absent.parquet")
	if !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file error does not wrap os.ErrNotExist: %v", err)
	}
}

// TestTruncated cuts complete catalogues short, as a killed writer or an
// interrupted copy would.
func TestTruncated(t *testing.T) {
	s := mustSchema(t, Columns(true))
	dir := t.TempDir()
	for _, format := range []Format{Parquet, Arrow, CSV} {
		path := filepath.Join(dir, "full."+format.String())
		writeCatalog(t, path, s, Options{Format: format, RowGroupRows: 1000}, []int{2500}, 1, nil)
		full, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		for _, keep := range []int{len(full) / 2, len(full) - 1} {
			cut := filepath.Join(dir, "cut."+format.String())
			data := full[:keep]
			if format == CSV && keep == len(full)/2 {
				// cut in the middle of a row, not after a line end
				if i := bytes.LastIndexByte(data, '\n'); i == len(data)-1 {
					data = data[:len(data)-2]
				}
			}
			if err := os.WriteFile(cut, data, 0o644); err != nil {
				t.Fatal(err)
			}
			err := readThrough(cut)
			if err == nil {
				t.Errorf("%s cut to %d of %d bytes: read without error", format, len(data), len(full))
				continue
			}
			wantErr(t, err, cut, "truncated")
		}
	}
}

// readThrough opens a file and reads every batch.
func readThrough(path string) error {
	r, err := Open(path)
	if err != nil {
		return err
	}
	defer r.Close()
	for {
		_, err := r.Next()
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return err
		}
	}
}

// failAfter fails every write once limit bytes have been accepted, like a
// disk that fills up.
type failAfter struct {
	w     io.Writer
	limit int
	err   error
}

func (f *failAfter) Write(p []byte) (int, error) {
	if len(p) > f.limit {
		n, _ := f.w.Write(p[:f.limit])
		f.limit = 0
		return n, f.err
	}
	f.limit -= len(p)
	return f.w.Write(p)
}

// TestDiskFull checks that a write error surfaces from Write or Close, names
// the file, and leaves nothing behind.
func TestDiskFull(t *testing.T) {
	s := mustSchema(t, Columns(true))
	for _, format := range []Format{Parquet, Arrow, CSV} {
		for _, when := range []string{"write", "close"} {
			t.Run(format.String()+"/"+when, func(t *testing.T) {
				dir := t.TempDir()
				path := filepath.Join(dir, "cat")
				w, err := Create(path, s, Options{Format: format, RowGroupRows: 4096})
				if err != nil {
					t.Fatal(err)
				}
				w.sink.w = &failAfter{w: w.sink.w, limit: 10, err: syscall.ENOSPC}
				if a, ok := w.enc.(*arrowEncoder); ok {
					a.sink.w = &failAfter{w: a.sink.w, limit: 10, err: syscall.ENOSPC}
				}
				b := NewBatch(s, 0)
				fillBatch(b, 0, 100, rngFor(1))
				if when == "write" {
					// Enough rows to overflow the 1 MiB buffer.
					fillBatch(b, 0, 20000, rngFor(2))
				}
				err = w.Write(b)
				if when == "write" {
					wantErr(t, err, path, "disk is full")
				} else if err != nil {
					t.Fatalf("small write failed early: %v", err)
				}
				err2 := w.Close()
				wantErr(t, err2, path, "disk is full")
				if when == "write" && err2.Error() != err.Error() {
					t.Errorf("Close after failed Write returned %q, want the Write error %q", err2, err)
				}
				w.Abort()
				w.Abort()
				assertNoFiles(t, dir)
				wantErr(t, w.Write(b), path)
			})
		}
	}
}

func TestCSVRowCountCheck(t *testing.T) {
	s := mustSchema(t, Columns(false))
	dir := t.TempDir()
	path := filepath.Join(dir, "c.csv")
	writeCatalog(t, path, s, Options{Format: CSV, Metadata: map[string]string{MetaSystems: "30"}}, []int{30}, 1, nil)
	full, _ := os.ReadFile(path)
	// Remove the last 2 complete rows: every line still ends properly.
	lines := bytes.SplitAfter(full, []byte{'\n'})
	cut := filepath.Join(dir, "cut.csv")
	os.WriteFile(cut, bytes.Join(lines[:len(lines)-3], nil), 0o644)
	wantErr(t, readThrough(cut), cut, "28 rows", "30", "truncated")
	if err := readThrough(path); err != nil {
		t.Fatal(err)
	}
}
