package catalog

import (
	"bytes"
	"encoding/json"
	"io"
	"slices"
	"strconv"
	"strings"
)

// csvEncoder writes comma-separated text:
//
//	# corefall.schema_version="1"          metadata, one "# key=<JSON string>" line per key
//	# corefall.columns="[{...}]"           the column descriptions (name, unit, doc, kind, ...)
//	system_id,metallicity,...              header
//	0,0.02,...                             rows; a missing value is an empty cell
//	# corefall.systems="1000000"           metadata set after the rows began
//
// Floats are written in the shortest form that reads back to the same
// float32 (or float64) value; categories as their words. Values never need
// quoting. pandas reads it with read_csv(path, comment='#').
type csvEncoder struct {
	out       io.Writer
	s         *Schema
	meta      []keyValue // metadata for the top, until the header is written
	late      map[string]string
	headerOut bool
	buf       []byte
}

func newCSVEncoder(out io.Writer, s *Schema, md []keyValue) (*csvEncoder, error) {
	return &csvEncoder{out: out, s: s, meta: md, late: map[string]string{}, buf: make([]byte, 0, 1<<16)}, nil
}

func (e *csvEncoder) setMeta(key, value string) {
	if !e.headerOut {
		for i := range e.meta {
			if e.meta[i].key == key {
				e.meta[i].value = value
				return
			}
		}
		e.meta = append(e.meta, keyValue{key, value})
		slices.SortFunc(e.meta, func(a, b keyValue) int { return strings.Compare(a.key, b.key) })
		return
	}
	e.late[key] = value
}

// appendComment appends a "# key=<JSON string>" line.
func appendComment(dst []byte, key, value string) []byte {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	_ = enc.Encode(value) // a string always encodes; Encode adds the newline
	dst = append(dst, "# "...)
	dst = append(dst, key...)
	dst = append(dst, '=')
	return append(dst, b.Bytes()...)
}

func (e *csvEncoder) header() error {
	if e.headerOut {
		return nil
	}
	e.headerOut = true
	b := e.buf[:0]
	for _, kv := range e.meta {
		b = appendComment(b, kv.key, kv.value)
	}
	b = appendComment(b, csvColumnsKey, string(e.s.marshalJSON()))
	for i, c := range e.s.cols {
		if i > 0 {
			b = append(b, ',')
		}
		b = append(b, c.Name...)
	}
	b = append(b, '\n')
	_, err := e.out.Write(b)
	e.buf = b[:0]
	return err
}

func (e *csvEncoder) write(bt *Batch) error {
	if err := e.header(); err != nil {
		return err
	}
	b := e.buf[:0]
	cols := e.s.cols
	for r := 0; r < bt.Len; r++ {
		for i := range cols {
			if i > 0 {
				b = append(b, ',')
			}
			d := &bt.Cols[i]
			if d.Valid != nil && !d.Valid[r] {
				continue
			}
			switch cols[i].Kind {
			case Float32:
				b = strconv.AppendFloat(b, float64(d.F32[r]), 'g', -1, 32)
			case Float64:
				b = strconv.AppendFloat(b, d.F64[r], 'g', -1, 64)
			case Int64:
				b = strconv.AppendInt(b, d.I64[r], 10)
			case Category:
				b = append(b, cols[i].Categories[d.Cat[r]]...)
			}
		}
		b = append(b, '\n')
		if len(b) >= 1<<16 {
			if _, err := e.out.Write(b); err != nil {
				return err
			}
			b = b[:0]
		}
	}
	e.buf = b[:0]
	if len(b) > 0 {
		_, err := e.out.Write(b)
		return err
	}
	return nil
}

func (e *csvEncoder) finish([]keyValue) error {
	if err := e.header(); err != nil {
		return err
	}
	keys := make([]string, 0, len(e.late))
	for k := range e.late {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	b := e.buf[:0]
	for _, k := range keys {
		b = appendComment(b, k, e.late[k])
	}
	_, err := e.out.Write(b)
	return err
}

func (e *csvEncoder) abort() {}
