package process

import (
	"syscall"
	"unsafe"
)

// mapSamples returns n zeroed float64 outside the Go heap, in an
// anonymous mapping the kernel backs as it is touched, with transparent
// huge pages where it allows them (madvise mode): a fault per 2 MiB
// instead of per 4 KiB, which on a 2-core test machine is the
// difference between about 10 ms and 400 ms for the 112 MiB of an
// in-memory spill. The memory holds no Go pointers. release unmaps it;
// nothing may use the slice afterwards. If the mapping fails, the
// memory comes from the Go heap.
func mapSamples(n int) (x []float64, release func()) {
	if n == 0 {
		return nil, func() {}
	}
	const huge = 2 << 20
	size := 8*n + huge // room to start on a huge-page boundary
	b, err := syscall.Mmap(-1, 0, size, syscall.PROT_READ|syscall.PROT_WRITE, syscall.MAP_ANON|syscall.MAP_PRIVATE)
	if err != nil {
		return make([]float64, n), func() {}
	}
	mappedBytes.Add(int64(size))
	skip := int((huge - uintptr(unsafe.Pointer(&b[0]))%huge) % huge)
	syscall.Madvise(b[skip:], syscall.MADV_HUGEPAGE) // advice only: no error matters
	x = unsafe.Slice((*float64)(unsafe.Pointer(&b[skip])), n)
	return x, func() {
		syscall.Munmap(b)
		mappedBytes.Add(-int64(size))
	}
}

// madvPopulateWrite is MADV_POPULATE_WRITE (Linux 5.14), not in package
// syscall.
const madvPopulateWrite = 23

// prefault maps the pages of p (memory of mapSamples) ahead of use.
// Older kernels refuse the advice; the pages are then mapped when first
// touched, as without it.
func prefault(p []float64) {
	syscall.Madvise(asBytes(p), madvPopulateWrite)
}
