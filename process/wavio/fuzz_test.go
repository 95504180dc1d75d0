package wavio

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// FuzzReader feeds arbitrary bytes to the Reader. It must never panic,
// must fail only with wavio errors, must not allocate far beyond the input's
// size whatever the header declares, and what it reads must survive a
// write-read round trip unchanged.
func FuzzReader(f *testing.F) {
	for _, c := range malformedCorpus() {
		f.Add(c.data)
	}
	for _, ff := range roundTripFormats {
		ff.SampleRate, ff.Channels = 44100, 2
		f.Add(encodeWAV(f, ff, onGrid(ff, signal(20, 2)), []Chunk{{ID: "LIST", Data: []byte("INFO")}, {ID: "note", Data: []byte("x"), AfterData: true}}))
	}
	names, _ := filepath.Glob(filepath.Join(fixtures, "*", "*.wav"))
	for _, n := range names {
		if b, err := os.ReadFile(n); err == nil && len(b) <= 8<<10 {
			f.Add(b)
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		opts := &ReaderOptions{MaxChunkSize: 1 << 20}
		var ms runtime.MemStats
		runtime.ReadMemStats(&ms)
		before := ms.TotalAlloc
		r, err := NewReader(bytes.NewReader(data), opts)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "wavio: ") {
				t.Fatalf("error without the package prefix: %v", err)
			}
			return
		}
		ch := r.Format().Channels
		runtime.ReadMemStats(&ms)
		mid := ms.TotalAlloc
		dst := make([]float64, 4*ch)
		runtime.ReadMemStats(&ms)
		before += ms.TotalAlloc - mid // leave the test's own dst out
		var frames int64
		for {
			n, err := r.ReadFrames(dst)
			frames += int64(n)
			if err == io.EOF {
				break
			}
			if err != nil {
				if !strings.HasPrefix(err.Error(), "wavio: ") {
					t.Fatalf("error without the package prefix: %v", err)
				}
				return
			}
		}
		runtime.ReadMemStats(&ms)
		// Buffers of at most the file size or 64 KiB each, chunk bodies
		// and the ds64 table within the file size, and small change.
		if used, limit := ms.TotalAlloc-before, uint64(4*len(data))+192<<10; used > limit {
			t.Fatalf("allocated %d bytes for a %d-byte input", used, len(data))
		}
		if frames*int64(r.Format().BlockAlign()) > int64(len(data)) {
			t.Fatalf("%d frames from %d bytes", frames, len(data))
		}
		roundTrip(t, data, r)
	})
}

// roundTrip writes what r read (at full valid bits, no dither) and checks
// that reading the output gives the same format, samples and chunks.
func roundTrip(t *testing.T, data []byte, r *Reader) {
	in := r.Format()
	out := in
	out.ValidBits = 0
	if checkWritable(out) != nil {
		return // for example 40-bit PCM, which the Writer does not produce
	}
	r, err := NewReader(bytes.NewReader(data), &ReaderOptions{MaxChunkSize: 1 << 20})
	if err != nil {
		t.Fatalf("second open failed: %v", err)
	}
	x := readAll(t, r, 64)
	enc := encodeWAV(t, out, x, r.Chunks())
	r2, err := NewReader(bytes.NewReader(enc), nil)
	if err != nil {
		t.Fatalf("reading the writer's output: %v", err)
	}
	g := r2.Format()
	if g.SampleRate != in.SampleRate || g.Channels != in.Channels || g.Bits != in.Bits || g.Encoding != in.Encoding || g.ChannelMask != in.ChannelMask {
		t.Fatalf("format %v after the round trip, was %v", g, in)
	}
	if y := readAll(t, r2, 64); !equalSamples(x, y) {
		t.Fatal("samples changed in the round trip")
	}
	c1, c2 := r.Chunks(), r2.Chunks()
	if len(c1) != len(c2) {
		t.Fatalf("%d chunks after the round trip, was %d", len(c2), len(c1))
	}
	for i := range c1 {
		if c1[i].ID != c2[i].ID || c1[i].AfterData != c2[i].AfterData || !bytes.Equal(c1[i].Data, c2[i].Data) {
			t.Fatalf("chunk %d (%q) changed in the round trip", i, c1[i].ID)
		}
	}
	if len(r2.Warnings()) != 0 {
		t.Fatalf("the writer's output gives warnings: %v", r2.Warnings())
	}
}

// FuzzWriterChunks splits arbitrary bytes into metadata chunks, some
// held in memory and some as references into a source (as the Reader
// keeps large ones), writes them with a few frames and reads the result
// back: the Writer must not panic, must refuse only invalid chunks, and
// every chunk must come back byte for byte, in order, before or after
// the data as asked. A source shorter than a reference claims must give
// an error, never a short chunk.
func FuzzWriterChunks(f *testing.F) {
	f.Add([]byte("LIST\x04INFObext\x10abcdefghijklmnop"), uint8(1), false)
	f.Add([]byte("iXML\x03<a>note\x00"), uint8(2), true)
	f.Add(bytes.Repeat([]byte("junk\x07odd-siz"), 5), uint8(5), false)
	f.Fuzz(func(t *testing.T, data []byte, refMask uint8, shortSource bool) {
		src := bytes.NewReader(data)
		var cs []Chunk
		pos := int64(0) // offset of data in the source
		for i := 0; len(data) >= 5 && i < 16; i++ {
			id := string(data[:4])
			n := min(int(data[4]), len(data)-5)
			body := data[5 : 5+n]
			c := Chunk{ID: id, AfterData: data[4]&1 == 1}
			if refMask&(1<<(i%8)) != 0 {
				c.Source, c.Offset, c.Length = src, pos+5, int64(n)
				if shortSource {
					c.Length += 3 // past the end of what is there, for the last one
				}
			} else {
				c.Data = body
			}
			cs = append(cs, c)
			data = data[5+n:]
			pos += int64(5 + n)
		}
		var m memWS
		w, err := NewWriter(&m, WriterOptions{Format: Format{SampleRate: 8000, Channels: 1, Bits: 16, Encoding: PCM}, NoDither: true, Chunks: cs})
		if err != nil {
			for _, c := range cs {
				if checkChunk(c) != nil {
					return // refused for a reason
				}
			}
			t.Fatalf("valid chunks refused: %v", err)
		}
		short := false // a reference past the end of its source
		for _, c := range cs {
			short = short || c.Source != nil && c.Offset+c.Length > src.Size()
		}
		err = w.WriteFrames([]float64{0, 0.5, -0.5})
		if err == nil {
			err = w.Close()
		}
		switch {
		case short && err == nil:
			t.Fatal("a chunk past the end of its source was written without an error")
		case short:
			return // the error is right
		case err != nil:
			t.Fatal(err)
		}
		r, err := NewReader(bytes.NewReader(m.b), &ReaderOptions{MaxChunkSize: 1 << 20})
		if err != nil {
			t.Fatalf("reading the output: %v", err)
		}
		var before, after []Chunk
		for _, c := range cs {
			if c.AfterData {
				after = append(after, c)
			} else {
				before = append(before, c)
			}
		}
		want := append(before, after...)
		got := r.Chunks()
		if len(got) != len(want) {
			t.Fatalf("%d chunks read back, wrote %d", len(got), len(want))
		}
		for i := range want {
			wb := want[i].Data
			if want[i].Source != nil {
				wb = make([]byte, want[i].Length)
				want[i].Source.ReadAt(wb, want[i].Offset)
			}
			if got[i].ID != want[i].ID || got[i].AfterData != want[i].AfterData || !bytes.Equal(got[i].Data, wb) {
				t.Fatalf("chunk %d: %q after=%v %q, wrote %q after=%v %q", i, got[i].ID, got[i].AfterData, got[i].Data, want[i].ID, want[i].AfterData, wb)
			}
		}
	})
}
