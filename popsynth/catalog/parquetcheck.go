package catalog

import (
	"bytes"
	"encoding/base64"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math/bits"

	"github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/metadata"
)

// A Parquet file is checked here before arrow-go reads it, for the same
// reason as an Arrow IPC file (arrowcheck.go): arrow-go allocates what the
// file declares (a column chunk's total_compressed_size, a schema element's
// num_children, a dictionary page's num_values, a delta block size) before
// it can find out that the data are not there. The layout is the Apache
// Parquet format (parquet.apache.org, "File Format" and parquet.thrift):
//
//	"PAR1", column chunks of pages (each a PageHeader and its data),
//	FileMetaData (Thrift compact protocol), int32 footer length, "PAR1"
//
// The checks read the footer and every page header, not the data: O(pages).

const (
	// A page may declare up to 64 MiB compressed and 256 MiB uncompressed
	// (arrow-go's limits), but no more uncompressed than parquetExpansion
	// times the size of the file plus parquetExpansionSlack, so that a small
	// corrupt file cannot make a reader allocate more than 16 MiB or so per
	// page. Writers cut pages at about 1 MiB (arrow-go, Arrow C++,
	// parquet-mr), corefall's included, and a valid page never holds more
	// than 64 times the size of its file.
	parquetMaxCompressedPage   = parquet.DefaultMaxCompressedPageSize
	parquetMaxUncompressedPage = parquet.DefaultMaxUncompressedPageSize
	parquetExpansion           = 64
	parquetExpansionSlack      = 16 << 20
	// parquetMaxPageHeader is arrow-go's limit on a page header.
	parquetMaxPageHeader = 4 << 20
	// parquetMaxNesting bounds the depth of the schema tree; a catalogue's
	// is 1.
	parquetMaxNesting = 64
	// parquetMaxDeltaBlock bounds the values per block of the
	// DELTA_BINARY_PACKED encoding (writers use 128), since arrow-go
	// allocates a miniblock's worth of values from it.
	parquetMaxDeltaBlock = 1 << 16
)

// checkArrowSchemaValue checks the Arrow schema that a Parquet file keeps,
// base64-encoded, under "ARROW:schema". It is decoded as pqarrow decodes
// it: padded standard base64 when the length allows, else unpadded. A
// value that does not decode is left for pqarrow to refuse.
func checkArrowSchemaValue(v string) error {
	var b []byte
	var err error
	if len(v)%4 == 0 {
		b, err = base64.StdEncoding.DecodeString(v)
	}
	if len(b) == 0 || err != nil {
		if b, err = base64.RawStdEncoding.DecodeString(v); err != nil {
			return nil
		}
	}
	return checkArrowStreamSchema(b)
}

// checkParquetFooter checks the trailer and the FileMetaData of the
// Parquet file r of size bytes, and returns where the footer starts.
// FileMetaData is walked as Thrift, and its schema (field 2: a list of
// SchemaElement, whose field 5 is num_children) must form one tree, no
// deeper than parquetMaxNesting, that uses every element.
func checkParquetFooter(r io.ReaderAt, size int64) (int64, error) {
	if size < 12 {
		return 0, fmt.Errorf("%d bytes are too few for a Parquet file (at least 12)", size)
	}
	var tail [8]byte
	if _, err := r.ReadAt(tail[:], size-8); err != nil {
		return 0, fmt.Errorf("reading the trailer: %w", err)
	}
	switch string(tail[4:]) {
	case "PAR1":
	case "PARE":
		return 0, errors.New("the footer is encrypted, which catalogues never are")
	default:
		return 0, errors.New(`no "PAR1" at the end of the file`)
	}
	flen := int64(binary.LittleEndian.Uint32(tail[:4]))
	if flen < 2 || flen > size-12 {
		return 0, fmt.Errorf("footer length %d does not fit in the file; allowed 2 to %d", flen, size-12)
	}
	start := size - 8 - flen
	buf := make([]byte, flen)
	if _, err := r.ReadAt(buf, start); err != nil {
		return 0, fmt.Errorf("reading the footer: %w", err)
	}
	t := &thriftReader{b: buf}
	var children []int32
	err := t.structure(func(typ byte, id int16) (bool, error) {
		if id != 2 || typ != tcList {
			return false, nil
		}
		elem, n, err := t.list()
		if err != nil {
			return true, err
		}
		if elem != tcStruct {
			return true, fmt.Errorf("schema is a list of Thrift type %d, not of structs", elem)
		}
		children = make([]int32, n)
		for i := range children {
			err := t.structure(func(typ byte, id int16) (bool, error) {
				if id != 5 || typ != tcI32 {
					return false, nil
				}
				var err error
				children[i], err = t.i32()
				return true, err
			})
			if err != nil {
				return true, err
			}
		}
		return true, nil
	})
	if err != nil {
		return 0, fmt.Errorf("footer: %w", err)
	}
	if err := checkSchemaTree(children); err != nil {
		return 0, fmt.Errorf("footer schema: %w", err)
	}
	return start, nil
}

// checkSchemaTree checks the num_children of a depth-first list of schema
// elements.
func checkSchemaTree(children []int32) error {
	if len(children) == 0 {
		return errors.New("no schema elements")
	}
	var open []int64 // children still expected at each open level
	for i, c := range children {
		if i > 0 {
			if len(open) == 0 {
				return fmt.Errorf("element %d lies outside the tree of the %d before it", i, i)
			}
			open[len(open)-1]--
		}
		if c < 0 || int64(c) > int64(len(children)-i-1) {
			return fmt.Errorf("element %d has %d children; allowed 0 to %d (the elements left)", i, c, len(children)-i-1)
		}
		if c > 0 {
			if open = append(open, int64(c)); len(open) > parquetMaxNesting {
				return fmt.Errorf("schema nested deeper than %d levels", parquetMaxNesting)
			}
		}
		for len(open) > 0 && open[len(open)-1] == 0 {
			open = open[:len(open)-1]
		}
	}
	if len(open) > 0 {
		return fmt.Errorf("the %d elements end before the tree does", len(children))
	}
	return nil
}

// checkParquetChunks checks, against the file, the row groups and column
// chunks of metadata md parsed by arrow-go, and every page header of every
// column chunk. footerStart is where the footer starts.
func checkParquetChunks(r io.ReaderAt, md *metadata.FileMetaData, footerStart, size int64) error {
	var rows int64
	ncol := md.Schema.NumColumns()
	oldWriter := md.WriterVersion().LessThan(metadata.Parquet816FixedVersion)
	c := pageChecker{maxPage: min(parquetMaxUncompressedPage, parquetExpansion*size+parquetExpansionSlack)}
	for i := range md.NumRowGroups() {
		rg := md.RowGroup(i)
		n := rg.NumRows()
		if n < 0 || rows > 1<<62-n {
			return fmt.Errorf("row group %d has %d rows", i, n)
		}
		rows += n
		if rg.NumColumns() != ncol {
			return fmt.Errorf("row group %d has %d column chunks; the schema has %d columns", i, rg.NumColumns(), ncol)
		}
		for j := range ncol {
			cc, err := rg.ColumnChunk(j)
			if err != nil {
				return fmt.Errorf("row group %d column %d: %w", i, j, err)
			}
			if err := c.chunk(r, cc, md.Schema.Column(j), n, footerStart, oldWriter); err != nil {
				return fmt.Errorf("row group %d column %d (%s): %w", i, j, md.Schema.Column(j).Path(), err)
			}
		}
	}
	if rows != md.GetNumRows() {
		return fmt.Errorf("the row groups hold %d rows; the footer says %d", rows, md.GetNumRows())
	}
	return nil
}

// columnDescr is what chunk needs of a schema column (a
// *schema.Column).
type columnDescr interface {
	PhysicalType() parquet.Type
	TypeLength() int
	MaxRepetitionLevel() int16
	MaxDefinitionLevel() int16
}

// pageChecker checks column chunks page by page, reusing its buffer.
type pageChecker struct {
	buf     []byte
	maxPage int64 // most uncompressed bytes in a page
}

// chunk checks one column chunk of a row group of rows rows.
func (c *pageChecker) chunk(r io.ReaderAt, cc *metadata.ColumnChunkMetaData, col columnDescr, rows, footerStart int64, oldWriter bool) error {
	if cc.FilePath() != "" {
		return fmt.Errorf("column chunk lies in another file (%q)", cc.FilePath())
	}
	if cc.CryptoMetadata() != nil {
		return errors.New("column chunk is encrypted, which catalogues never are")
	}
	codec, err := compress.GetCodec(cc.Compression())
	if err != nil {
		return err
	}
	nvals := cc.NumValues()
	if nvals < 0 || col.MaxRepetitionLevel() == 0 && nvals != rows {
		return fmt.Errorf("%d values in a row group of %d rows", nvals, rows)
	}
	// Where arrow-go reads the chunk (file.RowGroupReader.GetColumnPageReader).
	start := cc.DataPageOffset()
	if cc.HasDictionaryPage() && cc.DictionaryPageOffset() > 0 && start > cc.DictionaryPageOffset() {
		start = cc.DictionaryPageOffset()
	}
	n := cc.TotalCompressedSize()
	if start < 4 || n < 0 || start > footerStart || n > footerStart-start {
		return fmt.Errorf("chunk at offset %d with %d bytes does not lie between the leading magic and the footer at %d", start, n, footerStart)
	}
	end := start + n
	if oldWriter {
		// Files from parquet-mr 1.2.8 and older leave a dictionary page
		// header out of the size (PARQUET-816); arrow-go reads up to 100
		// bytes more.
		end = min(end+100, footerStart)
	}
	var seen int64
	for pos := start; seen < nvals; {
		if pos >= end {
			return fmt.Errorf("chunk ends after %d of its %d values", seen, nvals)
		}
		h, err := c.header(r, pos, end)
		if err != nil {
			return fmt.Errorf("page at offset %d: %w", pos, err)
		}
		data := pos + h.size
		if h.compressed < 0 || h.compressed > parquetMaxCompressedPage || h.compressed > end-data {
			return fmt.Errorf("page at offset %d: %d bytes of data; allowed 0 to %d, up to the chunk end at %d", pos, h.compressed, min(parquetMaxCompressedPage, end-data), end)
		}
		if h.uncompressed < 0 || h.uncompressed > c.maxPage {
			return fmt.Errorf("page at offset %d: %d bytes uncompressed; allowed 0 to %d (%d times the file size + %d, at most %d)", pos, h.uncompressed, c.maxPage, parquetExpansion, parquetExpansionSlack, parquetMaxUncompressedPage)
		}
		if err := c.frame(r, cc.Compression(), data, h); err != nil {
			return fmt.Errorf("page at offset %d: %w", pos, err)
		}
		switch h.typ {
		case 2: // dictionary page
			if err := checkDictValues(h.nvals, h.uncompressed, col); err != nil {
				return fmt.Errorf("dictionary page at offset %d: %w", pos, err)
			}
		case 0, 3: // data page, data page v2
			count := int64(h.nvals)
			if h.typ == 3 {
				if h.nulls < 0 || h.nulls > h.nvals || h.rows < 0 || h.rows > h.nvals || h.defLen < 0 || h.repLen < 0 || int64(h.defLen)+int64(h.repLen) > min(h.compressed, h.uncompressed) {
					return fmt.Errorf("data page v2 at offset %d: %d values, %d missing, %d rows, %d + %d bytes of levels in %d bytes", pos, h.nvals, h.nulls, h.rows, h.repLen, h.defLen, h.compressed)
				}
				count = int64(h.rows) // as arrow-go counts them
			}
			if h.nvals < 0 || count > nvals-seen {
				return fmt.Errorf("data page at offset %d: %d values, and %d of the chunk's %d already seen", pos, h.nvals, seen, nvals)
			}
			seen += count
			if h.encoding >= 5 && h.encoding <= 7 {
				// DELTA_BINARY_PACKED, DELTA_LENGTH_BYTE_ARRAY, DELTA_BYTE_ARRAY.
				if err := c.delta(r, cc.Compression(), codec, data, h, col); err != nil {
					return fmt.Errorf("data page at offset %d: %w", pos, err)
				}
			}
		}
		pos = data + h.compressed
	}
	return nil
}

// pageHeader holds the fields of a Parquet PageHeader that are checked,
// with those of the header of its type (data page, dictionary page or data
// page v2) in the embedded subHeader.
type pageHeader struct {
	size                     int64 // bytes of the header itself
	typ                      int32
	uncompressed, compressed int64
	subHeader
}

// subHeader holds the fields of a DataPageHeader, DictionaryPageHeader or
// DataPageHeaderV2.
type subHeader struct {
	present         bool
	nvals, encoding int32
	defEnc, repEnc  int32 // data page v1
	nulls, rows     int32 // data page v2
	defLen, repLen  int32 // data page v2
	v2Compressed    bool  // data page v2 values compressed
}

// header reads the page header at pos, before end, through a window that
// grows up to parquetMaxPageHeader.
func (c *pageChecker) header(r io.ReaderAt, pos, end int64) (pageHeader, error) {
	for window := int64(256); ; window *= 16 {
		n := min(window, end-pos, parquetMaxPageHeader)
		c.buf = resize(c.buf, int(n))
		if _, err := r.ReadAt(c.buf, pos); err != nil {
			return pageHeader{}, fmt.Errorf("reading the header: %w", err)
		}
		h, err := parsePageHeader(c.buf)
		if errors.Is(err, errThriftShort) {
			if n < window {
				return pageHeader{}, fmt.Errorf("header runs past the chunk end at %d", end)
			}
			if window >= parquetMaxPageHeader {
				return pageHeader{}, fmt.Errorf("header longer than %d bytes", parquetMaxPageHeader)
			}
			continue
		}
		return h, err
	}
}

// parsePageHeader parses a PageHeader: type(1) uncompressed_page_size(2)
// compressed_page_size(3) crc(4) data_page_header(5) index_page_header(6)
// dictionary_page_header(7) data_page_header_v2(8). The header of the
// page's type must be there, with its num_values (field 1).
func parsePageHeader(b []byte) (pageHeader, error) {
	t := &thriftReader{b: b}
	var h pageHeader
	var subs [3]subHeader // data page, dictionary page, data page v2
	var have [3]bool
	i32 := func(dst *int32, typ byte) (bool, error) {
		if typ != tcI32 {
			return false, nil
		}
		var err error
		*dst, err = t.i32()
		return true, err
	}
	err := t.structure(func(typ byte, id int16) (bool, error) {
		var v int32
		switch id {
		case 1, 2, 3:
			ok, err := i32(&v, typ)
			if ok {
				have[id-1] = true
				switch id {
				case 1:
					h.typ = v
				case 2:
					h.uncompressed = int64(v)
				case 3:
					h.compressed = int64(v)
				}
			}
			return ok, err
		case 5, 7, 8:
			if typ != tcStruct {
				return false, nil
			}
			sub := &subs[(id-5)/2+(id-5)%2] // 5 -> 0, 7 -> 1, 8 -> 2
			*sub = subHeader{v2Compressed: true}
			gotN := false
			err := t.structure(func(typ byte, f int16) (bool, error) {
				switch {
				case f == 1:
					gotN = typ == tcI32
					return i32(&sub.nvals, typ)
				case id == 5 && f == 2, id == 7 && f == 2, id == 8 && f == 4:
					return i32(&sub.encoding, typ)
				case id == 5 && f == 3:
					return i32(&sub.defEnc, typ)
				case id == 5 && f == 4:
					return i32(&sub.repEnc, typ)
				case id == 8 && f == 2:
					return i32(&sub.nulls, typ)
				case id == 8 && f == 3:
					return i32(&sub.rows, typ)
				case id == 8 && f == 5:
					return i32(&sub.defLen, typ)
				case id == 8 && f == 6:
					return i32(&sub.repLen, typ)
				case id == 8 && f == 7 && (typ == tcTrue || typ == tcFalse):
					sub.v2Compressed = typ == tcTrue
					return true, nil
				}
				return false, nil
			})
			sub.present = gotN
			return true, err
		}
		return false, nil
	})
	if err != nil {
		return h, err
	}
	if !have[0] || !have[1] || !have[2] {
		return h, errors.New("page header lacks its type or sizes")
	}
	switch h.typ {
	case 0, 2, 3:
		h.subHeader = subs[h.typ/2+h.typ%2] // 0 -> 0, 2 -> 1, 3 -> 2
		if !h.present {
			return h, fmt.Errorf("page of type %d without its header or number of values", h.typ)
		}
	}
	h.size = int64(t.pos)
	return h, nil
}

// checkDictValues checks that nvals PLAIN-encoded values of the column's
// type fit in size bytes: arrow-go allocates nvals values up front.
func checkDictValues(nvals int32, size int64, col columnDescr) error {
	var bitsPer int64
	switch col.PhysicalType() {
	case parquet.Types.Boolean:
		bitsPer = 1
	case parquet.Types.Int32, parquet.Types.Float, parquet.Types.ByteArray: // a byte array has a 4-byte length
		bitsPer = 32
	case parquet.Types.Int64, parquet.Types.Double:
		bitsPer = 64
	case parquet.Types.Int96:
		bitsPer = 96
	case parquet.Types.FixedLenByteArray:
		bitsPer = 8 * int64(max(col.TypeLength(), 1))
	default:
		return fmt.Errorf("physical type %s", col.PhysicalType())
	}
	if nvals < 0 || int64(nvals) > size*8/bitsPer {
		return fmt.Errorf("%d values of %d bits in %d bytes", nvals, bitsPer, size)
	}
	return nil
}

// frame checks the frame header of a zstd-compressed page: arrow-go
// decodes a page with zstd's DecodeAll, which allocates the frame's
// declared content size at once (up to 64 GiB). It must not exceed the
// page's uncompressed size (RFC 8878, section 3.1.1.1).
func (c *pageChecker) frame(r io.ReaderAt, codec compress.Compression, data int64, h pageHeader) error {
	if codec != compress.Codecs.Zstd || h.typ != 0 && h.typ != 2 && h.typ != 3 {
		return nil
	}
	skip := int64(0)
	if h.typ == 3 {
		if !h.v2Compressed {
			return nil
		}
		skip = int64(h.defLen) + int64(h.repLen)
	}
	var fh [18]byte // magic, descriptor, window, dictionary id (4), content size (8)
	n := min(int64(len(fh)), h.compressed-skip)
	if n < 6 {
		return nil // too short for a frame; decoding will fail
	}
	if _, err := r.ReadAt(fh[:n], data+skip); err != nil {
		return fmt.Errorf("reading the zstd frame header: %w", err)
	}
	if binary.LittleEndian.Uint32(fh[:]) != 0xFD2FB528 {
		return nil // not a zstd frame; decoding will fail
	}
	d := fh[4]
	single := d&0x20 != 0
	p := int64(5)
	if !single {
		p++ // window descriptor
	}
	p += [4]int64{0, 1, 2, 4}[d&3] // dictionary id
	var fcs uint64
	switch d >> 6 {
	case 0:
		if !single {
			return nil // no content size
		}
		if p+1 > n {
			return nil
		}
		fcs = uint64(fh[p])
	case 1:
		if p+2 > n {
			return nil
		}
		fcs = uint64(binary.LittleEndian.Uint16(fh[p:])) + 256
	case 2:
		if p+4 > n {
			return nil
		}
		fcs = uint64(binary.LittleEndian.Uint32(fh[p:]))
	case 3:
		if p+8 > n {
			return nil
		}
		fcs = binary.LittleEndian.Uint64(fh[p:])
	}
	if fcs > uint64(h.uncompressed) {
		return fmt.Errorf("zstd frame declares %d bytes; the page header says %d", fcs, h.uncompressed)
	}
	return nil
}

// delta checks the header of the DELTA_BINARY_PACKED block stream at the
// start of a delta-encoded data page's values (parquet-format
// Encodings.md): block size (a multiple of 128), miniblocks per block
// (dividing it into multiples of 32 values), total value count and first
// value, each a ULEB128 varint. arrow-go allocates a miniblock's worth of
// values before reading any, so the block size is bounded too.
func (c *pageChecker) delta(r io.ReaderAt, kind compress.Compression, codec compress.Codec, data int64, h pageHeader, col columnDescr) error {
	head, err := c.values(r, kind, codec, data, h, col)
	if err != nil {
		return err
	}
	var v [3]uint64
	for i := range v {
		x, n := binary.Uvarint(head)
		if n <= 0 {
			return errors.New("delta encoding header is cut short or overlong")
		}
		v[i], head = x, head[n:]
	}
	block, mini, total := v[0], v[1], v[2]
	if block == 0 || block%128 != 0 || block > parquetMaxDeltaBlock || mini == 0 || block%mini != 0 || (block/mini)%32 != 0 || total > uint64(max(h.nvals, 0)) {
		return fmt.Errorf("delta encoding header: %d values per block in %d miniblocks, %d values; allowed blocks of 128 to %d values in miniblocks of a multiple of 32, at most the page's %d values", block, mini, total, parquetMaxDeltaBlock, h.nvals)
	}
	return nil
}

// values returns the first bytes (up to 32) of a data page's values, after
// its repetition and definition levels, decompressed.
func (c *pageChecker) values(r io.ReaderAt, kind compress.Compression, codec compress.Codec, data int64, h pageHeader, col columnDescr) ([]byte, error) {
	sec := io.NewSectionReader(r, data, h.compressed)
	compressed := kind != compress.Codecs.Uncompressed
	if h.typ == 3 {
		// Version 2: the levels come first, never compressed.
		lv := int64(h.repLen) + int64(h.defLen)
		sec = io.NewSectionReader(r, data+lv, h.compressed-lv)
		compressed = compressed && h.v2Compressed
	}
	var in io.Reader = sec
	if compressed {
		// Snappy's stream reader reads the framing format, not the raw
		// blocks of Parquet pages.
		switch sc, ok := codec.(compress.StreamingCodec); {
		case ok && kind != compress.Codecs.Snappy:
			rc := sc.NewReader(sec)
			defer rc.Close()
			in = rc
		default:
			// A block codec: decode the whole page, which is bounded by
			// the checks on its sizes.
			src := make([]byte, h.compressed)
			if _, err := io.ReadFull(sec, src); err != nil {
				return nil, err
			}
			ec, ok := codec.(compress.ErrorCodec)
			if !ok {
				return nil, errors.New("codec cannot report errors")
			}
			out, err := ec.DecodeWithError(make([]byte, h.uncompressed), src)
			if err != nil {
				return nil, fmt.Errorf("decompressing: %w", err)
			}
			in = bytes.NewReader(out)
		}
	}
	in = io.LimitReader(in, h.uncompressed)
	if h.typ == 0 {
		maxLevel := [2]int16{col.MaxRepetitionLevel(), col.MaxDefinitionLevel()}
		enc := [2]int32{h.repEnc, h.defEnc}
		for i := range maxLevel {
			if maxLevel[i] == 0 {
				continue
			}
			var skip int64
			switch enc[i] {
			case 3: // RLE: int32 length, then the runs
				var n [4]byte
				if _, err := io.ReadFull(in, n[:]); err != nil {
					return nil, fmt.Errorf("reading levels: %w", err)
				}
				skip = int64(int32(binary.LittleEndian.Uint32(n[:])))
			case 4: // BIT_PACKED
				skip = (int64(max(h.nvals, 0))*int64(bits.Len16(uint16(maxLevel[i]))) + 7) / 8
			default:
				return nil, fmt.Errorf("levels in encoding %d", enc[i])
			}
			if skip < 0 || skip > h.uncompressed {
				return nil, fmt.Errorf("%d bytes of levels in a page of %d", skip, h.uncompressed)
			}
			if _, err := io.CopyN(io.Discard, in, skip); err != nil {
				return nil, fmt.Errorf("reading levels: %w", err)
			}
		}
	}
	c.buf = resize(c.buf, 32)
	n, err := io.ReadFull(in, c.buf)
	if err != nil && !errors.Is(err, io.ErrUnexpectedEOF) && !errors.Is(err, io.EOF) {
		return nil, fmt.Errorf("decompressing: %w", err)
	}
	return c.buf[:n], nil
}
