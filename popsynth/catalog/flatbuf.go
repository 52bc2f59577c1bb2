package catalog

import (
	"encoding/binary"
	"fmt"
)

// fbuf is a FlatBuffers buffer whose structure is checked, from its raw
// bytes, before anything else decodes it: every table, vtable, offset,
// vector and string must lie inside the buffer. It follows the FlatBuffers
// binary format (flatbuffers.dev, "FlatBuffers internals"): a table starts
// with an int32 offset back to its vtable; the vtable holds its own size and
// the table's inline size (uint16 each) and then one uint16 offset per field
// slot (0: absent); references are uint32 offsets forward from where they
// are stored; a vector or string is a uint32 count followed by its elements.
type fbuf struct {
	b     []byte
	what  string // the buffer's name in error messages
	index int    // appended to what when >= 0
	// tables counts the tables visited, which bounds the work of a walk even
	// when corrupt offsets make several references point at one table.
	tables int
}

// fbTable is a checked table: its start and its whole vtable lie inside
// the buffer.
type fbTable struct {
	pos   int // start of the table (its vtable offset)
	vt    int // start of the vtable
	slots int // number of field slots in the vtable
}

func (f *fbuf) errf(format string, args ...any) error {
	what := f.what
	if f.index >= 0 {
		what = fmt.Sprintf("%s %d metadata", f.what, f.index)
	}
	return fmt.Errorf("%s: "+format, append([]any{what}, args...)...)
}

func (f *fbuf) u16(p int) int   { return int(binary.LittleEndian.Uint16(f.b[p:])) }
func (f *fbuf) u32(p int) int64 { return int64(binary.LittleEndian.Uint32(f.b[p:])) }
func (f *fbuf) i64(p int) int64 { return int64(binary.LittleEndian.Uint64(f.b[p:])) }

// root returns the root table, found through the uint32 at the start.
func (f *fbuf) root() (fbTable, error) {
	if len(f.b) < 8 {
		return fbTable{}, f.errf("%d bytes are too few for a flatbuffer (at least 8)", len(f.b))
	}
	return f.table(f.u32(0), "root table")
}

// table checks the table starting at pos.
func (f *fbuf) table(pos int64, name string) (fbTable, error) {
	f.tables++
	// Every distinct table takes at least 4 bytes, so more visits than that
	// mean shared or looping references.
	if f.tables > len(f.b)/4+1 {
		return fbTable{}, f.errf("%s: more tables than fit in %d bytes (references are shared or loop)", name, len(f.b))
	}
	n := int64(len(f.b))
	if pos < 0 || pos+4 > n {
		return fbTable{}, f.errf("%s at offset %d lies outside the %d-byte buffer", name, pos, n)
	}
	vt := pos - int64(int32(f.u32(int(pos))))
	if vt < 0 || vt+4 > n {
		return fbTable{}, f.errf("%s at offset %d: its vtable offset %d lies outside the %d-byte buffer", name, pos, vt, n)
	}
	// The vtable's second entry, the table's inline size, is not checked:
	// the Go FlatBuffers builder shares a vtable between tables with the
	// same field offsets but different sizes, so fields are checked
	// against the buffer instead, as the FlatBuffers C++ verifier does.
	vtSize := int64(f.u16(int(vt)))
	if vtSize < 4 || vtSize%2 != 0 || vt+vtSize > n {
		return fbTable{}, f.errf("%s at offset %d: vtable of %d bytes at offset %d does not fit in the %d-byte buffer (it needs an even size of at least 4)", name, pos, vtSize, vt, n)
	}
	return fbTable{pos: int(pos), vt: int(vt), slots: int(vtSize-4) / 2}, nil
}

// slot returns the position of field slot i of t, checked to hold size
// bytes inside the buffer, or -1 when the field is absent.
func (f *fbuf) slot(t fbTable, i, size int, name string) (int, error) {
	if i >= t.slots {
		return -1, nil
	}
	off := f.u16(t.vt + 4 + 2*i)
	if off == 0 {
		return -1, nil
	}
	p := t.pos + off
	if off < 4 || p+size > len(f.b) {
		return -1, f.errf("field %s (%d bytes) at offset %d of the table at %d lies outside the %d-byte buffer", name, size, off, t.pos, len(f.b))
	}
	return p, nil
}

// scalar checks field slot i of t as a scalar of size bytes.
func (f *fbuf) scalar(t fbTable, i, size int, name string) error {
	_, err := f.slot(t, i, size, name)
	return err
}

// intField returns field slot i of t, an integer of size 1, 2, 4 or 8
// bytes (sign-extended), or def when absent.
func (f *fbuf) intField(t fbTable, i, size int, def int64, name string) (int64, error) {
	p, err := f.slot(t, i, size, name)
	if err != nil || p < 0 {
		return def, err
	}
	switch size {
	case 1:
		return int64(int8(f.b[p])), nil
	case 2:
		return int64(int16(f.u16(p))), nil
	case 4:
		return int64(int32(f.u32(p))), nil
	}
	return f.i64(p), nil
}

// ref follows the reference in field slot i of t and returns its target,
// or -1 when the field is absent.
func (f *fbuf) ref(t fbTable, i int, name string) (int64, error) {
	p, err := f.slot(t, i, 4, name)
	if err != nil || p < 0 {
		return -1, err
	}
	return f.refAt(p, name)
}

// refAt follows the uint32 reference stored at p.
func (f *fbuf) refAt(p int, name string) (int64, error) {
	target := int64(p) + f.u32(p)
	if target+4 > int64(len(f.b)) {
		return -1, f.errf("%s: reference to offset %d lies outside the %d-byte buffer", name, target, len(f.b))
	}
	return target, nil
}

// child returns the table referenced by field slot i of t; ok is false when
// the field is absent.
func (f *fbuf) child(t fbTable, i int, name string) (c fbTable, ok bool, err error) {
	target, err := f.ref(t, i, name)
	if err != nil || target < 0 {
		return fbTable{}, false, err
	}
	c, err = f.table(target, name)
	return c, err == nil, err
}

// vector checks the vector referenced by field slot i of t, with elements
// of elem bytes, and returns the position of its first element and its
// length (0, 0 when the field is absent).
func (f *fbuf) vector(t fbTable, i, elem int, name string) (start, n int, err error) {
	target, err := f.ref(t, i, name)
	if err != nil || target < 0 {
		return 0, 0, err
	}
	count := f.u32(int(target))
	if room := int64(len(f.b)) - target - 4; count > room/int64(elem) {
		return 0, 0, f.errf("%s: %d elements of %d bytes at offset %d do not fit in the %d-byte buffer", name, count, elem, target, len(f.b))
	}
	return int(target) + 4, int(count), nil
}

// str checks the string in field slot i of t.
func (f *fbuf) str(t fbTable, i int, name string) error {
	_, _, err := f.vector(t, i, 1, name)
	return err
}

// tableAt returns element j of a vector of tables starting at start.
func (f *fbuf) tableAt(start, j int, name string) (fbTable, error) {
	target, err := f.refAt(start+4*j, name)
	if err != nil {
		return fbTable{}, err
	}
	return f.table(target, name)
}

// tables checks field slot i of t as a vector of tables, each checked by
// check.
func (f *fbuf) tableVector(t fbTable, i int, name string, check func(fbTable, int) error) error {
	start, n, err := f.vector(t, i, 4, name)
	if err != nil {
		return err
	}
	for j := range n {
		e, err := f.tableAt(start, j, fmt.Sprintf("%s[%d]", name, j))
		if err != nil {
			return err
		}
		if err := check(e, j); err != nil {
			return err
		}
	}
	return nil
}

// scalars checks the scalar fields of t: sizes[i] is the size of slot i,
// or 0 for a slot that is not a scalar.
func (f *fbuf) scalars(t fbTable, name string, sizes ...int) error {
	for i, s := range sizes {
		if s == 0 {
			continue
		}
		if err := f.scalar(t, i, s, fmt.Sprintf("%s.%d", name, i)); err != nil {
			return err
		}
	}
	return nil
}
