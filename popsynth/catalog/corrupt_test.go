package catalog

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/ipc"
	"github.com/apache/arrow-go/v18/arrow/memory"
	"github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
)

// corruptions returns n damaged copies of data, made with a fixed seed:
// flipped bytes, truncations, inserted and deleted runs, and 1 to 8 bytes
// overwritten with values that often decode as lengths or offsets (0, -1,
// 2^31-1, 2^40, ...).
func corruptions(data []byte, n int, seed uint64) [][]byte {
	src := rand.New(rand.NewPCG(seed, 11))
	words := []uint64{0, 1, 0x7fffffff, 0x80000000, 0xffffffff, 1 << 40, 1<<63 - 1, ^uint64(0), 1 << 16, 1 << 20}
	out := make([][]byte, n)
	for k := range out {
		d := append([]byte(nil), data...)
		switch k % 6 {
		case 0, 1:
			for range 1 + src.IntN(4) {
				d[src.IntN(len(d))] ^= byte(1 + src.IntN(255))
			}
		case 2:
			d = d[:src.IntN(len(d))]
		case 3:
			p := src.IntN(len(d))
			ins := make([]byte, 1+src.IntN(16))
			for i := range ins {
				ins[i] = byte(src.IntN(256))
			}
			d = append(d[:p:p], append(ins, d[p:]...)...)
		case 4:
			p := src.IntN(len(d))
			d = append(d[:p:p], d[min(len(d), p+1+src.IntN(16)):]...)
		case 5:
			v, p, w := words[src.IntN(len(words))], src.IntN(len(d)), []int{1, 2, 4, 8}[src.IntN(4)]
			for i := 0; i < w && p+i < len(d); i++ {
				d[p+i] = byte(v >> (8 * i))
			}
		}
		out[k] = d
	}
	return out
}

// readCorrupt opens path and reads at most 4096 batches or 2^20 rows, as
// FuzzOpen does.
// It returns the first error, or an error if a batch is inconsistent or a
// panic escaped.
func readCorrupt(path string) (opened, clean bool, bad error) {
	defer func() {
		if p := recover(); p != nil {
			bad = fmt.Errorf("panic: %v", p)
		}
	}()
	r, err := Open(path)
	if err != nil {
		return false, false, nil
	}
	defer r.Close()
	rows := 0
	for range 1 << 12 {
		b, err := r.Next()
		if errors.Is(err, io.EOF) {
			return true, true, nil
		}
		if err != nil {
			return true, false, nil
		}
		if err := b.Validate(); err != nil {
			return true, false, fmt.Errorf("inconsistent batch: %v", err)
		}
		if rows += b.Len; rows > 1<<20 {
			return true, false, nil
		}
	}
	return true, false, nil
}

// TestCorruptFilesNeverCrash damages the small catalogues in
// testdata/fuzz-seeds in many ways: every damaged file must give an error or
// consistent batches, in bounded time, without a panic or an out-of-memory
// crash (which would end the test binary). The seeds are one catalogue of 40
// systems with the binary columns in each format, and the same in Arrow IPC
// with zstd-compressed buffers.
func TestCorruptFilesNeverCrash(t *testing.T) {
	n := 400
	if testing.Short() {
		n = 100
	}
	for _, name := range []string{"small.parquet", "small.arrow", "small-zstd.arrow", "small.csv"} {
		t.Run(name, func(t *testing.T) {
			orig, err := os.ReadFile(filepath.Join("testdata", "fuzz-seeds", name))
			if err != nil {
				t.Fatal(err)
			}
			path := filepath.Join(t.TempDir(), "c")
			// The undamaged file must read, or the test would prove little.
			if err := os.WriteFile(path, orig, 0o644); err != nil {
				t.Fatal(err)
			}
			if opened, clean, bad := readCorrupt(path); !opened || !clean || bad != nil {
				t.Fatalf("the undamaged seed does not read cleanly: opened %v, clean %v, %v", opened, clean, bad)
			}
			opened, clean := 0, 0
			for k, data := range corruptions(orig, n, 1) {
				if err := os.WriteFile(path, data, 0o644); err != nil {
					t.Fatal(err)
				}
				type result struct {
					opened, clean bool
					bad           error
				}
				done := make(chan result, 1)
				go func() {
					o, c, b := readCorrupt(path)
					done <- result{o, c, b}
				}()
				select {
				case res := <-done:
					if res.bad != nil {
						t.Errorf("damaged copy %d (%d bytes): %v", k, len(data), res.bad)
					}
					if res.opened {
						opened++
					}
					if res.clean {
						clean++
					}
				case <-time.After(10 * time.Second):
					t.Fatalf("damaged copy %d (%d bytes) still reading after 10 s", k, len(data))
				}
			}
			t.Logf("%d damaged copies: %d opened, %d read to the end", n, opened, clean)
		})
	}
}

// TestCorruptErrorsNameTheProblem checks the messages for damage that the
// structural checks find before arrow-go would allocate what the file
// declares: the path, the format and what is wrong.
func TestCorruptErrorsNameTheProblem(t *testing.T) {
	read := func(name string) []byte {
		b, err := os.ReadFile(filepath.Join("testdata", "fuzz-seeds", name))
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	le32 := func(b []byte, p int, v uint32) {
		b[p], b[p+1], b[p+2], b[p+3] = byte(v), byte(v>>8), byte(v>>16), byte(v>>24)
	}
	arrowFooterLen := func(b []byte) int {
		n := len(b)
		return int(uint32(b[n-10]) | uint32(b[n-9])<<8 | uint32(b[n-8])<<16 | uint32(b[n-7])<<24)
	}
	cases := []struct {
		name  string
		file  string
		edit  func(b []byte) []byte
		parts []string
	}{
		{"arrow footer length", "small.arrow", func(b []byte) []byte {
			le32(b, len(b)-10, 1<<30)
			return b
		}, []string{"corrupt Arrow IPC file", "footer length 1073741824 does not fit", "truncated or corrupt"}},
		{"arrow vector length", "small.arrow", func(b []byte) []byte {
			// The length of the schema's fields vector, found by walking
			// the footer flatbuffer (Footer.schema, Schema.fields).
			start := len(b) - 10 - arrowFooterLen(b)
			f := &fbuf{b: b[start : len(b)-10]}
			root, err := f.root()
			if err != nil {
				t.Fatal(err)
			}
			schema, _, err := f.child(root, 1, "schema")
			if err != nil {
				t.Fatal(err)
			}
			fields, n, err := f.vector(schema, 1, 4, "fields")
			if err != nil || n != 34 {
				t.Fatalf("fields vector of %d elements (want 34): %v", n, err)
			}
			le32(b, start+fields-4, 0x7fffffff)
			return b
		}, []string{"corrupt Arrow IPC file", "schema.fields: 2147483647 elements of 4 bytes"}},
		{"parquet footer length", "small.parquet", func(b []byte) []byte {
			le32(b, len(b)-8, 1<<30)
			return b
		}, []string{"corrupt Parquet file", "footer length 1073741824 does not fit", "truncated or corrupt"}},
		{"parquet cut", "small.parquet", func(b []byte) []byte { return b[:len(b)/2] }, []string{"corrupt Parquet file", `no "PAR1" at the end`}},
		{"csv long line", "small.csv", func(b []byte) []byte {
			i := bytes.IndexByte(b, '\n')
			long := append(b[:i+1:i+1], bytes.Repeat([]byte{'#'}, csvMaxLine+1)...)
			return append(long, b[i:]...)
		}, []string{"line 2 is longer than 16777216 bytes"}},
	}
	dir := t.TempDir()
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(dir, strings.ReplaceAll(tc.name, " ", "_"))
			if err := os.WriteFile(path, tc.edit(read(tc.file)), 0o644); err != nil {
				t.Fatal(err)
			}
			_, err := Open(path)
			wantErr(t, err, append([]string{path}, tc.parts...)...)
		})
	}
}

// TestBatchRows: a batch holds ReadBatchRows rows unless the columns are
// so many that it would exceed readBatchBytes.
func TestBatchRows(t *testing.T) {
	cases := []struct{ ncol, want int }{
		{12, ReadBatchRows}, {34, ReadBatchRows}, {113, ReadBatchRows},
		{114, readBatchBytes / (9 * 114)}, {1000, readBatchBytes / 9000}, {1 << 30, 1},
	}
	for _, tc := range cases {
		if got := batchRows(tc.ncol); got != tc.want {
			t.Errorf("batchRows(%d) = %d, want %d", tc.ncol, got, tc.want)
		}
	}
}

// TestOtherWritersAccepted writes catalogues with Parquet and Arrow IPC
// writer settings that corefall does not use but other tools do (other
// codecs, version 2 data pages, small pages, dictionaries everywhere, delta
// and byte-stream-split encodings, large compressed record batches of a
// constant column): the structural checks must accept them all and the
// values must read back unchanged.
func TestOtherWritersAccepted(t *testing.T) {
	s := mustSchema(t, Columns(true))
	const rows = 3000
	src := rand.New(rand.NewPCG(5, 5))
	b := NewBatch(s, rows)
	fillBatch(b, 0, rows, src)
	for r := range rows {
		// One metallicity for the whole run: a constant column, which
		// compresses by far more than the expansion limits' factor 64.
		b.Cols[s.Index(ColMetallicity)].F32[r] = 0.014
	}
	want := copyBatch(b)
	meta := arrow.NewMetadata([]string{MetaSchemaVersion}, []string{SchemaVersion})
	as := arrow.NewSchema(s.Arrow().Fields(), &meta)
	rb := newRecordBuilder(s)
	dir := t.TempDir()

	pq := []struct {
		name  string
		props []parquet.WriterProperty
	}{
		{"defaults", nil},
		{"zstd v2 pages", []parquet.WriterProperty{parquet.WithCompression(compress.Codecs.Zstd), parquet.WithDataPageVersion(parquet.DataPageV2)}},
		{"gzip small pages", []parquet.WriterProperty{parquet.WithCompression(compress.Codecs.Gzip), parquet.WithDataPageSize(512)}},
		{"snappy v2", []parquet.WriterProperty{parquet.WithCompression(compress.Codecs.Snappy), parquet.WithDataPageVersion(parquet.DataPageV2)}},
		{"brotli", []parquet.WriterProperty{parquet.WithCompression(compress.Codecs.Brotli)}},
		{"lz4 raw", []parquet.WriterProperty{parquet.WithCompression(compress.Codecs.Lz4Raw)}},
		{"delta and byte stream split", []parquet.WriterProperty{
			parquet.WithCompression(compress.Codecs.Zstd), parquet.WithDictionaryDefault(false), parquet.WithDataPageSize(4096),
			parquet.WithEncodingFor(ColSystemID, parquet.Encodings.DeltaBinaryPacked),
			parquet.WithEncodingFor(ColInitialMass, parquet.Encodings.ByteStreamSplit)}},
		{"delta uncompressed v2", []parquet.WriterProperty{
			parquet.WithDictionaryDefault(false), parquet.WithDataPageVersion(parquet.DataPageV2), parquet.WithDataPageSize(2048),
			parquet.WithEncodingFor(ColSystemID, parquet.Encodings.DeltaBinaryPacked)}},
	}
	for _, tc := range pq {
		t.Run("parquet "+tc.name, func(t *testing.T) {
			path := filepath.Join(dir, strings.ReplaceAll(tc.name, " ", "_")+".parquet")
			f, err := os.Create(path)
			if err != nil {
				t.Fatal(err)
			}
			writeWithPqarrow(t, f, s, b, rows, append([]parquet.WriterProperty{parquet.WithMaxRowGroupLength(1200)}, tc.props...)...)
			_, got := readAll(t, path)
			compareBatches(t, want, got)
		})
	}

	for _, codec := range []struct {
		name string
		opt  ipc.Option
	}{{"zstd", ipc.WithZstd()}, {"lz4", ipc.WithLZ4()}} {
		t.Run("arrow one batch "+codec.name, func(t *testing.T) {
			path := filepath.Join(dir, codec.name+".arrow")
			f, err := os.Create(path)
			if err != nil {
				t.Fatal(err)
			}
			fw, err := ipc.NewFileWriter(f, ipc.WithSchema(as), codec.opt, ipc.WithAllocator(memory.DefaultAllocator))
			if err != nil {
				t.Fatal(err)
			}
			rec := rb.record(b, 0, rows)
			err = fw.Write(array2schema(rec, as))
			rec.Release()
			if err != nil {
				t.Fatal(err)
			}
			if err := fw.Close(); err != nil {
				t.Fatal(err)
			}
			f.Close()
			_, got := readAll(t, path)
			compareBatches(t, want, got)
		})
	}
}

// array2schema rebuilds rec on schema as (same fields, with metadata).
func array2schema(rec arrow.RecordBatch, as *arrow.Schema) arrow.RecordBatch {
	return array.NewRecordBatch(as, rec.Columns(), rec.NumRows())
}
