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
// The project's chosen WAV library is github.com/go-audio/wav. The header
// parser, the sample codec (all of reader.go, writer.go and codec.go) are
// this package's own, for these reasons; the figures are from
// bench_test.go on the project's 2-core machine (go test -bench .
// -benchmem ./process/wavio, 24-bit stereo, 262144 frames, MB/s of WAV
// bytes):
//
//   - go-audio/wav decodes IEEE float data as integers, does not read
//     WAVE_FORMAT_EXTENSIBLE valid bits and masks, RF64 or RIFX, and wraps
//     instead of saturating when it encodes.
//   - Its FullPCMBuffer on an *os.File makes one read call per sample:
//     0.9 MB/s (BenchmarkGoAudioFullPCMFile), against 1,360 MB/s for this
//     Reader through Open on the same kind of file (BenchmarkDecode24File).
//   - Its chunked decoder (PCMBuffer, 8192 samples a call, then scaled to
//     float64) decodes the same bytes in memory at 370-410 MB/s and
//     allocates a block buffer per call; this Reader decodes them to float64
//     at 2,600-2,750 MB/s with no allocation per block (BenchmarkDecode24,
//     BenchmarkGoAudioDecode24).
//   - Its Encoder writes 24-bit from an IntBuffer at 90-130 MB/s, with
//     allocations per sample; this Writer encodes float64 to 24-bit at
//     1,800-2,040 MB/s, or about 910 MB/s with TPDF dither
//     (BenchmarkEncode24, BenchmarkEncode24Dither, BenchmarkGoAudioEncode24).
//
// go-audio/wav remains the reference: the benchmarks run it on the same
// bytes, and TestAgainstGoAudio checks that both decoders agree on the
// integer PCM fixtures of testdata/wav.
package wavio
