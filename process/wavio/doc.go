// Package wavio reads and writes WAV files as interleaved float64 frames.
//
// It is wavsieve's WAV layer: the Reader decodes PCM (8-bit unsigned,
// 16, 24, 32-bit and wider containers up to 64 bits, with valid bits below
// the container) and IEEE float (32 and 64-bit), plain or
// WAVE_FORMAT_EXTENSIBLE, in RIFF, big-endian RIFX, RF64 and BW64 files
// (EBU Tech 3306); the Writer encodes 8, 16, 24 and 32-bit PCM and 32 and
// 64-bit float, switching to RF64 by itself past 4 GiB.
//
// # Samples
//
// Frames are interleaved: frame 0 channel 0, frame 0 channel 1, and so on.
// Integer samples map to float64 by the container scale: v / 2^(N-1) for an
// N-bit container (int16: v/32768), and (b-128)/128 for 8-bit unsigned. Float
// samples beyond full scale are returned unchanged. Writing to integer
// rounds half to even, saturates (never wraps) and counts clipped samples
// per channel; TPDF dither is on by default and seeded, with the seed
// reported so that a run can be repeated.
//
// # Ownership and memory
//
// NewReader and NewWriter take a caller-owned stream and never close it;
// Open and Create own their files. Buffers are allocated in the
// constructors: ReadFrames and WriteFrames allocate nothing per block, and
// memory stays bounded whatever the file length. Sizes declared in a file
// are never trusted for an allocation beyond what the file holds.
//
// # Defects
//
// Damage that costs no samples, or only the samples that are missing (an
// odd chunk without its pad byte, a data size left at 0 or 0xFFFFFFFF, a
// data chunk longer than the file, trailing bytes), is tolerated and listed
// in Reader.Warnings. Anything that makes the samples ambiguous is an error:
// FormatError ("wavio: invalid ..."), UnsupportedError ("wavio: unsupported
// ..."), an error wrapping io.ErrUnexpectedEOF for a truncated header, or a
// *NonFiniteError for a NaN or infinite sample.
//
// # Why the codec is written here
//
// The project's chosen WAV library is github.com/go-audio/wav. This package
// uses its own codec for the sample data and the header, for these reasons
// (measured on this project's 2-core machine, see bench_test.go):
//
//   - go-audio/wav decodes IEEE float data as integers, reads
//     WAVE_FORMAT_EXTENSIBLE, RF64 and RIFX not at all, and wraps instead of
//     saturating when it encodes.
//   - Its FullPCMBuffer on an *os.File makes one read system call per
//     sample (under 2 MB/s).
//   - Its chunked decoder (PCMBuffer with an 8192-sample buffer) reaches
//     about 265-330 MB/s on 24-bit stereo in memory, and allocates a block
//     buffer per call; this package's Reader decodes the same bytes to
//     float64 at about 2,400-2,700 MB/s with no allocation per block.
//   - Its Encoder reaches about 40-90 MB/s from an IntBuffer, allocating per
//     sample; this package's Writer encodes float64 to 24-bit at about
//     1,550-1,850 MB/s (900 MB/s with TPDF dither).
//
// go-audio/wav stays as the reference in the benchmarks and in a test that
// decodes the same files with both (see golden_test.go).
package wavio
