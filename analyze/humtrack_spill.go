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
// temporary file as they come, through a small buffer, and read takes
// back the stretch the tracker works on: the Go heap holds only the
// buffers, whatever the file's length. Without spilling, or when no
// temporary file can be created, the samples stay on the heap.
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

// finish writes what is left in the buffers; after it, read may be
// called.
func (s *lowStore) finish() error {
	if s.inMem || s.files == nil { // all in the buffers
		return nil
	}
	for c := range s.mem {
		s.flush(c)
	}
	if s.err != nil {
		return fmt.Errorf("analyze: %w: writing the reduced-rate signal to a temporary file in %s: %w; free space there or set TMPDIR to a directory with room", ErrTrackSpill, os.TempDir(), s.err)
	}
	return nil
}

// read fills dst with channel c's samples from index from on (after
// finish). The samples are read from the temporary file into dst, so the
// process holds only what it asks for, however long the signal.
func (s *lowStore) read(c, from int, dst []float32) error {
	if len(dst) == 0 {
		return nil
	}
	if s.inMem || s.files == nil {
		if copy(dst, s.mem[c][from:]) < len(dst) {
			return fmt.Errorf("analyze: %w: %d samples asked from %d, %d kept", ErrTrackSpill, len(dst), from, len(s.mem[c]))
		}
		return nil
	}
	b := unsafe.Slice((*byte)(unsafe.Pointer(&dst[0])), 4*len(dst))
	if _, err := s.files[c].ReadAt(b, 4*int64(from)); err != nil {
		return fmt.Errorf("analyze: %w: reading the reduced-rate signal back from its temporary file in %s: %w", ErrTrackSpill, os.TempDir(), err)
	}
	return nil
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
