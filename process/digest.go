package process

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"fmt"
	"math"
	"slices"

	"github.com/wavsieve/wavsieve/design"
	"github.com/wavsieve/wavsieve/process/wavio"
)

// DesignDigest is a fingerprint of everything that decides the bytes of
// an output apart from the input itself: the second-order sections as
// designed at the file's rate (their exact float64 bits), the direction
// (causal or zero-phase), the output sample format and the settings of
// the job that change samples (dither, its seed when given, the channels
// filtered, a steady start, letting non-finite samples through, a
// tracking notch following each channel's own track). Two
// outputs of one input with equal digests were made the same way, so a
// later run may skip an existing output only when its recorded digest
// matches the one it would make.
func (job FileJob) DesignDigest(f *design.Filter, out wavio.Format) string {
	h := sha256.New()
	var b [8]byte
	put := func(v uint64) {
		binary.LittleEndian.PutUint64(b[:], v)
		h.Write(b[:])
	}
	fmt.Fprintf(h, "wavsieve design digest 1\x00%s\x00", out)
	put(uint64(len(f.Stages)))
	for _, st := range f.Stages {
		put(uint64(len(st.Sections)))
		for _, s := range st.Sections {
			for _, c := range s {
				put(math.Float64bits(c))
			}
		}
	}
	flag := func(v bool) {
		if v {
			put(1)
		} else {
			put(0)
		}
	}
	flag(job.Spec.ZeroPhase)
	flag(job.NoDither)
	put(job.DitherSeed)
	flag(job.SteadyStart)
	flag(job.AllowNonFinite)
	put(uint64(len(job.Only)))
	for _, c := range job.Only {
		put(uint64(c))
	}
	// Only where it changes samples (a tracking stage, several channels),
	// and only then hashed, so that the digests of every other run stay
	// what earlier records hold.
	if job.TrackPerChannel && out.Channels > 1 && slices.ContainsFunc(f.Stages, func(st design.Designed) bool { return st.Spec.Tracking }) {
		fmt.Fprint(h, "track per channel\x00")
	}
	return hex.EncodeToString(h.Sum(nil))[:32]
}

// OutputFormat is the format an output of an input in format in gets.
func (job FileJob) OutputFormat(in wavio.Format) wavio.Format {
	if job.Encoding != 0 {
		return in.WithSample(job.Encoding, job.Bits)
	}
	return in
}
