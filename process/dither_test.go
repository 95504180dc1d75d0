package process

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"testing"

	"github.com/wavsieve/wavsieve/process/wavio"
)

// TestDefaultDitherSeed: without --dither-seed the seed comes from the
// input's file name and size, so identical runs (even from another folder)
// write identical bytes, the seed is recorded, and another file gets
// other dither.
func TestDefaultDitherSeed(t *testing.T) {
	dir := t.TempDir()
	pcm16 := wavio.Format{Bits: 16, Encoding: wavio.PCM}
	for _, p := range []string{"one/a.wav", "two/a.wav", "one/b.wav"} {
		os.MkdirAll(filepath.Join(dir, filepath.Dir(p)), 0o755)
		writeTone(t, filepath.Join(dir, p), 8000, 2, 0.3, pcm16, nil)
	}
	run := func(in, out string) (FileResult, []byte) {
		t.Helper()
		r, err := FilterFile(context.Background(), FileJob{Input: filepath.Join(dir, in), Output: filepath.Join(dir, out), Spec: humSpec})
		if err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(filepath.Join(dir, out))
		if err != nil {
			t.Fatal(err)
		}
		return r, b
	}
	r1, b1 := run("one/a.wav", "out1.wav")
	r2, b2 := run("one/a.wav", "out2.wav")
	r3, b3 := run("two/a.wav", "out3.wav")
	r4, b4 := run("one/b.wav", "out4.wav")
	st, _ := os.Stat(filepath.Join(dir, "one/a.wav"))
	if want := DefaultDitherSeed("a.wav", st.Size()); r1.DitherSeed != want || want == 0 {
		t.Errorf("recorded seed %d, want %d", r1.DitherSeed, want)
	}
	if !bytes.Equal(b1, b2) || r1.DitherSeed != r2.DitherSeed {
		t.Error("two identical runs wrote different files")
	}
	if !bytes.Equal(b1, b3) || r3.DitherSeed != r1.DitherSeed {
		t.Error("the same file name and size in another folder wrote a different file")
	}
	if bytes.Equal(b1, b4) || r4.DitherSeed == r1.DitherSeed {
		t.Error("another file name gave the same dither: the seed does not reach the writer")
	}
}
