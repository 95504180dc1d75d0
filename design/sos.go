package design

import (
	"math"
	"math/cmplx"
	"sort"
)

// ToSections turns a digital zeros/poles/gain into second-order sections.
// Each pole pair (a complex pair, or two real poles taken in order of
// their distance to the unit circle) is matched with the zeros nearest to
// it, starting with the poles closest to the unit circle so that the
// sharpest resonances get the best cancellation. The sections are then
// ordered by increasing pole radius, so the highest-Q section runs last,
// and the gain is spread so that the cascade up to each section has a peak
// magnitude of at most the overall peak (L-infinity scaling; Jackson,
// "Digital Filters and Signal Processing", 3rd ed., section 11.4): no
// intermediate signal is louder than a full-scale sine can make the output.
// A filter of odd order gets one first-order section (b2 = a2 = 0).
func ToSections(f ZPK) []Section {
	poles := splitRoots(f.Poles)
	zeros := splitRoots(f.Zeros)

	// Pole groups: each complex pair alone, real poles two by two.
	type group struct {
		p []complex128 // the pair's upper member for complex, or one or two reals
		c bool
		r float64 // largest radius in the group
	}
	var groups []group
	for _, p := range poles.cplx {
		groups = append(groups, group{p: []complex128{p}, c: true, r: cmplx.Abs(p)})
	}
	reals := poles.real
	sort.Slice(reals, func(i, j int) bool { return cmplx.Abs(reals[i]) > cmplx.Abs(reals[j]) })
	for i := 0; i < len(reals); i += 2 {
		g := group{p: []complex128{reals[i]}, r: cmplx.Abs(reals[i])}
		if i+1 < len(reals) {
			g.p = append(g.p, reals[i+1])
		}
		groups = append(groups, g)
	}
	sort.SliceStable(groups, func(i, j int) bool { return groups[i].r > groups[j].r })

	type built struct {
		sec Section
		r   float64
	}
	out := make([]built, 0, len(groups))
	for _, g := range groups {
		var den [3]float64
		if g.c {
			den = quadFromPair(g.p[0])
		} else {
			den = quadFromReals(g.p)
		}
		var zs []complex128 // chosen zeros, complex given as the pair's upper member
		var zc bool
		order := 2
		if !g.c && len(g.p) == 1 {
			order = 1
		}
		target := g.p[0]
		if order == 2 {
			if z, isC, ok := zeros.takeNearest(target, true); ok {
				if isC {
					zs, zc = []complex128{z}, true
				} else {
					zs = []complex128{z}
					t2 := target
					if !g.c && len(g.p) == 2 {
						t2 = g.p[1]
					}
					if z2, _, ok := zeros.takeNearest(t2, false); ok {
						zs = append(zs, z2)
					}
				}
			}
		} else if z, _, ok := zeros.takeNearest(target, false); ok {
			zs = []complex128{z}
		} else if z, _, ok := zeros.takeNearest(target, true); ok {
			// Only complex zeros left for a lone real pole: it becomes a
			// second-order section with a real pole pair of (p, 0).
			zs, zc = []complex128{z}, true
			order = 2
		}
		var num [3]float64
		if zc {
			num = quadFromPair(zs[0])
		} else {
			num = quadFromReals(zs)
		}
		var s Section
		if order == 1 && len(zs) <= 1 {
			s = Section{num[0], num[1], 0, 1, den[1], 0}
		} else {
			s = Section{num[0], num[1], num[2], 1, den[1], den[2]}
		}
		out = append(out, built{sec: s, r: g.r})
	}
	// Zeros left over (more zeros than poles can only come from a caller's
	// hand-made ZPK) go into pure FIR sections.
	for len(zeros.cplx)+len(zeros.real) > 0 {
		var num [3]float64
		if len(zeros.cplx) > 0 {
			num = quadFromPair(zeros.cplx[0])
			zeros.cplx = zeros.cplx[1:]
		} else {
			n := min(2, len(zeros.real))
			num = quadFromReals(zeros.real[:n])
			zeros.real = zeros.real[n:]
		}
		out = append([]built{{sec: Section{num[0], num[1], num[2], 1, 0, 0}}}, out...)
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].r < out[j].r })
	secs := make([]Section, len(out))
	for i, b := range out {
		secs[i] = b.sec
	}
	spreadGain(secs, f.Gain)
	return secs
}

type rootSet struct {
	cplx []complex128 // upper members of conjugate pairs
	real []complex128
}

// splitRoots separates real roots from conjugate pairs, keeping one member
// of each pair. A root whose imaginary part is below 1e-12 of its size
// counts as real.
func splitRoots(r []complex128) rootSet {
	var s rootSet
	for _, v := range r {
		switch {
		case math.Abs(imag(v)) <= 1e-12*math.Max(cmplx.Abs(v), 1e-300):
			s.real = append(s.real, complex(real(v), 0))
		case imag(v) > 0:
			s.cplx = append(s.cplx, v)
		}
	}
	return s
}

// takeNearest removes and returns the root nearest to t: among all roots
// when any is true, among the real ones otherwise.
func (s *rootSet) takeNearest(t complex128, any bool) (complex128, bool, bool) {
	best, bi, bc := math.Inf(1), -1, false
	for i, v := range s.real {
		if d := cmplx.Abs(v - t); d < best {
			best, bi, bc = d, i, false
		}
	}
	if any {
		for i, v := range s.cplx {
			d := math.Min(cmplx.Abs(v-t), cmplx.Abs(cmplx.Conj(v)-t))
			if d < best {
				best, bi, bc = d, i, true
			}
		}
	}
	if bi < 0 {
		return 0, false, false
	}
	if bc {
		v := s.cplx[bi]
		s.cplx = append(s.cplx[:bi], s.cplx[bi+1:]...)
		return v, true, true
	}
	v := s.real[bi]
	s.real = append(s.real[:bi], s.real[bi+1:]...)
	return v, false, true
}

// quadFromPair returns 1, -2 Re r, |r|^2: the polynomial (1 - r x)(1 - r* x).
func quadFromPair(r complex128) [3]float64 {
	return [3]float64{1, -2 * real(r), real(r)*real(r) + imag(r)*imag(r)}
}

// quadFromReals returns the monic polynomial in z^-1 with the given real roots (0, 1 or 2).
func quadFromReals(r []complex128) [3]float64 {
	switch len(r) {
	case 0:
		return [3]float64{1, 0, 0}
	case 1:
		return [3]float64{1, -real(r[0]), 0}
	default:
		return [3]float64{1, -(real(r[0]) + real(r[1])), real(r[0]) * real(r[1])}
	}
}

// spreadGain scales the numerators so that the running product of the
// sections up to each one peaks at the peak of the whole filter (or 1,
// whichever is smaller), the last section taking what remains of k.
func spreadGain(secs []Section, k float64) {
	if len(secs) == 0 {
		return
	}
	grid := peakGrid(secs)
	total := 0.0
	for _, w := range grid {
		total = math.Max(total, cmplx.Abs(sectionsAt(secs, w))*math.Abs(k))
	}
	target := math.Min(total, 1)
	if target == 0 || math.IsNaN(target) || math.IsInf(target, 0) {
		target = 1
	}
	// cum[j] is the running product of the scaled sections at grid[j],
	// updated one section at a time.
	cum := make([]complex128, len(grid))
	for j := range cum {
		cum[j] = 1
	}
	applied := 1.0
	for i := 0; i < len(secs)-1; i++ {
		peak := 0.0
		for j, w := range grid {
			cum[j] *= sectionsAt(secs[i:i+1], w)
			peak = math.Max(peak, cmplx.Abs(cum[j]))
		}
		if peak == 0 || math.IsInf(peak, 0) || math.IsNaN(peak) {
			continue
		}
		g := target / peak
		for j := 0; j < 3; j++ {
			secs[i][j] *= g
		}
		for j := range cum {
			cum[j] *= complex(g, 0)
		}
		applied *= g
	}
	last := &secs[len(secs)-1]
	for j := 0; j < 3; j++ {
		last[j] *= k / applied
	}
}

// peakGrid returns digital frequencies (rad/sample) that catch every peak:
// a uniform grid plus the angle of each pole.
func peakGrid(secs []Section) []float64 {
	const n = 2048
	g := make([]float64, 0, n+2*len(secs)+1)
	for i := 0; i <= n; i++ {
		g = append(g, math.Pi*float64(i)/n)
	}
	for _, s := range secs {
		// Resonant pole angle of 1 + a1 z^-1 + a2 z^-2, when complex.
		if s[5] > 0 && s[4]*s[4] < 4*s[5] {
			r := math.Sqrt(s[5])
			c := -s[4] / (2 * r)
			if c >= -1 && c <= 1 {
				a := math.Acos(c)
				g = append(g, a, a*(1-1e-6), a*(1+1e-6))
			}
		}
	}
	return g
}

// sectionsAt evaluates the cascade at w rad/sample.
func sectionsAt(secs []Section, w float64) complex128 {
	z1 := cmplx.Exp(complex(0, -w))
	z2 := z1 * z1
	h := complex(1, 0)
	for _, s := range secs {
		num := complex(s[0], 0) + complex(s[1], 0)*z1 + complex(s[2], 0)*z2
		den := complex(s[3], 0) + complex(s[4], 0)*z1 + complex(s[5], 0)*z2
		h *= num / den
	}
	return h
}
