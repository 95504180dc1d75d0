package analyze

import (
	"fmt"
	"os"
	"syscall"
	"unsafe"
)

// spillLow: on Linux the tracker's reduced-rate signal goes to a
// temporary file, mapped read-only when tracked.
const spillLow = true

// mapLow maps the first n float32 of f read-only (shared, file-backed)
// and returns them with the function that unmaps them.
func mapLow(f *os.File, n int) ([]float32, func(), error) {
	if n <= 0 {
		return nil, func() {}, nil
	}
	st, err := f.Stat()
	if err != nil {
		return nil, nil, err
	}
	if st.Size() < 4*int64(n) {
		return nil, nil, fmt.Errorf("%d bytes written, %d expected", st.Size(), 4*int64(n))
	}
	b, err := syscall.Mmap(int(f.Fd()), 0, 4*n, syscall.PROT_READ, syscall.MAP_SHARED)
	if err != nil {
		return nil, nil, err
	}
	syscall.Madvise(b, syscall.MADV_SEQUENTIAL) // advice only: no error matters
	return unsafe.Slice((*float32)(unsafe.Pointer(&b[0])), n), func() { syscall.Munmap(b) }, nil
}
