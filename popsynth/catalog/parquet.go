package catalog

import (
	"bytes"
	"context"
	"encoding/base64"
	"fmt"
	"io"
	"sync"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/ipc"
	"github.com/apache/arrow-go/v18/arrow/memory"
	"github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/metadata"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
)

// parquetZstdLevel is the zstd level of Parquet pages: level 1, the fastest.
// Random-looking float32 physics data barely compresses at any level, so a
// higher level costs time for little gain.
const parquetZstdLevel = 1

// parquetEncoder stages the rows of one row group in plain Go slices (reused
// from one row group to the next) and, when the row group is full or the
// file ends, encodes each column in one call. With one worker the columns
// are written in turn straight to the file; with more, they are encoded
// concurrently into per-column memory buffers, which the row group then
// writes out in column order. Page boundaries depend only on the staged
// values, so the bytes are the same either way.
type parquetEncoder struct {
	fw      *file.Writer
	rgRows  int
	maxRows int
	cols    []pqColumn
	workers int
}

// pqColumn holds the staged values of one column.
type pqColumn struct {
	c    Column
	ctx  context.Context
	dict arrow.Array // Category: the full category set
	f32  []float32   // Float32; for a nullable column only the present values
	f64  []float64   // Float64; likewise
	i64  []int64
	cat  []uint8 // Category: one index per row
	def  []int16 // nullable: definition level per row, 1 present, 0 missing
	bits []byte  // nullable Category: validity bitmap built at flush
}

func newParquetEncoder(w io.Writer, s *Schema, opt Options) (*parquetEncoder, error) {
	props := []parquet.WriterProperty{
		parquet.WithCompression(compress.Codecs.Zstd),
		parquet.WithCompressionLevel(parquetZstdLevel),
		parquet.WithDictionaryDefault(false),
		parquet.WithMaxRowGroupLength(int64(opt.RowGroupRows)),
	}
	for _, c := range s.cols {
		switch c.Kind {
		case Float32, Float64:
			// Systems are in random order, so per-row-group min/max
			// cannot skip anything; they would cost ~8% of the time.
			props = append(props, parquet.WithStatsFor(c.Name, false))
		case Category:
			props = append(props, parquet.WithStatsFor(c.Name, false), parquet.WithDictionaryFor(c.Name, true))
		case Int64:
			props = append(props, parquet.WithEncodingFor(c.Name, parquet.Encodings.DeltaBinaryPacked))
		}
	}
	wprops := parquet.NewWriterProperties(props...)
	aprops := pqarrow.NewArrowWriterProperties(pqarrow.WithStoreSchema())
	pqs, err := pqarrow.ToParquet(s.arrow, wprops, aprops)
	if err != nil {
		return nil, err
	}
	// Store the Arrow schema as pqarrow.WithStoreSchema does, so that
	// Arrow-based readers get float32 and dictionary (categorical) columns
	// and the units in the field metadata.
	var ser bytes.Buffer
	iw := ipc.NewWriter(&ser, ipc.WithSchema(s.arrow))
	if err := iw.Close(); err != nil {
		return nil, err
	}
	kv := metadata.KeyValueMetadata{}
	if err := kv.Append("ARROW:schema", base64.StdEncoding.EncodeToString(ser.Bytes())); err != nil {
		return nil, err
	}
	fw, err := file.NewParquetWriterWithError(w, pqs.Root(), file.WithWriterProps(wprops), file.WithWriteMetadata(kv))
	if err != nil {
		return nil, err
	}
	e := &parquetEncoder{fw: fw, maxRows: opt.RowGroupRows, cols: make([]pqColumn, len(s.cols)), workers: max(opt.Workers, 1)}
	for i, c := range s.cols {
		e.cols[i] = pqColumn{c: c, ctx: pqarrow.NewArrowWriteContext(context.Background(), &aprops), dict: s.dicts[i]}
	}
	return e, nil
}

func (e *parquetEncoder) write(b *Batch) error {
	for from := 0; from < b.Len; {
		to := min(b.Len, from+e.maxRows-e.rgRows)
		for i := range e.cols {
			e.cols[i].stage(&b.Cols[i], from, to, e.maxRows)
		}
		e.rgRows += to - from
		from = to
		if e.rgRows == e.maxRows {
			if err := e.flush(); err != nil {
				return err
			}
		}
	}
	return nil
}

// grow makes room for n more values in s without exceeding limit values
// in total (the row-group size), doubling as needed: append alone grows
// large slices by 1.25x, which copies a staged column several times over.
func grow[T any](s []T, n, limit int) []T {
	if len(s)+n <= cap(s) {
		return s
	}
	c := min(max(2*cap(s), len(s)+n, 1024), max(limit, len(s)+n))
	out := make([]T, len(s), c)
	copy(out, s)
	return out
}

// stage appends rows [from, to) of d.
func (pc *pqColumn) stage(d *ColumnData, from, to, limit int) {
	n := to - from
	var valid []bool
	if pc.c.Nullable {
		pc.def = grow(pc.def, n, limit)
		if d.Valid != nil {
			valid = d.Valid[from:to]
			for _, v := range valid {
				var l int16
				if v {
					l = 1
				}
				pc.def = append(pc.def, l)
			}
		} else {
			for range to - from {
				pc.def = append(pc.def, 1)
			}
		}
	}
	switch pc.c.Kind {
	case Float32:
		pc.f32 = grow(pc.f32, n, limit)
		if valid == nil {
			pc.f32 = append(pc.f32, d.F32[from:to]...)
		} else {
			for k, v := range d.F32[from:to] {
				if valid[k] {
					pc.f32 = append(pc.f32, v)
				}
			}
		}
	case Float64:
		pc.f64 = grow(pc.f64, n, limit)
		if valid == nil {
			pc.f64 = append(pc.f64, d.F64[from:to]...)
		} else {
			for k, v := range d.F64[from:to] {
				if valid[k] {
					pc.f64 = append(pc.f64, v)
				}
			}
		}
	case Int64:
		pc.i64 = append(grow(pc.i64, n, limit), d.I64[from:to]...)
	case Category:
		pc.cat = grow(pc.cat, n, limit)
		pc.cat = append(pc.cat, d.Cat[from:to]...)
	}
}

// flush encodes the staged row group.
func (e *parquetEncoder) flush() error {
	if e.rgRows == 0 {
		return nil
	}
	errs := make([]error, len(e.cols))
	if e.workers == 1 {
		rg, err := e.fw.AppendRowGroupChecked()
		if err != nil {
			return err
		}
		for i := range e.cols {
			cw, err := rg.NextColumn()
			if err != nil {
				return err
			}
			if err := e.cols[i].writeTo(cw, true); err != nil {
				return err
			}
		}
		if err := rg.Close(); err != nil {
			return err
		}
	} else {
		rg, err := e.fw.AppendBufferedRowGroupChecked()
		if err != nil {
			return err
		}
		var wg sync.WaitGroup
		next := make(chan int, len(e.cols))
		for i := range e.cols {
			next <- i
		}
		close(next)
		for range min(e.workers, len(e.cols)) {
			wg.Go(func() {
				for i := range next {
					cw, err := rg.Column(i)
					if err == nil {
						err = e.cols[i].writeTo(cw, false)
					}
					errs[i] = err
				}
			})
		}
		wg.Wait()
		for _, err := range errs {
			if err != nil {
				return err
			}
		}
		if err := rg.Close(); err != nil {
			return err
		}
	}
	for i := range e.cols {
		e.cols[i].reset()
	}
	e.rgRows = 0
	return nil
}

func (pc *pqColumn) reset() {
	pc.f32, pc.f64, pc.i64, pc.cat, pc.def = pc.f32[:0], pc.f64[:0], pc.i64[:0], pc.cat[:0], pc.def[:0]
}

// writeTo writes the staged values as one column chunk, and closes the
// chunk if asked. (A buffered row group's chunks must be left open: closing
// one copies it to the file, which must happen in column order, in
// rg.Close.)
func (pc *pqColumn) writeTo(cw file.ColumnChunkWriter, close bool) error {
	var def []int16
	if pc.c.Nullable {
		def = pc.def
	}
	var err error
	switch pc.c.Kind {
	case Float32:
		_, err = cw.(*file.Float32ColumnChunkWriter).WriteBatch(pc.f32, def, nil)
	case Float64:
		_, err = cw.(*file.Float64ColumnChunkWriter).WriteBatch(pc.f64, def, nil)
	case Int64:
		_, err = cw.(*file.Int64ColumnChunkWriter).WriteBatch(pc.i64, nil, nil)
	case Category:
		arr := pc.categoryArray()
		err = pqarrow.WriteArrowToColumn(pc.ctx, cw, arr, def, nil, pc.c.Nullable)
		arr.Release()
	}
	if err == nil && close {
		err = cw.Close()
	}
	if err != nil {
		return fmt.Errorf("column %q: %w", pc.c.Name, err)
	}
	return nil
}

// categoryArray wraps the staged indices, without copying them, as a
// dictionary<int8, utf8> array over the column's full category set, so that
// every row group carries the same dictionary and stays dictionary-encoded.
func (pc *pqColumn) categoryArray() arrow.Array {
	var nullBuf *memory.Buffer
	nulls := 0
	if pc.c.Nullable {
		pc.bits = resize(pc.bits, (len(pc.def)+7)/8)
		clear(pc.bits)
		for k, l := range pc.def {
			if l == 1 {
				pc.bits[k>>3] |= 1 << (k & 7)
			} else {
				nulls++
			}
		}
		if nulls > 0 {
			nullBuf = memory.NewBufferBytes(pc.bits)
		}
	}
	data := array.NewData(categoryDictType, len(pc.cat),
		[]*memory.Buffer{nullBuf, memory.NewBufferBytes(arrow.Uint8Traits.CastToBytes(pc.cat))}, nil, nulls, 0)
	data.SetDictionary(pc.dict.Data())
	defer data.Release()
	return array.NewDictionaryData(data)
}

func (e *parquetEncoder) finish(md []keyValue) error {
	if err := e.flush(); err != nil {
		return err
	}
	for _, kv := range md {
		if err := e.fw.AppendKeyValueMetadata(kv.key, kv.value); err != nil {
			return err
		}
	}
	return e.fw.Close()
}

func (e *parquetEncoder) abort() {}
