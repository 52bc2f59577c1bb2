package catalog

import (
	"fmt"

	"github.com/apache/arrow-go/v18/arrow/memory"
)

// cappedAllocator is the memory.Allocator given to arrow-go when reading a
// file: it refuses, by panicking (which guard turns into an error), any
// single allocation larger than limit bytes. It is the last guard behind
// the structural checks, against a declared length that they do not
// cover; arrow-go also allocates with make, which it cannot see.
type cappedAllocator struct {
	limit int
}

// newCappedAllocator returns the allocator for reading a file of size
// bytes: 256 MiB plus 64 times the file size, more than any buffer of a
// valid file needs (a compressed buffer expands at most 64 times beyond
// 1 MiB, a page at most to 64 MiB).
func newCappedAllocator(size int64) *cappedAllocator {
	return &cappedAllocator{limit: int(min(256<<20+64*size, 1<<62))}
}

func (a *cappedAllocator) check(n int) {
	if n > a.limit {
		panic(fmt.Errorf("allocation of %d bytes exceeds the %d allowed for this file", n, a.limit))
	}
}

func (a *cappedAllocator) Allocate(n int) []byte {
	a.check(n)
	return memory.DefaultAllocator.Allocate(n)
}

func (a *cappedAllocator) Reallocate(n int, b []byte) []byte {
	a.check(n)
	return memory.DefaultAllocator.Reallocate(n, b)
}

func (a *cappedAllocator) Free(b []byte) { memory.DefaultAllocator.Free(b) }
