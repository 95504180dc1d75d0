package analyze

import (
	"errors"
	"fmt"
	"os"
	"unsafe"
)

// lowFlush is the write buffer of each channel's reduced-rate signal, in
// samples (64 KiB).
const lowFlush = 16384

// lowStore keeps the reduced-rate signal of each channel. Where the
// system allows (spillLow), each channel's samples go to an unlinked
// temporary file as they come, through a small buffer, and view maps the
// files read-only: the pages are file-backed, so the kernel can drop
// them under memory pressure and the Go heap holds only the buffers,
// whatever the file's length. Without spilling, or when no temporary
// file can be created, the samples stay on the heap.
type lowStore struct {
	mem   [][]float32 // per channel: the unwritten samples, or all of them in memory
	files []*os.File  // per channel, once the first buffer is written; nil in memory
	inMem bool        // no spilling: mem holds everything
	err   error       // the first failed write
}

func newLowStore(channels int) *lowStore {
	s := &lowStore{mem: make([][]float32, channels), inMem: !spillLow}
	if spillLow {
		for c := range s.mem {
			s.mem[c] = make([]float32, 0, lowFlush)
		}
	}
	return s
}

// add appends v to channel c.
func (s *lowStore) add(c int, v float32) {
	s.mem[c] = append(s.mem[c], v)
	if !s.inMem && len(s.mem[c]) >= lowFlush {
		s.flush(c)
	}
}

// flush writes channel c's buffer to its file, creating the files at the
// first call; if they cannot be created, everything stays in memory.
func (s *lowStore) flush(c int) {
	if s.files == nil {
		for range s.mem {
			f, err := os.CreateTemp("", "wavsieve-track-*")
			if err != nil {
				s.closeFiles()
				s.inMem = true
				return
			}
			// Unlinked at once: the space is freed when the file is closed,
			// whatever happens to the process.
			os.Remove(f.Name())
			s.files = append(s.files, f)
		}
	}
	m := s.mem[c]
	if len(m) > 0 && s.err == nil {
		if _, err := s.files[c].Write(unsafe.Slice((*byte)(unsafe.Pointer(&m[0])), 4*len(m))); err != nil {
			s.err = err
		}
	}
	s.mem[c] = m[:0]
}

// view returns the n samples of each channel and the function that
// releases them (nothing may use the slices afterwards).
func (s *lowStore) view(n int) ([][]float32, func(), error) {
	if s.inMem {
		return s.mem, func() {}, nil
	}
	if s.files == nil { // nothing written yet: all in the buffers
		return s.mem, func() {}, nil
	}
	for c := range s.mem {
		s.flush(c)
	}
	if s.err != nil {
		return nil, nil, fmt.Errorf("analyze: %w: writing the reduced-rate signal to a temporary file in %s: %w; free space there or set TMPDIR to a directory with room", ErrTrackSpill, os.TempDir(), s.err)
	}
	out := make([][]float32, len(s.files))
	var unmaps []func()
	release := func() {
		for _, u := range unmaps {
			u()
		}
	}
	for c, f := range s.files {
		x, unmap, err := mapLow(f, n)
		if err != nil {
			release()
			return nil, nil, fmt.Errorf("analyze: %w: mapping the reduced-rate signal in %s: %w", ErrTrackSpill, os.TempDir(), err)
		}
		out[c] = x
		unmaps = append(unmaps, unmap)
	}
	return out, release, nil
}

// close frees the files and buffers.
func (s *lowStore) close() {
	s.closeFiles()
	s.mem = nil
}

func (s *lowStore) closeFiles() {
	for _, f := range s.files {
		f.Close()
	}
	s.files = nil
}

// ErrTrackSpill is wrapped by the error of a Tracker's Result when its
// temporary file could not be written or read.
var ErrTrackSpill = errors.New("hum tracker temporary file failed")
