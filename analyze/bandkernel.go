package analyze

import "github.com/wavsieve/wavsieve/design"

// Kernels of the band bank. A second-order section's recursion is a
// chain of dependent multiply-adds, so one section over a block runs at
// the latency of that chain, not at the CPU's throughput. The wavefront
// kernels give the CPU three or four independent chains per step:
// consecutive sections of one cascade, each a sample apart (wave3,
// wave4). Per sample and section they do the arithmetic of oneSection in
// the same order, so the results are the same bit for bit (tested).

// identity is a section that passes its input unchanged (its state stays
// zero): it pads cascades to a common length.
var identity = design.Section{1, 0, 0, 1, 0, 0}

// oneSection runs section s over x in place with state z.
func oneSection(x []float64, s *design.Section, z *[2]float64) {
	b0, b1, b2, a1, a2 := s[0], s[1], s[2], s[4], s[5]
	z1, z2 := z[0], z[1]
	for i, v := range x {
		y := b0*v + z1
		z1 = b1*v - a1*y + z2
		z2 = b2*v - a2*y
		x[i] = y
	}
	z[0], z[1] = z1, z2
}

// wave4 runs four consecutive sections over x in place, section k on
// sample i-k at step i, so that the four recursions of a step are
// independent. The first three and last three samples are done section
// by section.
func wave4(x []float64, sec *[4]design.Section, z *[4][2]float64) {
	n := len(x)
	if n < 4 {
		for k := range sec {
			oneSection(x, &sec[k], &z[k])
		}
		return
	}
	oneSection(x[0:3], &sec[0], &z[0])
	oneSection(x[0:2], &sec[1], &z[1])
	oneSection(x[0:1], &sec[2], &z[2])
	b00, b10, b20, a10, a20 := sec[0][0], sec[0][1], sec[0][2], sec[0][4], sec[0][5]
	b01, b11, b21, a11, a21 := sec[1][0], sec[1][1], sec[1][2], sec[1][4], sec[1][5]
	b02, b12, b22, a12, a22 := sec[2][0], sec[2][1], sec[2][2], sec[2][4], sec[2][5]
	b03, b13, b23, a13, a23 := sec[3][0], sec[3][1], sec[3][2], sec[3][4], sec[3][5]
	p0, q0, p1, q1 := z[0][0], z[0][1], z[1][0], z[1][1]
	p2, q2, p3, q3 := z[2][0], z[2][1], z[3][0], z[3][1]
	for i := 3; i < n; i++ {
		w := x[i-3 : i+1 : i+1]
		v0, v1, v2, v3 := w[3], w[2], w[1], w[0]
		y0 := b00*v0 + p0
		y1 := b01*v1 + p1
		y2 := b02*v2 + p2
		y3 := b03*v3 + p3
		p0 = b10*v0 - a10*y0 + q0
		p1 = b11*v1 - a11*y1 + q1
		p2 = b12*v2 - a12*y2 + q2
		p3 = b13*v3 - a13*y3 + q3
		q0 = b20*v0 - a20*y0
		q1 = b21*v1 - a21*y1
		q2 = b22*v2 - a22*y2
		q3 = b23*v3 - a23*y3
		w[3], w[2], w[1], w[0] = y0, y1, y2, y3
	}
	z[0][0], z[0][1], z[1][0], z[1][1] = p0, q0, p1, q1
	z[2][0], z[2][1], z[3][0], z[3][1] = p2, q2, p3, q3
	oneSection(x[n-1:], &sec[1], &z[1])
	oneSection(x[n-2:], &sec[2], &z[2])
	oneSection(x[n-3:], &sec[3], &z[3])
}

// wave3 is wave4 for three sections.
func wave3(x []float64, sec *[3]design.Section, z *[3][2]float64) {
	n := len(x)
	if n < 3 {
		for k := range sec {
			oneSection(x, &sec[k], &z[k])
		}
		return
	}
	oneSection(x[0:2], &sec[0], &z[0])
	oneSection(x[0:1], &sec[1], &z[1])
	b00, b10, b20, a10, a20 := sec[0][0], sec[0][1], sec[0][2], sec[0][4], sec[0][5]
	b01, b11, b21, a11, a21 := sec[1][0], sec[1][1], sec[1][2], sec[1][4], sec[1][5]
	b02, b12, b22, a12, a22 := sec[2][0], sec[2][1], sec[2][2], sec[2][4], sec[2][5]
	p0, q0, p1, q1 := z[0][0], z[0][1], z[1][0], z[1][1]
	p2, q2 := z[2][0], z[2][1]
	for i := 2; i < n; i++ {
		w := x[i-2 : i+1 : i+1]
		v0, v1, v2 := w[2], w[1], w[0]
		y0 := b00*v0 + p0
		y1 := b01*v1 + p1
		y2 := b02*v2 + p2
		p0 = b10*v0 - a10*y0 + q0
		p1 = b11*v1 - a11*y1 + q1
		p2 = b12*v2 - a12*y2 + q2
		q0 = b20*v0 - a20*y0
		q1 = b21*v1 - a21*y1
		q2 = b22*v2 - a22*y2
		w[2], w[1], w[0] = y0, y1, y2
	}
	z[0][0], z[0][1], z[1][0], z[1][1] = p0, q0, p1, q1
	z[2][0], z[2][1] = p2, q2
	oneSection(x[n-1:], &sec[1], &z[1])
	oneSection(x[n-2:], &sec[2], &z[2])
}
