package wavio

import (
	"bytes"
	"encoding/binary"
	"errors"
	"io"
	"math"
	"testing"
)

// memWS is an in-memory io.WriteSeeker.
type memWS struct {
	b   []byte
	off int64
}

func (m *memWS) Write(p []byte) (int, error) {
	end := m.off + int64(len(p))
	if end > int64(len(m.b)) {
		if end > int64(cap(m.b)) {
			nb := make([]byte, end, 2*end)
			copy(nb, m.b)
			m.b = nb
		}
		m.b = m.b[:end]
	}
	copy(m.b[m.off:], p)
	m.off = end
	return len(p), nil
}

func (m *memWS) Seek(off int64, whence int) (int64, error) {
	switch whence {
	case io.SeekStart:
	case io.SeekCurrent:
		off += m.off
	case io.SeekEnd:
		off += int64(len(m.b))
	}
	if off < 0 {
		return 0, errors.New("negative offset")
	}
	m.off = off
	return off, nil
}

// signal returns frames x channels interleaved samples of a deterministic
// test signal within full scale: a different sine per channel plus a few
// extreme values (full scale positive and negative) at known places.
func signal(frames, channels int) []float64 {
	x := make([]float64, frames*channels)
	for i := range frames {
		for c := range channels {
			x[i*channels+c] = 0.9 * math.Sin(2*math.Pi*float64(i)*float64(c+1)/97)
		}
	}
	if len(x) > 2 {
		x[0] = -1
		x[1] = 1 - 1.0/(1<<31)
	}
	return x
}

// encodeWAV writes x in format f with no dither and returns the bytes.
func encodeWAV(t testing.TB, f Format, x []float64, chunks []Chunk) []byte {
	t.Helper()
	var m memWS
	w, err := NewWriter(&m, WriterOptions{Format: f, NoDither: true, Chunks: chunks})
	if err != nil {
		t.Fatal(err)
	}
	if err := w.WriteFrames(x); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return m.b
}

// readAll reads every frame of r in blocks of block frames.
func readAll(t testing.TB, r *Reader, block int) []float64 {
	t.Helper()
	ch := r.Format().Channels
	dst := make([]float64, block*ch)
	var out []float64
	for {
		n, err := r.ReadFrames(dst)
		out = append(out, dst[:n*ch]...)
		if err == io.EOF {
			return out
		}
		if err != nil {
			t.Fatal(err)
		}
	}
}

// wavBuilder assembles RIFF files chunk by chunk for the malformed corpus.
type wavBuilder struct {
	buf bytes.Buffer
}

func (b *wavBuilder) raw(p ...byte) *wavBuilder { b.buf.Write(p); return b }
func (b *wavBuilder) str(s string) *wavBuilder  { b.buf.WriteString(s); return b }
func (b *wavBuilder) u16(v uint16) *wavBuilder {
	b.buf.Write(binary.LittleEndian.AppendUint16(nil, v))
	return b
}
func (b *wavBuilder) u32(v uint32) *wavBuilder {
	b.buf.Write(binary.LittleEndian.AppendUint32(nil, v))
	return b
}

// chunk appends a chunk with its declared size and body, and a pad byte
// when pad is true and the body is odd.
func (b *wavBuilder) chunk(id string, size uint32, body []byte, pad bool) *wavBuilder {
	b.str(id).u32(size)
	b.buf.Write(body)
	if pad && len(body)&1 == 1 {
		b.buf.WriteByte(0)
	}
	return b
}

// fmtBody is a plain 16-byte fmt body.
func fmtBody(tag uint16, channels uint16, rate uint32, blockAlign, bits uint16) []byte {
	var w wavBuilder
	w.u16(tag).u16(channels).u32(rate).u32(rate * uint32(blockAlign)).u16(blockAlign).u16(bits)
	return w.buf.Bytes()
}

// riff wraps chunks (already serialised) in a RIFF WAVE header with the
// true size.
func riff(body []byte) []byte {
	var w wavBuilder
	w.str("RIFF").u32(uint32(len(body) + 4)).str("WAVE")
	w.buf.Write(body)
	return w.buf.Bytes()
}
