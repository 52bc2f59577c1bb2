package catalog

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/ipc"
	"github.com/apache/arrow-go/v18/arrow/memory"
)

// arrowEncoder writes an Arrow IPC file. The schema, with the file
// metadata, is written both at the start and in the footer of an IPC file,
// so metadata known only at Close cannot be streamed. The batches therefore
// go first to an uncompressed IPC stream in a side file next to the
// temporary file (".NAME.tmp-RANDOM.spool"), and finish copies them into the
// real file behind a schema that carries the final metadata. This costs a
// second pass over the data and, for a while, twice its size on disk.
type arrowEncoder struct {
	out      io.Writer
	s        *Schema
	compress bool
	spool    *os.File
	spoolBuf *bufio.Writer
	sink     errWriter
	iw       *ipc.Writer
	conv     recordBuilder
}

func newArrowEncoder(out io.Writer, s *Schema, opt Options, tmp string) (*arrowEncoder, error) {
	f, err := os.OpenFile(tmp+".spool", os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o600)
	if err != nil {
		return nil, err
	}
	e := &arrowEncoder{out: out, s: s, compress: opt.Compress, spool: f, conv: newRecordBuilder(s)}
	e.sink.w = f
	e.spoolBuf = bufio.NewWriterSize(&e.sink, 1<<20)
	e.iw = ipc.NewWriter(e.spoolBuf, ipc.WithSchema(s.arrow))
	return e, nil
}

func (e *arrowEncoder) write(b *Batch) error {
	// Record batches hold at most ReadBatchRows rows, so that a reader
	// needs no more memory than that for one.
	for from := 0; from < b.Len; from += ReadBatchRows {
		rec := e.conv.record(b, from, min(b.Len, from+ReadBatchRows))
		err := e.iw.Write(rec)
		rec.Release()
		if err != nil {
			return e.spoolErr(err)
		}
	}
	return e.spoolErr(nil)
}

func (e *arrowEncoder) spoolErr(err error) error {
	if e.sink.err != nil {
		return fmt.Errorf("spool file %s: %w", e.spool.Name(), e.sink.err)
	}
	return err
}

func (e *arrowEncoder) finish(md []keyValue) error {
	if err := e.iw.Close(); err != nil {
		return e.spoolErr(err)
	}
	if err := e.spoolBuf.Flush(); err != nil {
		return e.spoolErr(err)
	}
	if _, err := e.spool.Seek(0, io.SeekStart); err != nil {
		return err
	}
	keys := make([]string, len(md))
	vals := make([]string, len(md))
	for i, kv := range md {
		keys[i], vals[i] = kv.key, kv.value
	}
	meta := arrow.NewMetadata(keys, vals)
	final := arrow.NewSchema(e.s.arrow.Fields(), &meta)
	opts := []ipc.Option{ipc.WithSchema(final), ipc.WithAllocator(memory.DefaultAllocator)}
	if e.compress {
		opts = append(opts, ipc.WithZstd())
	}
	fw, err := ipc.NewFileWriter(e.out, opts...)
	if err != nil {
		return err
	}
	rd, err := ipc.NewReader(bufio.NewReaderSize(e.spool, 1<<20), ipc.WithAllocator(memory.DefaultAllocator))
	if err != nil {
		return fmt.Errorf("reading back spool file %s: %w", e.spool.Name(), err)
	}
	defer rd.Release()
	for rd.Next() {
		rec := rd.RecordBatch()
		// The spool's schema has no metadata; rebuild the batch on the
		// final schema (the columns are shared, not copied).
		out := array.NewRecordBatch(final, rec.Columns(), rec.NumRows())
		err := fw.Write(out)
		out.Release()
		if err != nil {
			return err
		}
	}
	if err := rd.Err(); err != nil && !errors.Is(err, io.EOF) {
		return fmt.Errorf("reading back spool file %s: %w", e.spool.Name(), err)
	}
	if err := fw.Close(); err != nil {
		return err
	}
	e.abort()
	return nil
}

func (e *arrowEncoder) abort() {
	if e.spool != nil {
		name := e.spool.Name()
		_ = e.spool.Close()
		_ = os.Remove(name)
		e.spool = nil
	}
}

// recordBuilder wraps batch slices as Arrow arrays without copying the
// values; validity bitmaps are built in reused scratch space, so a record
// is valid only until the next call.
type recordBuilder struct {
	s    *Schema
	bits [][]byte
	arrs []arrow.Array
}

func newRecordBuilder(s *Schema) recordBuilder {
	return recordBuilder{s: s, bits: make([][]byte, len(s.cols)), arrs: make([]arrow.Array, len(s.cols))}
}

// bitmap packs valid[from:to] into the scratch bitmap of column i and
// returns it with the number of missing values (nil when none is missing).
func (rb *recordBuilder) bitmap(i int, valid []bool) (*memory.Buffer, int) {
	if valid == nil {
		return nil, 0
	}
	bits := resize(rb.bits[i], (len(valid)+7)/8)
	clear(bits)
	nulls := 0
	for k, v := range valid {
		if v {
			bits[k>>3] |= 1 << (k & 7)
		} else {
			nulls++
		}
	}
	rb.bits[i] = bits
	if nulls == 0 {
		return nil, 0
	}
	return memory.NewBufferBytes(bits), nulls
}

func (rb *recordBuilder) record(b *Batch, from, to int) arrow.RecordBatch {
	n := to - from
	for i, c := range rb.s.cols {
		d := &b.Cols[i]
		var valid []bool
		if d.Valid != nil {
			valid = d.Valid[from:to]
		}
		nullBuf, nulls := rb.bitmap(i, valid)
		var vals []byte
		switch c.Kind {
		case Float32:
			vals = arrow.Float32Traits.CastToBytes(d.F32[from:to])
		case Float64:
			vals = arrow.Float64Traits.CastToBytes(d.F64[from:to])
		case Int64:
			vals = arrow.Int64Traits.CastToBytes(d.I64[from:to])
		case Category:
			vals = arrow.Uint8Traits.CastToBytes(d.Cat[from:to])
		}
		data := array.NewData(c.arrowType(), n, []*memory.Buffer{nullBuf, memory.NewBufferBytes(vals)}, nil, nulls, 0)
		if c.Kind == Category {
			data.SetDictionary(rb.s.dicts[i].Data())
		}
		rb.arrs[i] = array.MakeFromData(data)
		data.Release()
	}
	rec := array.NewRecordBatch(rb.s.arrow, rb.arrs, int64(n))
	for i, a := range rb.arrs {
		a.Release()
		rb.arrs[i] = nil
	}
	return rec
}
