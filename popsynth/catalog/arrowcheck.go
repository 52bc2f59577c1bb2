package catalog

import (
	"encoding/binary"
	"fmt"
	"io"

	"github.com/apache/arrow-go/v18/arrow"
)

// The structure of an Arrow IPC file is checked here before arrow-go reads
// it, because arrow-go trusts the lengths it finds in the file: a flipped bit
// in a vector length of the footer makes it allocate terabytes, and the
// process dies of an out-of-memory error that no recover can catch. The
// layout is the Arrow columnar format's IPC file format (arrow.apache.org,
// "Arrow Columnar Format", IPC File Format; flatbuffer definitions in
// File.fbs, Schema.fbs and Message.fbs):
//
//	"ARROW1" + 2 bytes of padding
//	messages: [0xFFFFFFFF][int32 length][Message flatbuffer][body]
//	footer: Footer flatbuffer
//	int32 footer length, "ARROW1"
//
// Footer: version(0) schema(1) dictionaries(2: [Block]) recordBatches(3:
// [Block]) custom_metadata(4). Block is a 24-byte struct {offset int64,
// metaDataLength int32, padding, bodyLength int64}. The checks are O(size of
// the metadata): the footer once at Open, and the metadata of each record
// batch just before it is read; the data are never scanned.

const (
	arrowMagic = "ARROW1"

	// arrowMaxNesting bounds the depth of Field.children, as arrow-go does
	// for arrays (its kMaxNestingDepth); a catalogue has depth 1.
	arrowMaxNesting = 64

	// A compressed buffer starts with its uncompressed length (int64, -1
	// for a buffer stored uncompressed), and arrow-go allocates that length
	// before decompressing. The lengths declared by the buffers of one batch
	// may add up to at most arrowExpansion times the size of the file plus
	// arrowExpansionSlack, so a small corrupt file cannot make a reader
	// allocate more than about 64 MiB. A valid file is refused only if one
	// batch expands to more than that: far more than 64 times the whole
	// file, as only a batch of constant columns in a file with little else
	// could (a constant column, one metallicity for a whole run, compresses
	// thousands of times). Files written here never come near it: the
	// writer puts at most ReadBatchRows rows in a batch, 512 KiB per column.
	// Record batches are also checked against the schema, which fixes the
	// length of every fixed-width buffer.
	arrowExpansion      = 64
	arrowExpansionSlack = 64 << 20
)

// arrowBlock is a Block of the footer: where a message lies in the file.
type arrowBlock struct {
	offset int64
	meta   int64 // length of the prefix and Message flatbuffer, padded
	body   int64
}

// arrowFile is the checked structure of an Arrow IPC file.
type arrowFile struct {
	size        int64
	footerStart int64
	dicts       []arrowBlock
	batches     []arrowBlock
}

// checkArrowFile checks the trailer, the footer flatbuffer (with the schema
// it holds), every block's position and every dictionary batch of the
// Arrow IPC file r of size bytes.
func checkArrowFile(r io.ReaderAt, size int64) (*arrowFile, error) {
	const lead, trail = 8, 10 // "ARROW1" + padding; int32 + "ARROW1"
	if size < lead+trail+8 {
		return nil, fmt.Errorf("%d bytes are too few for an Arrow IPC file (at least %d)", size, lead+trail+8)
	}
	var tail [trail]byte
	if _, err := r.ReadAt(tail[:], size-trail); err != nil {
		return nil, fmt.Errorf("reading the trailer: %w", err)
	}
	if string(tail[4:]) != arrowMagic {
		return nil, fmt.Errorf("no %q at the end of the file", arrowMagic)
	}
	flen := int64(int32(binary.LittleEndian.Uint32(tail[:4])))
	if flen < 8 || flen > size-lead-trail {
		return nil, fmt.Errorf("footer length %d does not fit in the file; allowed 8 to %d", flen, size-lead-trail)
	}
	a := &arrowFile{size: size, footerStart: size - trail - flen}
	buf := make([]byte, flen)
	if _, err := r.ReadAt(buf, a.footerStart); err != nil {
		return nil, fmt.Errorf("reading the footer: %w", err)
	}
	f := &fbuf{b: buf, what: "footer", index: -1}
	footer, err := f.root()
	if err != nil {
		return nil, err
	}
	if err := f.scalar(footer, 0, 2, "version"); err != nil {
		return nil, err
	}
	schema, ok, err := f.child(footer, 1, "schema")
	if err != nil {
		return nil, err
	}
	if !ok {
		return nil, f.errf("no schema")
	}
	if err := checkArrowSchema(f, schema); err != nil {
		return nil, err
	}
	if a.dicts, err = a.blocks(f, footer, 2, "dictionaries"); err != nil {
		return nil, err
	}
	if a.batches, err = a.blocks(f, footer, 3, "recordBatches"); err != nil {
		return nil, err
	}
	if err := checkKeyValues(f, footer, 4, "custom_metadata"); err != nil {
		return nil, err
	}
	c := newArrowChecker(size)
	for i, blk := range a.dicts {
		if _, err := c.message(r, blk, 2, "dictionary batch", i, nil); err != nil {
			return nil, err
		}
	}
	return a, nil
}

// checkArrowStreamSchema checks an Arrow IPC stream that starts with a
// schema message, such as the serialized Arrow schema a Parquet file keeps
// under "ARROW:schema": its length prefix, the Message flatbuffer with the
// schema, and a body length that fits in the rest of the stream.
func checkArrowStreamSchema(b []byte) error {
	if len(b) < 8 {
		return fmt.Errorf("Arrow schema message of %d bytes; it needs at least 8", len(b))
	}
	prefix := 4
	if binary.LittleEndian.Uint32(b) == 0xFFFFFFFF {
		prefix = 8
	}
	n := int64(int32(binary.LittleEndian.Uint32(b[prefix-4:])))
	if n < 8 || n > int64(len(b)-prefix) {
		return fmt.Errorf("Arrow schema message: metadata length %d; allowed 8 to %d", n, len(b)-prefix)
	}
	f := &fbuf{b: b[prefix : int64(prefix)+n], what: "Arrow schema message", index: -1}
	m, err := f.root()
	if err != nil {
		return err
	}
	if err := f.scalar(m, 0, 2, "version"); err != nil {
		return err
	}
	if ht, err := f.intField(m, 1, 1, 0, "header_type"); err != nil {
		return err
	} else if ht != 1 {
		return f.errf("message type %d; expected 1 (schema)", ht)
	}
	if body, err := f.intField(m, 3, 8, 0, "bodyLength"); err != nil {
		return err
	} else if rest := int64(len(b)-prefix) - n; body < 0 || body > rest {
		return f.errf("body length %d; allowed 0 to %d", body, rest)
	}
	if err := checkKeyValues(f, m, 4, "custom_metadata"); err != nil {
		return err
	}
	h, ok, err := f.child(m, 2, "header")
	if err != nil {
		return err
	}
	if !ok {
		return f.errf("no schema")
	}
	return checkArrowSchema(f, h)
}

// blocks reads and checks the vector of Blocks in field slot i of the
// footer: each message must lie, 8-byte aligned, between the leading magic
// and the footer.
func (a *arrowFile) blocks(f *fbuf, footer fbTable, i int, name string) ([]arrowBlock, error) {
	start, n, err := f.vector(footer, i, 24, name)
	if err != nil {
		return nil, err
	}
	out := make([]arrowBlock, n)
	for j := range out {
		p := start + 24*j
		b := arrowBlock{offset: f.i64(p), meta: int64(int32(f.u32(p + 8))), body: f.i64(p + 16)}
		switch {
		case b.offset < 8 || b.offset%8 != 0:
			err = fmt.Errorf("offset %d is not a multiple of 8 after the leading magic", b.offset)
		case b.meta < 16 || b.meta%8 != 0:
			err = fmt.Errorf("metadata length %d is not a multiple of 8 of at least 16", b.meta)
		case b.body < 0 || b.body%8 != 0:
			err = fmt.Errorf("body length %d is not a multiple of 8 of at least 0", b.body)
		case b.offset > a.footerStart || b.meta > a.footerStart-b.offset || b.body > a.footerStart-b.offset-b.meta:
			err = fmt.Errorf("message at offset %d with %d + %d bytes runs past the footer at %d", b.offset, b.meta, b.body, a.footerStart)
		}
		if err != nil {
			return nil, f.errf("%s[%d]: %w", name, j, err)
		}
		out[j] = b
	}
	return out, nil
}

// checkArrowSchema checks a Schema table: endianness(0) fields(1: [Field])
// custom_metadata(2: [KeyValue]) features(3: [int64]).
func checkArrowSchema(f *fbuf, s fbTable) error {
	if err := f.scalar(s, 0, 2, "schema.endianness"); err != nil {
		return err
	}
	err := f.tableVector(s, 1, "schema.fields", func(t fbTable, _ int) error { return checkArrowField(f, t, 1) })
	if err != nil {
		return err
	}
	if err := checkKeyValues(f, s, 2, "schema.custom_metadata"); err != nil {
		return err
	}
	_, _, err = f.vector(s, 3, 8, "schema.features")
	return err
}

// checkArrowField checks a Field table at nesting depth: name(0)
// nullable(1) type_type(2) type(3) dictionary(4) children(5: [Field])
// custom_metadata(6: [KeyValue]).
func checkArrowField(f *fbuf, t fbTable, depth int) error {
	if depth > arrowMaxNesting {
		return f.errf("fields nested deeper than %d levels", arrowMaxNesting)
	}
	if err := f.str(t, 0, "field.name"); err != nil {
		return err
	}
	if err := f.scalar(t, 1, 1, "field.nullable"); err != nil {
		return err
	}
	typ, err := f.intField(t, 2, 1, 0, "field.type_type")
	if err != nil {
		return err
	}
	typ &= 0xff
	if typ == 0 || typ > 26 {
		return f.errf("field type %d is not an Arrow type (1 to 26)", typ)
	}
	tt, ok, err := f.child(t, 3, "field.type")
	if err != nil {
		return err
	}
	if !ok {
		return f.errf("field without its type table")
	}
	if err := checkArrowType(f, tt, typ); err != nil {
		return err
	}
	if d, ok, err := f.child(t, 4, "field.dictionary"); err != nil {
		return err
	} else if ok {
		// DictionaryEncoding: id(0) indexType(1: Int) isOrdered(2) dictionaryKind(3).
		if err := f.scalars(d, "field.dictionary", 8, 0, 1, 2); err != nil {
			return err
		}
		it, ok, err := f.child(d, 1, "field.dictionary.indexType")
		if err != nil {
			return err
		}
		if !ok {
			return f.errf("dictionary-encoded field without its index type")
		}
		if err := checkArrowType(f, it, 2); err != nil {
			return err
		}
	}
	err = f.tableVector(t, 5, "field.children", func(c fbTable, _ int) error { return checkArrowField(f, c, depth+1) })
	if err != nil {
		return err
	}
	return checkKeyValues(f, t, 6, "field.custom_metadata")
}

// checkArrowType checks the table of Arrow type typ (Schema.fbs, union
// Type): the sizes of its scalar fields, and the strings and vectors in it.
func checkArrowType(f *fbuf, t fbTable, typ int64) error {
	const name = "field.type"
	switch typ {
	case 2: // Int: bitWidth int32, is_signed bool
		return f.scalars(t, name, 4, 1)
	case 3, 8, 11, 18: // FloatingPoint, Date, Interval, Duration: one short enum
		return f.scalars(t, name, 2)
	case 7: // Decimal: precision, scale, bitWidth int32
		return f.scalars(t, name, 4, 4, 4)
	case 9: // Time: unit short, bitWidth int32
		return f.scalars(t, name, 2, 4)
	case 10: // Timestamp: unit short, timezone string
		if err := f.scalars(t, name, 2); err != nil {
			return err
		}
		return f.str(t, 1, "field.type.timezone")
	case 14: // Union: mode short, typeIds [int32]
		if err := f.scalars(t, name, 2); err != nil {
			return err
		}
		_, _, err := f.vector(t, 1, 4, "field.type.typeIds")
		return err
	case 15, 16: // FixedSizeBinary byteWidth, FixedSizeList listSize: int32
		return f.scalars(t, name, 4)
	case 17: // Map: keysSorted bool
		return f.scalars(t, name, 1)
	}
	return nil // the other types have no fields
}

// checkKeyValues checks the vector of KeyValue tables (key(0), value(1):
// strings) in field slot i of t.
func checkKeyValues(f *fbuf, t fbTable, i int, name string) error {
	return f.tableVector(t, i, name, func(kv fbTable, _ int) error {
		if err := f.str(kv, 0, name+".key"); err != nil {
			return err
		}
		return f.str(kv, 1, name+".value")
	})
}

// arrowColumn is the buffer layout of a catalogue column in a record batch:
// a validity bitmap, then either width-byte values or, for a utf8 column,
// int32 offsets and the character data.
type arrowColumn struct {
	width int // bytes per value; 0 for utf8
}

// arrowColumns returns the layout of each column of a catalogue schema
// rebuilt by schemaFromArrow, which admits only the types handled here.
func arrowColumns(as *arrow.Schema) ([]arrowColumn, error) {
	out := make([]arrowColumn, as.NumFields())
	for i, fd := range as.Fields() {
		switch t := fd.Type.(type) {
		case *arrow.DictionaryType:
			fw, ok := t.IndexType.(arrow.FixedWidthDataType)
			if !ok {
				return nil, fmt.Errorf("column %q: dictionary index type %s is not an integer", fd.Name, t.IndexType)
			}
			out[i].width = fw.BitWidth() / 8
		case *arrow.StringType:
		case arrow.FixedWidthDataType:
			out[i].width = t.BitWidth() / 8
		default:
			return nil, fmt.Errorf("column %q has Arrow type %s", fd.Name, fd.Type)
		}
		if out[i].width == 0 && fd.Type.ID() != arrow.STRING {
			return nil, fmt.Errorf("column %q has Arrow type %s", fd.Name, fd.Type)
		}
	}
	return out, nil
}

// arrowChecker checks the messages of record and dictionary batches. Its
// scratch space is reused from one batch to the next.
type arrowChecker struct {
	meta  []byte
	fb    fbuf
	pre   [8]byte
	limit int64 // most uncompressed bytes declared by the buffers of a batch
}

// newArrowChecker returns a checker for a file of size bytes.
func newArrowChecker(size int64) *arrowChecker {
	return &arrowChecker{limit: arrowExpansion*min(size, 1<<50) + arrowExpansionSlack}
}

// message reads the message of blk, the index-th of its kind ("record
// batch" or "dictionary batch"), checks its flatbuffer as a batch of header
// type want (2 dictionary, 3 record batch) and the positions of its buffers
// in its body, and, if cols is not nil, that the batch fits those columns.
// It returns the number of rows of the batch.
func (c *arrowChecker) message(r io.ReaderAt, blk arrowBlock, want int64, kind string, index int, cols []arrowColumn) (int64, error) {
	c.meta = resize(c.meta, int(blk.meta))
	if _, err := r.ReadAt(c.meta, blk.offset); err != nil {
		return 0, fmt.Errorf("%s %d: reading %d bytes of metadata at offset %d: %w", kind, index, blk.meta, blk.offset, err)
	}
	// Prefix: 0xFFFFFFFF and the int32 length, or the length alone (files
	// written before Arrow 0.15); the length counts the padding.
	prefix := 4
	if binary.LittleEndian.Uint32(c.meta) == 0xFFFFFFFF {
		prefix = 8
	}
	if n := int64(int32(binary.LittleEndian.Uint32(c.meta[prefix-4:]))); n != blk.meta-int64(prefix) {
		return 0, fmt.Errorf("%s %d: metadata length %d in the message, %d in the footer", kind, index, n, blk.meta-int64(prefix))
	}
	c.fb = fbuf{b: c.meta[prefix:], what: kind, index: index}
	f := &c.fb
	// Message: version(0) header_type(1) header(2) bodyLength(3) custom_metadata(4).
	m, err := f.root()
	if err != nil {
		return 0, err
	}
	if err := f.scalar(m, 0, 2, "version"); err != nil {
		return 0, err
	}
	ht, err := f.intField(m, 1, 1, 0, "header_type")
	if err != nil {
		return 0, err
	}
	if ht != want {
		return 0, f.errf("message type %d; expected %d", ht, want)
	}
	body, err := f.intField(m, 3, 8, 0, "bodyLength")
	if err != nil {
		return 0, err
	}
	if body != blk.body {
		return 0, f.errf("body length %d; the footer says %d", body, blk.body)
	}
	if err := checkKeyValues(f, m, 4, "custom_metadata"); err != nil {
		return 0, err
	}
	h, ok, err := f.child(m, 2, "header")
	if err != nil {
		return 0, err
	}
	if !ok {
		return 0, f.errf("no header")
	}
	if want == 2 {
		// DictionaryBatch: id(0) data(1: RecordBatch) isDelta(2).
		if err := f.scalars(h, "DictionaryBatch", 8, 0, 1); err != nil {
			return 0, err
		}
		if h, ok, err = f.child(h, 1, "DictionaryBatch.data"); err != nil {
			return 0, err
		} else if !ok {
			return 0, f.errf("dictionary batch without data")
		}
	}
	return c.batch(r, f, h, blk, cols)
}

// batch checks a RecordBatch table: length(0) nodes(1: [FieldNode {length,
// null_count int64}]) buffers(2: [Buffer {offset, length int64}])
// compression(3: BodyCompression {codec, method byte})
// variadicBufferCounts(4: [int64]).
func (c *arrowChecker) batch(r io.ReaderAt, f *fbuf, rb fbTable, blk arrowBlock, cols []arrowColumn) (int64, error) {
	rows, err := f.intField(rb, 0, 8, 0, "length")
	if err != nil {
		return 0, err
	}
	if rows < 0 {
		return 0, f.errf("%d rows", rows)
	}
	nodes, nn, err := f.vector(rb, 1, 16, "nodes")
	if err != nil {
		return 0, err
	}
	bufs, nb, err := f.vector(rb, 2, 16, "buffers")
	if err != nil {
		return 0, err
	}
	vc, nv, err := f.vector(rb, 4, 8, "variadicBufferCounts")
	if err != nil {
		return 0, err
	}
	for j := range nv {
		if v := f.i64(vc + 8*j); v < 0 || v > int64(nb) {
			return 0, f.errf("variadic buffer count %d; allowed 0 to %d", v, nb)
		}
	}
	compressed := false
	if comp, ok, err := f.child(rb, 3, "compression"); err != nil {
		return 0, err
	} else if ok {
		codec, err := f.intField(comp, 0, 1, 0, "compression.codec")
		if err != nil {
			return 0, err
		}
		method, err := f.intField(comp, 1, 1, 0, "compression.method")
		if err != nil {
			return 0, err
		}
		if codec != 0 && codec != 1 || method != 0 {
			return 0, f.errf("compression codec %d, method %d; allowed codecs 0 (LZ4 frame) and 1 (zstd), method 0 (per buffer)", codec, method)
		}
		compressed = true
	}
	for j := range nn {
		n, nulls := f.i64(nodes+16*j), f.i64(nodes+16*j+8)
		if n < 0 || nulls < 0 || nulls > n {
			return 0, f.errf("node %d: %d values of which %d missing", j, n, nulls)
		}
	}
	bodyStart := blk.offset + blk.meta
	var declared int64 // uncompressed bytes declared so far
	// size returns the length of buffer j once decompressed.
	size := func(j int) (int64, error) {
		off, n := f.i64(bufs+16*j), f.i64(bufs+16*j+8)
		if off < 0 || n < 0 || off > blk.body || n > blk.body-off {
			return 0, f.errf("buffer %d at offset %d with %d bytes lies outside the %d-byte body", j, off, n, blk.body)
		}
		if !compressed || n == 0 {
			return n, nil
		}
		if n < 8 {
			return 0, f.errf("compressed buffer %d has %d bytes, fewer than its 8-byte length prefix", j, n)
		}
		if _, err := r.ReadAt(c.pre[:], bodyStart+off); err != nil {
			return 0, f.errf("buffer %d: reading its length prefix: %w", j, err)
		}
		u := int64(binary.LittleEndian.Uint64(c.pre[:]))
		if u == -1 {
			return n - 8, nil // stored uncompressed
		}
		if u < 0 || u > c.limit-declared {
			return 0, f.errf("compressed buffer %d of %d bytes declares %d bytes uncompressed, after %d for the buffers before it; a batch may declare 0 to %d in all (%d times the file size + %d)", j, n-8, u, declared, c.limit, arrowExpansion, arrowExpansionSlack)
		}
		declared += u
		return u, nil
	}
	if cols == nil {
		for j := range nb {
			if _, err := size(j); err != nil {
				return 0, err
			}
		}
		return rows, nil
	}

	// The batch must fit the catalogue's columns: one node and two buffers
	// (three for utf8) per column, every column as long as the batch.
	want := 0
	for _, col := range cols {
		want += 2
		if col.width == 0 {
			want++
		}
	}
	if nn != len(cols) || nb != want || nv != 0 {
		return 0, f.errf("%d nodes, %d buffers and %d variadic counts; the %d columns need %d, %d and 0", nn, nb, nv, len(cols), len(cols), want)
	}
	j := 0
	for i, col := range cols {
		n, nulls := f.i64(nodes+16*i), f.i64(nodes+16*i+8)
		if n != rows {
			return 0, f.errf("column %d has %d values in a batch of %d rows", i, n, rows)
		}
		bits, err := size(j)
		if err != nil {
			return 0, err
		}
		if nulls > 0 && bits < n/8+min(n%8, 1) {
			return 0, f.errf("column %d: validity bitmap of %d bytes for %d values", i, bits, n)
		}
		vals, err := size(j + 1)
		if err != nil {
			return 0, err
		}
		j += 2
		if col.width > 0 {
			if vals/int64(col.width) < n {
				return 0, f.errf("column %d: %d bytes for %d values of %d bytes", i, vals, n, col.width)
			}
			continue
		}
		if _, err := size(j); err != nil {
			return 0, err
		}
		j++
		if n > 0 && vals/4 < n+1 {
			return 0, f.errf("column %d: %d bytes of offsets for %d strings", i, vals, n)
		}
	}
	return rows, nil
}
