package wavio

import (
	"bytes"
	"encoding/json"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/go-audio/wav"
)

const fixtures = "../../testdata/wav"

// expectedFile is one record of testdata/wav/expected.json, written by
// testdata/wav/gen_expected.py from scipy.io.wavfile.read (SciPy 1.10.1,
// NumPy 1.24.2, Debian's python3-scipy) and a struct parse of fmt.
type expectedFile struct {
	File string `json:"file"`
	Fmt  *struct {
		Tag         int    `json:"tag"`
		Channels    int    `json:"channels"`
		Rate        int    `json:"rate"`
		BlockAlign  int    `json:"block_align"`
		Bits        int    `json:"bits"`
		ValidBits   int    `json:"valid_bits"`
		ChannelMask uint32 `json:"channel_mask"`
		SubTag      int    `json:"sub_tag"`
	} `json:"fmt"`
	ScipyError string      `json:"scipy_error"`
	Rate       int         `json:"rate"`
	Frames     int64       `json:"frames"`
	Channels   int         `json:"channels"`
	Index      []int       `json:"index"`
	Samples    [][]float64 `json:"samples"`
	Sum        float64     `json:"sum"`
	SumSquares float64     `json:"sum_squares"`
}

func loadExpected(t *testing.T) []expectedFile {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(fixtures, "expected.json"))
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Files []expectedFile `json:"files"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Files) < 20 {
		t.Fatalf("only %d fixtures in expected.json", len(doc.Files))
	}
	return doc.Files
}

// Where wavio's verdict differs from scipy's, or scipy gives none, the
// expected outcome and its reason.
var fixtureOutcome = map[string]struct {
	err    func(error) bool
	msg    string
	warn   []WarningKind
	frames int64 // for files scipy cannot read: from go-audio/wav (TestAgainstGoAudio)
}{
	// scipy: "Unknown wave file format: MULAW"; mu-law is not decoded here.
	"scipy/test-8000Hz-le-1ch-1byte-ulaw.wav": {err: isUnsupported, msg: "unsupported encoding mu-law"},
	// The file is 13 bytes: scipy "Incomplete chunk ID".
	"scipy/test-44100Hz-le-1ch-4bytes-incomplete-chunk.wav": {err: isTrunc, msg: "truncated"},
	// Block align 4 for 3 channels of 24 bits (fmt fields in expected.json);
	// scipy refuses it for the byte rate, wavio for the block align.
	"scipy/test-8000Hz-le-3ch-5S-24bit-inconsistent.wav": {err: isInvalid, msg: "block align 4 does not match 3 channels of 24 bits"},
	// scipy: "Reached EOF prematurely"; wavio reads what is there and warns.
	"scipy/test-44100Hz-le-1ch-4bytes-early-eof.wav": {warn: []WarningKind{WarnDataOverrun}},
	// 72 bytes: the header ends where the data chunk's would begin; scipy
	// "Unexpected end of file".
	"scipy/test-44100Hz-le-1ch-4bytes-early-eof-no-data.wav": {err: isTrunc, msg: "no data chunk"},
	// 11140 data bytes of 3-byte frames: scipy cannot reshape them; wavio
	// drops the last partial frame. 3713 = floor(11140 / 3).
	"go-audio/padded24b.wav": {warn: []WarningKind{WarnPartialFrame}, frames: 3713},
}

func TestFixtures(t *testing.T) {
	for _, e := range loadExpected(t) {
		t.Run(e.File, func(t *testing.T) {
			want, special := fixtureOutcome[e.File]
			r, err := Open(filepath.Join(fixtures, e.File), nil)
			if want.err != nil {
				if err == nil || !want.err(err) || !strings.Contains(err.Error(), want.msg) {
					t.Fatalf("got %v, want an error containing %q", err, want.msg)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			defer r.Close()
			if e.ScipyError != "" && !special {
				t.Fatalf("scipy refused the file (%s) and no outcome is set here", e.ScipyError)
			}
			f := r.Format()
			if e.Fmt != nil {
				checkFmt(t, f, e)
			}
			got := readAll(t, r, 1000)
			var kinds []WarningKind
			for _, w := range r.Warnings() {
				if w.Kind != WarnHeader { // byte-rate remarks are not the point here
					kinds = append(kinds, w.Kind)
				}
			}
			if len(kinds) != len(want.warn) || (len(kinds) > 0 && kinds[0] != want.warn[0]) {
				t.Fatalf("warnings %v, want kinds %v", r.Warnings(), want.warn)
			}
			if e.ScipyError != "" {
				if int64(len(got)) != want.frames*int64(f.Channels) {
					t.Fatalf("%d samples, want %d frames", len(got), want.frames)
				}
				return
			}
			if f.SampleRate != e.Rate || f.Channels != e.Channels || int64(len(got)) != e.Frames*int64(e.Channels) {
				t.Fatalf("rate %d, %d channels, %d samples; scipy: %d, %d, %d frames", f.SampleRate, f.Channels, len(got), e.Rate, e.Channels, e.Frames)
			}
			for k, i := range e.Index {
				for c, v := range e.Samples[k] {
					if g := got[i*e.Channels+c]; g != v {
						t.Fatalf("frame %d channel %d: %v, scipy %v", i, c, g, v)
					}
				}
			}
			var sum, sq float64
			for _, v := range got {
				sum += v
				sq += v * v
			}
			// Sums in a different order: allow rounding of 1e-12 per sample.
			tol := 1e-12 * float64(len(got))
			if math.Abs(sum-e.Sum) > tol || math.Abs(sq-e.SumSquares) > tol {
				t.Fatalf("sum %v, sum of squares %v; scipy %v, %v", sum, sq, e.Sum, e.SumSquares)
			}
		})
	}
}

// checkFmt compares the Format with the fmt chunk fields parsed by
// gen_expected.py: the container is the block align per channel, valid
// bits are the extensible field or else the bits field.
func checkFmt(t *testing.T, f Format, e expectedFile) {
	t.Helper()
	x := e.Fmt
	enc := Encoding(x.Tag)
	valid := x.Bits
	if x.Tag == tagExtensible {
		enc = Encoding(x.SubTag)
		valid = x.ValidBits
	}
	if f.Encoding != enc || f.Bits != 8*x.BlockAlign/x.Channels || f.ValidBits != valid || f.ChannelMask != x.ChannelMask || f.SampleRate != x.Rate {
		t.Fatalf("format %+v; fmt chunk %+v", f, *x)
	}
	if want := strings.Contains(e.File, "-be"); f.BigEndian != want {
		t.Fatalf("BigEndian %v for %s", f.BigEndian, e.File)
	}
}

// TestAgainstGoAudio decodes the integer PCM fixtures with go-audio/wav
// (FullPCMBuffer on the same bytes) and checks that wavio returns the same
// values scaled by 2^(bits-1) (8-bit: offset 128, scale 128).
func TestAgainstGoAudio(t *testing.T) {
	names, _ := filepath.Glob(filepath.Join(fixtures, "go-audio", "*.wav"))
	if len(names) < 8 {
		t.Fatalf("only %d go-audio fixtures", len(names))
	}
	for _, name := range names {
		t.Run(filepath.Base(name), func(t *testing.T) {
			data, err := os.ReadFile(name)
			if err != nil {
				t.Fatal(err)
			}
			d := wav.NewDecoder(bytes.NewReader(data))
			buf, err := d.FullPCMBuffer()
			if err != nil {
				t.Fatal(err)
			}
			r, err := NewReader(bytes.NewReader(data), nil)
			if err != nil {
				t.Fatal(err)
			}
			got := readAll(t, r, 4096)
			f := r.Format()
			if int(d.BitDepth) != f.Bits || int(d.NumChans) != f.Channels {
				t.Fatalf("go-audio says %d bits, %d channels; wavio %v", d.BitDepth, d.NumChans, f)
			}
			ref := buf.Data
			if len(ref) > len(got) {
				// go-audio keeps a partial final frame's samples.
				ref = ref[:len(got)]
			}
			if len(ref) != len(got) {
				t.Fatalf("%d samples, go-audio %d", len(got), len(ref))
			}
			scale := math.Ldexp(1, f.Bits-1)
			for i, v := range ref {
				w := float64(v) / scale
				if f.Bits == 8 {
					w = float64(v-128) / 128
				}
				if got[i] != w {
					t.Fatalf("sample %d: %v, go-audio %v", i, got[i], w)
				}
			}
		})
	}
}

// TestFixtureChunks checks the metadata chunks of fixtures whose layout was
// listed with a struct walk over the chunk headers (as in gen_expected.py).
func TestFixtureChunks(t *testing.T) {
	cases := map[string]string{
		"go-audio/bwf.wav":               "bext< AFAn> JUNK> JUNK> JUNK> JUNK> JUNK> JUNK> JUNK> LIST> AFmd> ID3 >",
		"go-audio/flloop.wav":            "smpl> cue > LIST> tlst> LIST>",
		"go-audio/listChunkInHeader.wav": "LIST< PAD <",
		"go-audio/kick-16b441k.wav":      "SAUR>",
	}
	for file, want := range cases {
		for _, stream := range []bool{false, true} {
			data, err := os.ReadFile(filepath.Join(fixtures, file))
			if err != nil {
				t.Fatal(err)
			}
			var src io.Reader = bytes.NewReader(data)
			if stream {
				src = plain{src}
			}
			r, err := NewReader(src, nil)
			if err != nil {
				t.Fatal(err)
			}
			readAll(t, r, 4096)
			var ids []string
			for _, c := range r.Chunks() {
				ids = append(ids, c.ID+map[bool]string{false: "<", true: ">"}[c.AfterData])
			}
			if got := strings.Join(ids, " "); got != want {
				t.Errorf("%s (stream %v): chunks %q, want %q", file, stream, got, want)
			}
			// Copy through the Writer: every chunk comes back byte-exact.
			out := encodeWAV(t, r.Format(), nil, r.Chunks())
			r2, err := NewReader(bytes.NewReader(out), nil)
			if err != nil {
				t.Fatal(err)
			}
			c1, c2 := r.Chunks(), r2.Chunks()
			if len(c1) != len(c2) {
				t.Fatalf("%s: %d chunks after copying, want %d", file, len(c2), len(c1))
			}
			for i := range c1 {
				if c1[i].ID != c2[i].ID || c1[i].AfterData != c2[i].AfterData || !bytes.Equal(c1[i].Data, c2[i].Data) {
					t.Fatalf("%s: chunk %d (%s) changed in the copy", file, i, c1[i].ID)
				}
			}
		}
	}
}
