package wavio

import (
	"encoding/binary"
	"math"
)

// Sample scale between float64 and integer PCM (common practice, the same
// as scipy.io.wavfile's documented ranges and most audio libraries): an
// N-bit container value v reads as v / 2^(N-1), so full scale is
// [-1, 1 - 2^-(N-1)]. 8-bit PCM is unsigned with an offset of 128:
// (b - 128) / 128. int16: v / 32768; 24-bit: v / 8388608; int32:
// v / 2147483648. Samples with fewer valid bits than the container are
// left-justified in it (Microsoft, WAVEFORMATEXTENSIBLE), so the same
// container scale applies. Writing inverts this and rounds half to even.

type sampleKind int

const (
	kU8 sampleKind = iota
	kS16
	kS24
	kS32
	kSWide // 40 to 64-bit containers
	kF32
	kF64
)

func kindOf(f Format) sampleKind {
	if f.Encoding == Float {
		if f.Bits == 32 {
			return kF32
		}
		return kF64
	}
	switch f.Bits {
	case 8:
		return kU8
	case 16:
		return kS16
	case 24:
		return kS24
	case 32:
		return kS32
	}
	return kSWide
}

// swapBytes reverses each width-byte sample in b in place (RIFX input).
func swapBytes(b []byte, width int) {
	switch width {
	case 1:
	case 2:
		for i := 0; i+1 < len(b); i += 2 {
			b[i], b[i+1] = b[i+1], b[i]
		}
	case 3:
		for i := 0; i+2 < len(b); i += 3 {
			b[i], b[i+2] = b[i+2], b[i]
		}
	default:
		for i := 0; i+width <= len(b); i += width {
			s := b[i : i+width]
			for l, r := 0, width-1; l < r; l, r = l+1, r-1 {
				s[l], s[r] = s[r], s[l]
			}
		}
	}
}

// decode converts little-endian samples in src to dst (len(dst) samples).
// For float kinds it reports the index of the first non-finite sample, or -1.
func decode(k sampleKind, width int, src []byte, dst []float64) int {
	switch k {
	case kU8:
		src = src[:len(dst)]
		for i, b := range src {
			dst[i] = float64(int(b)-128) * (1.0 / 128)
		}
	case kS16:
		src = src[:2*len(dst)]
		for i := range dst {
			s := src[2*i : 2*i+2 : 2*i+2]
			dst[i] = float64(int16(uint16(s[0])|uint16(s[1])<<8)) * (1.0 / 32768)
		}
	case kS24:
		src = src[:3*len(dst)]
		for i := range dst {
			s := src[3*i : 3*i+3 : 3*i+3]
			v := int32(uint32(s[0])<<8|uint32(s[1])<<16|uint32(s[2])<<24) >> 8
			dst[i] = float64(v) * (1.0 / 8388608)
		}
	case kS32:
		src = src[:4*len(dst)]
		for i := range dst {
			dst[i] = float64(int32(binary.LittleEndian.Uint32(src[4*i:]))) * (1.0 / 2147483648)
		}
	case kSWide:
		// Left-justify the container in 64 bits, then scale by 2^-63.
		for i := range dst {
			s := src[width*i : width*i+width]
			var u uint64
			for j, b := range s {
				u |= uint64(b) << (64 - 8*width + 8*j)
			}
			dst[i] = float64(int64(u)) * 0x1p-63
		}
	case kF32:
		src = src[:4*len(dst)]
		bad := false
		for i := range dst {
			v := float64(math.Float32frombits(binary.LittleEndian.Uint32(src[4*i:])))
			dst[i] = v
			bad = bad || v-v != 0
		}
		if bad {
			return firstNonFinite(dst)
		}
	case kF64:
		src = src[:8*len(dst)]
		bad := false
		for i := range dst {
			v := math.Float64frombits(binary.LittleEndian.Uint64(src[8*i:]))
			dst[i] = v
			bad = bad || v-v != 0
		}
		if bad {
			return firstNonFinite(dst)
		}
	}
	return -1
}

func firstNonFinite(x []float64) int {
	for i, v := range x {
		if v-v != 0 { // true for NaN and for +-Inf (Inf-Inf is NaN)
			return i
		}
	}
	return -1
}

// quantizer converts float64 to integer container values with saturation,
// optional TPDF dither and per-channel clip counts.
type quantizer struct {
	scale    float64 // 2^(valid-1)
	lo, hi   float64 // integer range of the valid bits
	shift    uint    // bits - valid: left-justification in the container
	width    int     // container bytes
	minN     int64   // integer range of the valid bits, for wide containers
	maxN     int64
	dither   bool
	rng      splitMix
	channels int
	clipped  []int64
	noise    []float64 // one block of dither noise; all zero without dither
}

// splitMix is SplitMix64 (Steele, Lea and Flood, "Fast splittable
// pseudorandom number generators", OOPSLA 2014): small, fast, seedable, and
// good enough to drive dither.
type splitMix struct{ s uint64 }

func (r *splitMix) next() uint64 {
	r.s += 0x9E3779B97F4A7C15
	z := r.s
	z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9
	z = (z ^ (z >> 27)) * 0x94D049BB133111EB
	return z ^ (z >> 31)
}

// tpdf returns triangular-pdf noise on (-1, 1) LSB: the difference of two
// independent uniforms on [0, 1), which is the TPDF dither of 2 LSB
// peak-to-peak that makes the first two moments of the quantisation error
// independent of the signal (Lipshitz, Wannamaker and Vanderkooy,
// "Quantization and dither: a theoretical survey", J. Audio Eng. Soc. 40(5),
// 1992).
func (r *splitMix) tpdf() float64 {
	u := r.next()
	return float64(int64(u&0xFFFFFFFF)-int64(u>>32)) * 0x1p-32
}

// roundMagic is 1.5 * 2^52 (see encode).
const roundMagic = 0x1.8p52

// clip handles a sample whose scaled value v fell outside the integer
// range: it counts and saturates it, or reports false for NaN and Inf.
// Kept out of the loops so that they stay small.
func (q *quantizer) clip(x, v float64, i int) (float64, bool) {
	if x-x != 0 {
		return 0, false
	}
	q.clipped[i%q.channels]++
	if v > 0 {
		return q.hi, true
	}
	return q.lo, true
}

// encode converts len(src) samples to little-endian bytes in dst, and
// returns the index of the first non-finite sample, or -1. The channel of
// sample i is i % channels, worked out only when a sample clips.
//
// Rounding: v + 1.5*2^52 leaves round-half-even(v) in the low mantissa
// bits as two's complement for |v| < 2^51 (IEEE 754 default rounding;
// common practice). The dither noise (zeros when dither is off) is
// generated per block into q.noise so that one loop serves both cases.
func encode(k sampleKind, q *quantizer, src []float64, dst []byte) int {
	if k == kF32 || k == kF64 {
		return encodeFloat(k, src, dst)
	}
	noise := q.noise[:len(src)]
	if q.dither {
		for i := range noise {
			noise[i] = q.rng.tpdf()
		}
	}
	lo, hi, scale, shift := q.lo-0.5, q.hi+0.5, q.scale, q.shift
	switch k {
	case kU8:
		dst = dst[:len(src)]
		for i, x := range src {
			v := x*scale + noise[i]
			if !(v >= lo && v < hi) {
				var ok bool
				if v, ok = q.clip(x, v, i); !ok {
					return i
				}
			}
			dst[i] = byte(uint32(math.Float64bits(v+roundMagic))<<shift) + 128
		}
	case kS16:
		dst = dst[:2*len(src)]
		for i, x := range src {
			v := x*scale + noise[i]
			if !(v >= lo && v < hi) {
				var ok bool
				if v, ok = q.clip(x, v, i); !ok {
					return i
				}
			}
			n := uint32(math.Float64bits(v+roundMagic)) << shift
			d := dst[2*i : 2*i+2 : 2*i+2]
			d[0] = byte(n)
			d[1] = byte(n >> 8)
		}
	case kS24:
		dst = dst[:3*len(src)]
		for i, x := range src {
			v := x*scale + noise[i]
			if !(v >= lo && v < hi) {
				var ok bool
				if v, ok = q.clip(x, v, i); !ok {
					return i
				}
			}
			n := uint32(math.Float64bits(v+roundMagic)) << shift
			d := dst[3*i : 3*i+3 : 3*i+3]
			d[0] = byte(n)
			d[1] = byte(n >> 8)
			d[2] = byte(n >> 16)
		}
	case kS32:
		dst = dst[:4*len(src)]
		for i, x := range src {
			v := x*scale + noise[i]
			if !(v >= lo && v < hi) {
				var ok bool
				if v, ok = q.clip(x, v, i); !ok {
					return i
				}
			}
			binary.LittleEndian.PutUint32(dst[4*i:], uint32(math.Float64bits(v+roundMagic))<<shift)
		}
	case kSWide:
		// 40- to 64-bit containers: v may pass 2^51, where the
		// roundMagic trick stops working, so round explicitly; float64
		// holds 53 bits, so the lowest bits of a container wider than
		// that are always zero.
		width := q.width
		for i, x := range src {
			v := x*scale + noise[i]
			if !(v >= lo && v < hi) {
				var ok bool
				if v, ok = q.clip(x, v, i); !ok {
					return i
				}
			}
			n := min(max(wideInt(math.RoundToEven(v)), q.minN), q.maxN)
			u := uint64(n) << shift
			d := dst[width*i : width*i+width : width*i+width]
			for j := range d {
				d[j] = byte(u >> (8 * j))
			}
		}
	}
	return -1
}

// wideInt converts a whole float64 to int64, saturating: 2^63 itself,
// the float64 nearest to the top of a 64-bit range, becomes MaxInt64.
func wideInt(v float64) int64 {
	if v >= 0x1p63 {
		return math.MaxInt64
	}
	if v <= -0x1p63 {
		return math.MinInt64
	}
	return int64(v)
}

func encodeFloat(k sampleKind, src []float64, dst []byte) int {
	switch k {
	case kF32:
		dst = dst[:4*len(src)]
		for i, x := range src {
			f := float32(x)
			if f-f != 0 { // NaN, Inf, or beyond the float32 range
				return i
			}
			binary.LittleEndian.PutUint32(dst[4*i:], math.Float32bits(f))
		}
	case kF64:
		dst = dst[:8*len(src)]
		for i, x := range src {
			if x-x != 0 {
				return i
			}
			binary.LittleEndian.PutUint64(dst[8*i:], math.Float64bits(x))
		}
	}
	return -1
}
