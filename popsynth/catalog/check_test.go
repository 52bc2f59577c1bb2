package catalog

import (
	"bytes"
	"errors"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/file"
)

// TestCheckSchemaTree: Parquet lists the schema tree depth first, each
// element with its number of children (parquet.thrift, SchemaElement
// num_children); the list must hold exactly one tree.
func TestCheckSchemaTree(t *testing.T) {
	chain := make([]int32, parquetMaxNesting+2) // root, then one child per level
	for i := range chain[:len(chain)-1] {
		chain[i] = 1
	}
	cases := []struct {
		name     string
		children []int32
		want     string // "" for valid
	}{
		{"flat", []int32{3, 0, 0, 0}, ""},
		{"nested", []int32{2, 2, 0, 0, 0}, ""},
		{"no columns", []int32{0}, ""},
		{"empty", nil, "no schema elements"},
		{"too few", []int32{3, 0, 0}, "element 0 has 3 children"},
		{"leftover", []int32{1, 0, 0}, "element 2 lies outside the tree"},
		{"negative", []int32{1, -1}, "element 1 has -1 children"},
		{"huge", []int32{1<<31 - 1, 0}, "element 0 has 2147483647 children; allowed 0 to 1"},
		{"too deep", chain, "nested deeper than 64"},
	}
	for _, tc := range cases {
		err := checkSchemaTree(tc.children)
		switch {
		case tc.want == "" && err != nil:
			t.Errorf("%s: %v", tc.name, err)
		case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want)):
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
}

// TestThriftLimits decodes hand-encoded Thrift compact protocol (Apache
// Thrift, doc/specs/thrift-compact-protocol.md: a field header is the id
// delta in the high nibble and the type in the low one; i32 is a zigzag
// varint; a list header holds the size in the high nibble, 15 meaning a
// varint size follows): lengths that do not fit the buffer are refused.
func TestThriftLimits(t *testing.T) {
	nested := bytes.Repeat([]byte{0x1c}, thriftDepth+1) // field 1, struct, nested
	nested = append(nested, bytes.Repeat([]byte{0}, thriftDepth+2)...)
	cases := []struct {
		name string
		data []byte
		want string // "" for valid
	}{
		{"i32 and stop", []byte{0x15, 0xd8, 0x04, 0}, ""},
		{"list of 2^30 structs", []byte{0x19, 0xfc, 0x80, 0x80, 0x80, 0x80, 0x04, 0}, "1073741824 elements"},
		{"binary of 2^40 bytes", []byte{0x18, 0x80, 0x80, 0x80, 0x80, 0x80, 0x20, 0}, "length 1099511627776"},
		{"map of 2^30 entries", []byte{0x1b, 0x80, 0x80, 0x80, 0x80, 0x04, 0x55, 0}, "map of 1073741824 entries"},
		{"unknown type", []byte{0x1e, 0}, "unknown type 14"},
		{"too deep", nested, "nested deeper than 64"},
	}
	for _, tc := range cases {
		tr := &thriftReader{b: tc.data}
		err := tr.structure(nil)
		switch {
		case tc.want == "" && err != nil:
			t.Errorf("%s: %v", tc.name, err)
		case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want)):
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}

	// A PageHeader (parquet.thrift): type 0 (DATA_PAGE), 100 bytes
	// uncompressed, 50 compressed, DataPageHeader {10 values, PLAIN, RLE
	// levels}; zigzag(100) = 200 = varint c8 01.
	hdr := []byte{0x15, 0x00, 0x15, 0xc8, 0x01, 0x15, 0x64, 0x2c, 0x15, 0x14, 0x15, 0x00, 0x15, 0x06, 0x15, 0x06, 0x00, 0x00}
	h, err := parsePageHeader(hdr)
	if err != nil {
		t.Fatal(err)
	}
	if h.typ != 0 || h.uncompressed != 100 || h.compressed != 50 || !h.present || h.nvals != 10 || h.encoding != 0 || h.defEnc != 3 || h.size != int64(len(hdr)) {
		t.Errorf("parsed %+v", h)
	}
	if _, err := parsePageHeader(hdr[:8]); !errors.Is(err, errThriftShort) {
		t.Errorf("cut header: error %v, want errThriftShort", err)
	}
}

// writeParquet writes one batch of rows rows of schema s through pqarrow
// with the writer properties props and returns the file's bytes.
func writeParquet(t *testing.T, s *Schema, rows int, props ...parquet.WriterProperty) []byte {
	t.Helper()
	b := NewBatch(s, rows)
	fillBatch(b, 0, rows, rand.New(rand.NewPCG(3, 3)))
	var out bytes.Buffer
	writeWithPqarrow(t, &out, s, b, rows, props...)
	return out.Bytes()
}

// firstPage returns the offset of the first page of column col and its
// parsed header.
func firstPage(t *testing.T, data []byte, col int, dict bool) (int64, pageHeader) {
	t.Helper()
	pr, err := file.NewParquetReader(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	cc, err := pr.MetaData().RowGroup(0).ColumnChunk(col)
	if err != nil {
		t.Fatal(err)
	}
	pos := cc.DataPageOffset()
	if dict {
		pos = cc.DictionaryPageOffset()
	}
	h, err := parsePageHeader(data[pos:])
	if err != nil {
		t.Fatal(err)
	}
	return pos, h
}

// TestPageChecks damages page contents that arrow-go would turn into huge
// allocations: the number of values of a dictionary page (it allocates
// them all before decoding) and the block size of DELTA_BINARY_PACKED
// values (it allocates a miniblock of values; parquet-format Encodings.md:
// block size a multiple of 128, miniblocks of a multiple of 32 values).
func TestPageChecks(t *testing.T) {
	dir := t.TempDir()
	open := func(name string, data []byte) error {
		path := filepath.Join(dir, name)
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		r, err := Open(path)
		if err == nil {
			r.Close()
		}
		return err
	}

	// A category column: its dictionary page holds 5 words (RemnantWords)
	// of 2 to 4 letters, PLAIN: a 4-byte length and the letters each.
	cat := mustSchema(t, []Column{{Name: "remnant_type", Unit: "1", Kind: Category, Categories: RemnantWords()}})
	data := writeParquet(t, cat, 100)
	if err := open("dict-ok.parquet", data); err != nil {
		t.Fatalf("undamaged file: %v", err)
	}
	pos, h := firstPage(t, data, 0, true)
	if h.typ != 2 || h.nvals != int32(len(RemnantWords())) {
		t.Fatalf("first page is type %d with %d values; want a dictionary page of %d", h.typ, h.nvals, len(RemnantWords()))
	}
	// DictionaryPageHeader {1: num_values}: field header 0x15, then
	// zigzag(5) = 0x0a. Make it 63 (0x7e): 63 values of at least 4 bytes
	// do not fit in the page.
	hdr := data[pos : pos+h.size]
	i := bytes.Index(hdr, []byte{0x15, 0x0a, 0x15})
	if i < 0 {
		t.Fatalf("num_values not found in the dictionary page header % x", hdr)
	}
	hdr[i+1] = 0x7e
	wantErr(t, open("dict-bad.parquet", data), "corrupt Parquet file", "dictionary page", "63 values of 32 bits")

	// A DELTA_BINARY_PACKED int64 column, uncompressed so that the delta
	// header is in the file as is: 128 values per block (varint 80 01) in
	// 4 miniblocks. Make it 3 miniblocks, which do not divide 128.
	ids := mustSchema(t, []Column{{Name: "system_id", Unit: "1", Kind: Int64}})
	data = writeParquet(t, ids, 1000, parquet.WithDictionaryDefault(false), parquet.WithCompression(compress.Codecs.Uncompressed),
		parquet.WithEncodingFor("system_id", parquet.Encodings.DeltaBinaryPacked))
	if err := open("delta-ok.parquet", data); err != nil {
		t.Fatalf("undamaged file: %v", err)
	}
	pos, h = firstPage(t, data, 0, false)
	head := data[pos+h.size:]
	if h.encoding != 5 || !bytes.HasPrefix(head, []byte{0x80, 0x01, 0x04}) {
		t.Fatalf("first data page has encoding %d and values % x; want DELTA_BINARY_PACKED (5) starting 80 01 04", h.encoding, head[:4])
	}
	head[2] = 3
	wantErr(t, open("delta-bad.parquet", data), "corrupt Parquet file", "delta encoding header: 128 values per block in 3 miniblocks")
}
