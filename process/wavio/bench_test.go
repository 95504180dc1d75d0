package wavio

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"testing"

	"github.com/go-audio/audio"
	"github.com/go-audio/wav"
)

const benchFrames = 1 << 18 // 262144 stereo frames: 1.5 MB of 24-bit data

func bench24(b *testing.B) []byte {
	return encodeWAV(b, Format{SampleRate: 48000, Channels: 2, Bits: 24, Encoding: PCM}, signal(benchFrames, 2), nil)
}

// BenchmarkDecode24 decodes 24-bit stereo to float64 from memory; the
// bytes per second count the whole WAV file.
func BenchmarkDecode24(b *testing.B) {
	data := bench24(b)
	dst := make([]float64, 4096*2)
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	for b.Loop() {
		r, err := NewReader(bytes.NewReader(data), nil)
		if err != nil {
			b.Fatal(err)
		}
		for {
			_, err := r.ReadFrames(dst)
			if err == io.EOF {
				break
			}
			if err != nil {
				b.Fatal(err)
			}
		}
	}
}

// BenchmarkGoAudioDecode24 decodes the same bytes with go-audio/wav's
// chunked decoder (PCMBuffer, 8192 samples a call) to ints, then to float64
// as ReadFrames does, for the comparison in doc.go.
func BenchmarkGoAudioDecode24(b *testing.B) {
	data := bench24(b)
	buf := &audio.IntBuffer{Data: make([]int, 4096*2), Format: &audio.Format{NumChannels: 2, SampleRate: 48000}}
	out := make([]float64, 4096*2)
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	for b.Loop() {
		d := wav.NewDecoder(bytes.NewReader(data))
		for {
			n, err := d.PCMBuffer(buf)
			if err != nil {
				b.Fatal(err)
			}
			if n == 0 {
				break
			}
			for i, v := range buf.Data[:n] {
				out[i] = float64(v) * (1.0 / 8388608)
			}
		}
	}
}

// BenchmarkEncode24 encodes float64 to 24-bit stereo in memory, without
// dither; BenchmarkEncode24Dither with TPDF dither.
func BenchmarkEncode24(b *testing.B)       { benchEncode(b, true) }
func BenchmarkEncode24Dither(b *testing.B) { benchEncode(b, false) }

func benchEncode(b *testing.B, noDither bool) {
	x := signal(benchFrames, 2)
	f := Format{SampleRate: 48000, Channels: 2, Bits: 24, Encoding: PCM}
	m := &memWS{b: make([]byte, 0, benchFrames*6+1024)}
	b.SetBytes(int64(len(encodeWAV(b, f, x, nil))))
	b.ReportAllocs()
	for b.Loop() {
		m.b, m.off = m.b[:0], 0
		w, err := NewWriter(m, WriterOptions{Format: f, NoDither: noDither, DitherSeed: 1})
		if err != nil {
			b.Fatal(err)
		}
		for i := 0; i < len(x); i += 8192 {
			if err := w.WriteFrames(x[i:min(i+8192, len(x))]); err != nil {
				b.Fatal(err)
			}
		}
		if err := w.Close(); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkGoAudioEncode24 encodes the same samples with go-audio/wav's
// Encoder (from ints, 8192 samples a call).
func BenchmarkGoAudioEncode24(b *testing.B) {
	x := signal(benchFrames, 2)
	f := Format{SampleRate: 48000, Channels: 2, Bits: 24, Encoding: PCM}
	b.SetBytes(int64(len(encodeWAV(b, f, x, nil))))
	buf := &audio.IntBuffer{Data: make([]int, 8192), Format: &audio.Format{NumChannels: 2, SampleRate: 48000}, SourceBitDepth: 24}
	m := &memWS{b: make([]byte, 0, benchFrames*6+1024)}
	b.ReportAllocs()
	for b.Loop() {
		m.b, m.off = m.b[:0], 0
		e := wav.NewEncoder(m, 48000, 24, 2, 1)
		for i := 0; i < len(x); i += 8192 {
			blk := x[i:min(i+8192, len(x))]
			buf.Data = buf.Data[:len(blk)]
			for j, v := range blk {
				buf.Data[j] = int(v * 8388607)
			}
			if err := e.Write(buf); err != nil {
				b.Fatal(err)
			}
		}
		if err := e.Close(); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkGoAudioFullPCMFile decodes a 24-bit stereo file of 2^15 frames
// with go-audio/wav's FullPCMBuffer straight from an *os.File.
func BenchmarkGoAudioFullPCMFile(b *testing.B) {
	data := encodeWAV(b, Format{SampleRate: 48000, Channels: 2, Bits: 24, Encoding: PCM}, signal(1<<15, 2), nil)
	name := filepath.Join(b.TempDir(), "in.wav")
	if err := os.WriteFile(name, data, 0o644); err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		f, err := os.Open(name)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := wav.NewDecoder(f).FullPCMBuffer(); err != nil {
			b.Fatal(err)
		}
		f.Close()
	}
}

// BenchmarkDecode24File is BenchmarkDecode24 from an *os.File through Open.
func BenchmarkDecode24File(b *testing.B) {
	data := bench24(b)
	name := filepath.Join(b.TempDir(), "in.wav")
	if err := os.WriteFile(name, data, 0o644); err != nil {
		b.Fatal(err)
	}
	dst := make([]float64, 4096*2)
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		r, err := Open(name, nil)
		if err != nil {
			b.Fatal(err)
		}
		for {
			if _, err := r.ReadFrames(dst); err != nil {
				break
			}
		}
		r.Close()
	}
}
