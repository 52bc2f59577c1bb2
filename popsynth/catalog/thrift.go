package catalog

import (
	"errors"
	"fmt"
)

// thriftReader reads the Thrift compact protocol, in which Parquet writes
// its footer and page headers (Apache Thrift, "Thrift Compact protocol
// encoding", doc/specs/thrift-compact-protocol.md), checking every length
// against the bytes left: a string or a list may not claim more bytes than
// remain, so nothing read here, nor by arrow-go after these checks, can
// allocate more than a small multiple of the buffer.
type thriftReader struct {
	b     []byte
	pos   int
	depth int
}

// Compact-protocol type codes.
const (
	tcStop      = 0
	tcTrue      = 1
	tcFalse     = 2
	tcByte      = 3
	tcI16       = 4
	tcI32       = 5
	tcI64       = 6
	tcDouble    = 7
	tcBinary    = 8
	tcList      = 9
	tcSet       = 10
	tcMap       = 11
	tcStruct    = 12
	tcUUID      = 13
	thriftDepth = 64 // nesting limit, as in the Thrift libraries
)

// errThriftShort reports that the data ended inside a structure: for a
// page header read through a window, a larger window may hold it.
var errThriftShort = errors.New("thrift data end inside a structure")

func (t *thriftReader) byte() (byte, error) {
	if t.pos >= len(t.b) {
		return 0, errThriftShort
	}
	t.pos++
	return t.b[t.pos-1], nil
}

func (t *thriftReader) varint() (uint64, error) {
	var v uint64
	for shift := 0; shift < 70; shift += 7 {
		c, err := t.byte()
		if err != nil {
			return 0, err
		}
		v |= uint64(c&0x7f) << shift
		if c < 0x80 {
			return v, nil
		}
	}
	return 0, fmt.Errorf("thrift varint longer than 10 bytes at offset %d", t.pos)
}

// i32 reads a zigzag varint as the Thrift library does: the low 32 bits.
func (t *thriftReader) i32() (int32, error) {
	v, err := t.varint()
	u := uint32(v)
	return int32(u>>1) ^ -int32(u&1), err
}

func (t *thriftReader) skipBytes(n uint64) error {
	if left := uint64(len(t.b) - t.pos); n > left {
		err := fmt.Errorf("thrift length %d at offset %d exceeds the %d bytes left", n, t.pos, left)
		if left > 0 && n <= 1<<31 {
			err = fmt.Errorf("%w: %w", errThriftShort, err) // a larger window may hold it
		}
		return err
	}
	t.pos += int(n)
	return nil
}

// field reads a field header; typ is tcStop at the end of a struct.
func (t *thriftReader) field(last *int16) (typ byte, id int16, err error) {
	c, err := t.byte()
	if err != nil || c == tcStop {
		return tcStop, 0, err
	}
	typ = c & 0x0f
	if d := c >> 4; d != 0 {
		*last += int16(d)
	} else {
		v, err := t.varint()
		if err != nil {
			return 0, 0, err
		}
		u := uint16(v)
		*last = int16(u>>1) ^ -int16(u&1)
	}
	return typ, *last, nil
}

// minSize is the fewest bytes a value of compact type typ takes.
func minSize(typ byte) uint64 {
	switch typ {
	case tcDouble:
		return 8
	case tcUUID:
		return 16
	}
	return 1
}

// list reads a list or set header and checks that its elements can fit in
// the bytes left.
func (t *thriftReader) list() (elem byte, n int, err error) {
	c, err := t.byte()
	if err != nil {
		return 0, 0, err
	}
	elem = c & 0x0f
	size := uint64(c >> 4)
	if size == 15 {
		if size, err = t.varint(); err != nil {
			return 0, 0, err
		}
	}
	if size > 0 && (elem == tcStop || elem > tcUUID) {
		return 0, 0, fmt.Errorf("thrift list of unknown type %d at offset %d", elem, t.pos)
	}
	left := uint64(len(t.b) - t.pos)
	if size > left/minSize(elem) {
		err := fmt.Errorf("thrift list of %d elements at offset %d exceeds the %d bytes left", size, t.pos, left)
		if left > 0 && size <= 1<<31 {
			err = fmt.Errorf("%w: %w", errThriftShort, err) // a larger window may hold it
		}
		return 0, 0, err
	}
	return elem, int(size), nil
}

// skip skips a value of type typ; in a list, booleans take a byte.
func (t *thriftReader) skip(typ byte, inList bool) error {
	switch typ {
	case tcTrue, tcFalse:
		if inList {
			_, err := t.byte()
			return err
		}
		return nil
	case tcByte:
		_, err := t.byte()
		return err
	case tcI16, tcI32, tcI64:
		_, err := t.varint()
		return err
	case tcDouble:
		return t.skipBytes(8)
	case tcUUID:
		return t.skipBytes(16)
	case tcBinary:
		n, err := t.varint()
		if err != nil {
			return err
		}
		return t.skipBytes(n)
	case tcList, tcSet:
		elem, n, err := t.list()
		if err != nil {
			return err
		}
		for range n {
			if err := t.skip(elem, true); err != nil {
				return err
			}
		}
		return nil
	case tcMap:
		n, err := t.varint()
		if err != nil || n == 0 {
			return err
		}
		kv, err := t.byte()
		if err != nil {
			return err
		}
		k, v := kv>>4, kv&0x0f
		if k == tcStop || k > tcUUID || v == tcStop || v > tcUUID {
			return fmt.Errorf("thrift map of unknown types %d, %d at offset %d", k, v, t.pos)
		}
		if left := uint64(len(t.b) - t.pos); n > left/(minSize(k)+minSize(v)) {
			return fmt.Errorf("thrift map of %d entries at offset %d exceeds the %d bytes left", n, t.pos, left)
		}
		for range n {
			if err := t.skip(k, true); err != nil {
				return err
			}
			if err := t.skip(v, true); err != nil {
				return err
			}
		}
		return nil
	case tcStruct:
		return t.structure(nil)
	}
	return fmt.Errorf("thrift value of unknown type %d at offset %d", typ, t.pos)
}

// structure reads a struct, passing each field to visit (if not nil),
// which reads it and returns true, or returns false to have it skipped.
func (t *thriftReader) structure(visit func(typ byte, id int16) (bool, error)) error {
	if t.depth++; t.depth > thriftDepth {
		return fmt.Errorf("thrift structures nested deeper than %d at offset %d", thriftDepth, t.pos)
	}
	defer func() { t.depth-- }()
	var last int16
	for {
		typ, id, err := t.field(&last)
		if err != nil {
			return err
		}
		if typ == tcStop {
			return nil
		}
		if visit != nil {
			done, err := visit(typ, id)
			if err != nil {
				return err
			}
			if done {
				continue
			}
		}
		if err := t.skip(typ, false); err != nil {
			return err
		}
	}
}
