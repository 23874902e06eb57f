package modem

// shiftGroup runs the first stages of four or two channels whose windows
// coincide — the same tap count, decimation and output phase, as the
// channels of one mode and bandwidth in a capture have — over a block in
// one kernel pass: each window's pair sums and differences are formed
// once for all of them, which is most of the work of a symmetric first
// stage besides the multiply-adds. Four channels run in dotSym4AVX2, two
// in dotSym2x2AVX2 (two outputs of each a pass). A channel's outputs are
// those of its ShiftDecimator.Block up to the rounding of the rotation
// phasor. Built only where the kernels run (see newShiftGroup).
type shiftGroup struct {
	sds    []*ShiftDecimator
	taps   []float32   // per group of four pair slots: pa, −pb of each kernel lane's channel
	rd     [16]float64 // rotations, as the kernel reads them
	groups int         // groups of four pair slots
}

// newShiftGroup returns the group of sds (four or two decimators), or nil
// when the kernels cannot run them together: no kernels in this build,
// another number of decimators, one without the symmetric layout, or
// windows that differ.
func newShiftGroup(sds []*ShiftDecimator) *shiftGroup {
	lanes := len(sds)
	if !haveKernels || (lanes != 2 && lanes != 4) {
		return nil
	}
	s0 := sds[0]
	for _, s := range sds {
		if s.st == nil || s.l != s0.l || s.d != s0.d || s.phase != s0.phase || s.st.groups != s0.st.groups {
			return nil
		}
	}
	g := &shiftGroup{sds: sds, groups: s0.st.groups, taps: make([]float32, 16*lanes*s0.st.groups)}
	for c, s := range sds {
		for k := range g.groups {
			copy(g.taps[16*(lanes*k+c):], s.st.pa[8*k:8*k+8])
			copy(g.taps[16*(lanes*k+c)+8:], s.st.pb[8*k:8*k+8])
		}
		if lanes == 2 {
			// both outputs of a pass advance by r²
			r2 := s.rot * s.rot
			for i := range 4 {
				g.rd[8*c+i], g.rd[8*c+4+i] = real(r2), imag(r2)
			}
			continue
		}
		b := 8*(c%2) + 2*(c/2) // (r₀, r₂) then (r₁, r₃)
		g.rd[b], g.rd[b+1] = real(s.rot), real(s.rot)
		g.rd[b+4], g.rd[b+5] = imag(s.rot), imag(s.rot)
	}
	return g
}

// block appends to outs[c] the outputs of channel c for the window win of
// absolute start a, as ShiftDecimator.Block does. outs has one slice per
// decimator of the group.
func (g *shiftGroup) block(outs [][]complex64, win []complex64, a int64) {
	s0 := g.sds[0]
	l := s0.l
	n, cnt := s0.span(a, int64(len(win)-(l-1)))
	if cnt == 0 {
		return
	}
	w := win[n-a:] // the first output's window onwards
	if (cnt-1)*s0.d+l > len(w) {
		panic("modem: kernel window too short")
	}
	var out [4]*complex64
	for c := range g.sds {
		k := len(outs[c])
		outs[c] = grow(outs[c], cnt)[:k+cnt]
		out[c] = &outs[c][k]
	}
	var q [8]float64
	if len(g.sds) == 2 {
		for c, s := range g.sds {
			p := phasor(s.base+uint64(n)*s.step) * s.post
			p1 := p * s.rot
			q[4*c], q[4*c+1], q[4*c+2], q[4*c+3] = real(p), imag(p), real(p1), imag(p1)
		}
		o2 := [2]*complex64{out[0], out[1]}
		dotSym2x2AVX2(&o2, cnt, &w[0], s0.d, &g.taps[0], g.groups, 8*(l-4), &q, &g.rd)
		return
	}
	for c, s := range g.sds {
		p := phasor(s.base+uint64(n)*s.step) * s.post
		b := 4*(c%2) + 2*(c/2) // (q₀, q₂) then (q₁, q₃)
		q[b], q[b+1] = real(p), imag(p)
	}
	dotSym4AVX2(&out, cnt, &w[0], s0.d, &g.taps[0], g.groups, 8*(l-4), &q, &g.rd)
}
