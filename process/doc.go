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
// a file in a directory the caller names), the backward pass reads it
// back in reverse blocks and writes each block's final values over it,
// and a last forward read delivers the result in forward order. Memory
// stays under 200 MB (spill part, edge buffers under 48 MiB, blocks)
// whatever the file's length. [ZeroPhaseSlice]
// does the same in memory, with the same result bit for bit.
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
package process
