package process

import (
	"context"
	"os"
	"path/filepath"
	"testing"

	"github.com/wavsieve/wavsieve/design"
)

// BenchmarkWeightingVsSameSize runs FilterFile, as `wavsieve apply
// --weighting A` does, over 10 minutes of 48 kHz 24-bit stereo, side by
// side with the order-8 elliptic high-pass of the other engine
// benchmarks: both are 4 second-order sections at 48 kHz, so a weighting
// should cost what any filter of its size costs. The MB/s are of the
// input file.
func BenchmarkWeightingVsSameSize(b *testing.B) {
	dir := b.TempDir()
	in := filepath.Join(dir, "in.wav")
	writeBenchWAV(b, in, 10*60*48000)
	st, err := os.Stat(in)
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range []struct {
		name string
		spec design.Spec
	}{
		{"A-weighting", design.Spec{Stages: []design.Stage{{Family: design.Weighting, Curve: "A"}}}},
		{"elliptic8-highpass", benchSpec(false)},
	} {
		b.Run(c.name, func(b *testing.B) {
			f, err := design.Design(c.spec, 48000)
			if err != nil {
				b.Fatal(err)
			}
			if n := len(f.Sections()); n != 4 {
				b.Fatalf("%d sections, the comparison needs 4", n)
			}
			job := FileJob{Input: in, Output: filepath.Join(dir, "out.wav"), Spec: c.spec, NoDither: true, DitherSeed: 1}
			b.SetBytes(st.Size())
			for b.Loop() {
				if _, err := FilterFile(context.Background(), job); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
