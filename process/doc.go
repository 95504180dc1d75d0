// Package process runs second-order-section filters over audio frames.
//
// # The section filter engine
//
// A [Cascade] runs a chain of [design.Section] values, in float64, over
// blocks of interleaved frames (frame after frame, one sample per
// channel: the layout the WAV reader delivers). It keeps its state per
// channel between blocks, so a file can be filtered block by block with
// the same result, bit for bit, as in one piece; it allocates nothing per
// block (only for a nil dst) and never grows with the length of the
// file. Reset puts it back at rest. A [Config] selects the channels to
// filter; the others pass through unchanged. dst may be src.
//
// # Structure
//
// Each section is a transposed direct form II (two state values per
// section and channel, fed by products of the input and the output).
// In float64 its round-off noise is far below any audio format, its
// states stay of the size of the signal, and it costs five multiplies
// and four adds per sample, the fewest of the usual biquad forms; the
// order of the operations is that of scipy.signal.sosfilt.
//
// # Layout and speed
//
// The samples stay interleaved: two adjacent filtered channels are
// filtered together, one in each half of a 128-bit SSE2 register on
// amd64, so no planar copy is made. Sections go four at a time through a
// wavefront (section k works on frame t-k at step t), which gives the
// CPU four independent recursions to overlap instead of one chain of
// dependent multiplies and adds. Measured on the 2-core test machine, on
// the order-8 elliptic high-pass (4 sections) over 10 minutes of 48 kHz
// stereo: a plain loop over both channels, section by section, ran
// about 750 M section-samples per second; filtering the channels
// separately (the planar way) about 400 M; the packed pair alone about
// 850 M; the packed pair in a wavefront about 1900 M in cache and about
// 1700 M in place over the whole file (1300 M copying between two
// 10-minute arrays, where memory bandwidth dominates). One goroutine is
// used: the gain of a second would be taken from other work on the
// machine. Every path does the same IEEE operations in the same order,
// so the output is identical whatever the path, the block size or the
// architecture; a single channel (mono, or an odd one out) runs a plain
// loop. Build tag purego selects the portable code on amd64 too.
//
// # Steady-state start
//
// With Config.SteadyStart, or by calling Prime, the state starts where a
// constant input equal to the first frame would have left it
// (scipy.signal.sosfilt_zi scaled by the first sample), so a DC offset
// gives no start-up transient.
//
// # Zero-phase filtering
//
// [ZeroPhase] runs the cascade forward and then backward, so the phase
// cancels and the magnitude response is squared. It streams: the forward
// pass goes to a float64 spill (the first 112 MiB in memory, the rest in
// a file in a directory the caller names), the backward pass runs over
// it from the end in place (the kernel steps back through the frames,
// so nothing is reversed or copied), and a last forward read delivers
// the result in forward order. Memory is bounded whatever the file's
// length (spill part, 8 MiB of file buffers, edge buffers under 48 MiB,
// blocks): 140 MB peak resident for `wavsieve apply --zero-phase` on 10
// minutes and on 1 hour of 48 kHz 24-bit stereo. [Run] shares the spills
// and the edge buffers of all its workers within [MemoryBudget], so that
// a batch stays under 256 MB whatever the number of workers.
// [ZeroPhaseSlice] does the same in memory, with the same result bit
// for bit.
//
// The frames are read straight into the in-memory spill, or into one of
// two 4 MiB file buffers, and filtered there while in cache. The file is
// written and read in those 4 MiB segments by a second goroutine, one
// segment ahead of (or behind) the filtering, so that the copies of the
// system calls run on the other core; the filtering keeps one goroutine
// and one order, so the output does not depend on the timing. On Linux
// the in-memory spill is an anonymous mapping with transparent huge
// pages, mapped ahead by the same goroutine: on the test machine
// faulting in 112 MiB 4 KiB at a time takes 300-700 ms, 2 MiB at a time
// 10-20 ms (up to 200 ms the first time). The memory of a finished run
// is kept 2 s for the next.
//
// The ends are extended before filtering, as scipy.signal.sosfiltfilt
// does with padtype='odd': by odd reflection, 2*x[0] - x[pad..1] and its
// mirror at the end, with the forward pass starting in the steady state
// of the first extended frame and the backward pass in that of the last
// forward output. The caller gives the pad length (sized from the decay
// of the impulse response); on a signal shorter than the pad, the pad is
// shortened and the [EdgeReport] says so. For notch filters, reflection
// continues a hum out of phase and leaves the notch ringing at the ends;
// [ExtendTones] instead extends each end with a least-squares fit of a
// constant plus sinusoids at given frequencies. The report estimates the
// transient left at each end from the pad used and the decay length the
// caller gives.
//
// # Measured speed
//
// On the 2-core test machine, shared with other work, best of 3 runs
// side by side (testdata/engine/bench_engine.sh and
// testdata/apply/bench_apply.sh), order-8 elliptic high-pass (4
// sections), 10 minutes of 48 kHz stereo, in M section-samples per
// second (both passes counted for zero-phase): Cascade about 1400 M copying and
// 1700 M in place, 2.7 and 3.4 times scipy.signal.sosfilt (510 M);
// ZeroPhase with the spill (112 MiB in memory, the rest in the file)
// about 1280 M, all on file about 1230 M, ZeroPhaseSlice about 1450 M,
// 2.9, 2.8 and 3.3 times scipy.signal.sosfiltfilt (440 M). The first
// run of a process is slower (about 700 M with the spill), while memory
// is faulted in. End to end, FilterFile (as `wavsieve apply`) on a
// 24-bit file of that length takes about 0.7 s causal and 0.9-1.1 s
// zero-phase, against 5.8-6.6 s for NumPy and SciPy doing the same
// (read, decode, filter, encode, write, sync): the input is decoded on one
// goroutine a few blocks ahead and the output encoded and written on
// another a few blocks behind, with the same blocks in the same order.
package process
