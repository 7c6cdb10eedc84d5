package sh

import (
	"math"
	"sort"
)

// recursion holds the rescaled degree-recursion coefficients of every
// order (see the package note in transform.go): for order m and degree
// l >= m, alpha[off[m]+l-m] and cfac[off[m]+l-m].
type recursion struct {
	lmax        int
	off         []int
	alpha, cfac []float64
	sect        []float64 // sect[m] = Pbar_mm / (sin(theta) Pbar_{m-1,m-1})
}

func newRecursion(lmax int) *recursion {
	n := NumCoeffs(lmax)
	r := &recursion{lmax: lmax, off: make([]int, lmax+2), alpha: make([]float64, n), cfac: make([]float64, n), sect: make([]float64, lmax+1)}
	o := 0
	for m := 0; m <= lmax; m++ {
		r.off[m] = o
		fm := float64(m)
		if m == 1 {
			r.sect[m] = math.Sqrt(3)
		} else if m > 1 {
			r.sect[m] = math.Sqrt((2*fm + 1) / (2 * fm))
		}
		al := r.alpha[o : o+lmax-m+1]
		cf := r.cfac[o : o+lmax-m+1]
		cf[0] = 1
		if m < lmax {
			cf[1] = 1
			al[1] = math.Sqrt(2*fm + 3)
		}
		for l := m + 2; l <= lmax; l++ {
			fl := float64(l)
			a := math.Sqrt((4*fl*fl - 1) / ((fl - fm) * (fl + fm)))
			b := math.Sqrt((2*fl + 1) * (fl - 1 - fm) * (fl - 1 + fm) / ((2*fl - 3) * (fl - fm) * (fl + fm)))
			j := l - m
			cf[j] = -b * cf[j-2]
			al[j] = a * cf[j-1] / cf[j]
		}
		o += lmax - m + 1
	}
	r.off[lmax+1] = o
	return r
}

// ringSet groups rings into pairs symmetric about the equator.
type ringSet struct {
	north, south []int     // ring index of each pair; south -1 for a single ring
	x, s         []float64 // cos and sin of the colatitude of the north ring
}

// pairTol is the tolerance in radians for two rings to count as mirror images.
const pairTol = 1e-13

func newRingSet(colat []float64) *ringSet {
	type pr struct {
		n, s  int
		x, sn float64
	}
	var ps []pr
	i, j := 0, len(colat)-1
	for i <= j {
		switch {
		case i < j && math.Abs(colat[i]+colat[j]-math.Pi) <= pairTol:
			ps = append(ps, pr{i, j, math.Cos(colat[i]), math.Sin(colat[i])})
			i++
			j--
		case math.Abs(colat[i]-math.Pi/2) >= math.Abs(colat[j]-math.Pi/2):
			ps = append(ps, pr{i, -1, math.Cos(colat[i]), math.Sin(colat[i])})
			i++
		default:
			ps = append(ps, pr{j, -1, math.Cos(colat[j]), math.Sin(colat[j])})
			j--
		}
	}
	for k := range ps {
		if colat[ps[k].n] == 0 || colat[ps[k].n] == math.Pi {
			ps[k].sn = 0
		}
		if colat[ps[k].n] == math.Pi/2 {
			ps[k].x = 0
		}
	}
	// Pole-most pairs first: they join the fast loop last.
	sort.SliceStable(ps, func(a, b int) bool { return ps[a].sn < ps[b].sn })
	r := &ringSet{}
	for _, p := range ps {
		r.north = append(r.north, p.n)
		r.south = append(r.south, p.s)
		r.x = append(r.x, p.x)
		r.s = append(r.s, p.sn)
	}
	return r
}

// orderStarts lists, for one order m, the ring pairs whose functions reach
// a significant size (2^-200) at some degree <= lmax, sorted by the degree
// inj (m + 4k, a group start of the fast loop) at which they join it, with
// the recursion state (Q_{inj-1}, Q_{inj-2}) there (Q_{m-1} = 0 and
// Q_{m-2} = Pbar_mm by convention, so that the recursion yields Q_m).
type orderStarts struct {
	pair   []int32
	inj    []int32
	q1, q2 []float64
}

// appendStarts appends the entry state of every pair for order m to st,
// given the sectoral values sv * 2^(600 se) of order m.
func (r *ringSet) appendStarts(st *orderStarts, rc *recursion, m, lmax int, sv []float64, se []int) {
	al := rc.alpha[rc.off[m] : rc.off[m]+lmax-m+1]
	n0 := len(st.pair)
	for p := len(r.north) - 1; p >= 0; p-- {
		v, e := sv[p], se[p]
		if v == 0 {
			continue
		}
		x := r.x[p]
		// First pass: the first degree lk with |Pbar_lk m / c_lm| >= 2^-200.
		lk := m
		if e < 0 || v < startMin {
			qa, qb, ee := v, 0.0, e
			if ee == 0 {
				qa *= scaleBig
				ee = -1
			}
			for ee < 0 && lk < lmax {
				lk++
				qa, qb = al[lk-m]*x*qa+qb, qa
				if math.Abs(qa) >= scaleHigh {
					qa *= scaleSmall
					qb *= scaleSmall
					ee++
				}
			}
			if ee < 0 {
				continue
			}
		}
		inj := m + 4*((lk-m)/4)
		// Second pass: the state before degree inj, unscaled (the values
		// are tiny but normal: at most three steps below 2^-200).
		var q1, q2 float64
		if inj == m {
			q1, q2 = 0, math.Ldexp(v, 600*e)
		} else {
			qa, qb, ee := v, 0.0, e
			for l := m + 1; l < inj; l++ {
				qa, qb = al[l-m]*x*qa+qb, qa
				if ee < 0 && math.Abs(qa) >= scaleHigh {
					qa *= scaleSmall
					qb *= scaleSmall
					ee++
				}
			}
			q1, q2 = math.Ldexp(qa, 600*ee), math.Ldexp(qb, 600*ee)
		}
		st.pair = append(st.pair, int32(p))
		st.inj = append(st.inj, int32(inj))
		st.q1 = append(st.q1, q1)
		st.q2 = append(st.q2, q2)
	}
	// Sort this order's entries by inj (nearly sorted: insertion sort).
	pr, in, a, b := st.pair[n0:], st.inj[n0:], st.q1[n0:], st.q2[n0:]
	for i := 1; i < len(pr); i++ {
		for j := i; j > 0 && in[j] < in[j-1]; j-- {
			pr[j], pr[j-1] = pr[j-1], pr[j]
			in[j], in[j-1] = in[j-1], in[j]
			a[j], a[j-1] = a[j-1], a[j]
			b[j], b[j-1] = b[j-1], b[j]
		}
	}
}

// startTable holds orderStarts for every order of a plan.
type startTable struct {
	off []int // entries of order m are [off[m], off[m+1])
	all orderStarts
}

func newStartTable(r *ringSet, rc *recursion, lmax int) *startTable {
	np := len(r.north)
	sv, se := make([]float64, np), make([]int, np)
	t := &startTable{off: make([]int, lmax+2)}
	for m := 0; m <= lmax; m++ {
		r.sectoral(sv, se, rc, m)
		t.off[m] = len(t.all.pair)
		r.appendStarts(&t.all, rc, m, lmax, sv, se)
	}
	t.off[lmax+1] = len(t.all.pair)
	return t
}

func (t *startTable) order(m int) orderStarts {
	a, b := t.off[m], t.off[m+1]
	return orderStarts{t.all.pair[a:b], t.all.inj[a:b], t.all.q1[a:b], t.all.q2[a:b]}
}

// sectoral advances the scaled start values sv * 2^(600 se) to order m
// (from order m-1; m = 0 initialises): Pbar_00 = 1/sqrt(4 pi),
// Pbar_mm = sect[m] sin(theta) Pbar_{m-1,m-1} (Holmes & Featherstone 2002,
// eq. 13).
func (r *ringSet) sectoral(sv []float64, se []int, rc *recursion, m int) {
	if m == 0 {
		for p := range sv {
			sv[p], se[p] = 1/math.Sqrt(4*math.Pi), 0
		}
		return
	}
	f := rc.sect[m]
	for p, s := range r.s {
		v := sv[p] * f * s
		if v < scaleLow && v != 0 {
			v *= scaleBig
			se[p]--
		}
		sv[p] = v
	}
}

// legendre runs the degree recursion of order m over the ring pairs listed
// in st. Synthesis (adj false): accumulates sum_l cr[l-m] Q_lm (and ci)
// into er, ei (l-m even) and or, oi (l-m odd) per pair. Adjoint (adj true):
// accumulates sum_pairs Q_lm * (er, ei or or, oi by parity) into cr[l-m],
// ci[l-m]. The fast loop runs over the contiguous range of pairs
// [k0, npair) that have joined (pole-most pairs join last); pairs inside
// the range that have not joined yet carry zeros.
func (r *ringSet) legendre(w *legWork, rc *recursion, m, lmax int, adj bool, st orderStarts) {
	np := len(r.north)
	al := rc.alpha[rc.off[m] : rc.off[m]+lmax-m+1]
	cr, ci := w.cr[:lmax-m+1], w.ci[:lmax-m+1]
	if !adj {
		clear(w.er)
		clear(w.ei)
		clear(w.or)
		clear(w.oi)
	}
	if len(st.pair) == 0 {
		return
	}
	k0 := int(st.pair[0])
	for _, p := range st.pair {
		k0 = min(k0, int(p))
	}
	clear(w.q1[k0:])
	clear(w.q2[k0:])
	ngroup := (lmax - m + 1) / 4
	tail := m + 4*ngroup
	k0 = np
	ptr := 0
	for g := range ngroup {
		l0 := m + 4*g
		for ptr < len(st.pair) && int(st.inj[ptr]) == l0 {
			p := int(st.pair[ptr])
			w.q1[p], w.q2[p] = st.q1[ptr], st.q2[ptr]
			k0 = min(k0, p)
			ptr++
		}
		if k0 == np {
			continue
		}
		j := l0 - m
		a := al[j : j+4 : j+4]
		if adj {
			s := adjGroup(r.x[k0:], w.q1[k0:], w.q2[k0:], w.er[k0:], w.ei[k0:], w.or[k0:], w.oi[k0:], a[0], a[1], a[2], a[3])
			cr[j] += s[0]
			ci[j] += s[1]
			cr[j+1] += s[2]
			ci[j+1] += s[3]
			cr[j+2] += s[4]
			ci[j+2] += s[5]
			cr[j+3] += s[6]
			ci[j+3] += s[7]
		} else {
			c := cr[j : j+4 : j+4]
			d := ci[j : j+4 : j+4]
			synthGroup(r.x[k0:], w.q1[k0:], w.q2[k0:], w.er[k0:], w.ei[k0:], w.or[k0:], w.oi[k0:],
				a[0], a[1], a[2], a[3], c[0], c[1], c[2], c[3], d[0], d[1], d[2], d[3])
		}
	}
	for ptr < len(st.pair) && int(st.inj[ptr]) == tail {
		p := int(st.pair[ptr])
		w.q1[p], w.q2[p] = st.q1[ptr], st.q2[ptr]
		k0 = min(k0, p)
		ptr++
	}
	if k0 == np {
		return
	}
	for l := tail; l <= lmax; l++ {
		j := l - m
		a := al[j]
		xs := r.x[k0:]
		q1 := w.q1[k0:]
		q1 = q1[:len(xs)]
		q2 := w.q2[k0:]
		q2 = q2[:len(xs)]
		var sr, si []float64
		if j&1 == 0 {
			sr, si = w.er[k0:], w.ei[k0:]
		} else {
			sr, si = w.or[k0:], w.oi[k0:]
		}
		sr, si = sr[:len(xs)], si[:len(xs)]
		if adj {
			var u, v float64
			for k, x := range xs {
				q := a*x*q1[k] + q2[k]
				q2[k], q1[k] = q1[k], q
				u += q * sr[k]
				v += q * si[k]
			}
			cr[j] += u
			ci[j] += v
		} else {
			c, d := cr[j], ci[j]
			for k, x := range xs {
				q := a*x*q1[k] + q2[k]
				q2[k], q1[k] = q1[k], q
				sr[k] += c * q
				si[k] += d * q
			}
		}
	}
}

// synthGroup advances the recursion of every pair by the four degrees
// l0..l0+3 (l0-m even) and accumulates the synthesis sums.
func synthGroup(xs, q1, q2, er, ei, or, oi []float64, a0, a1, a2, a3, c0, c1, c2, c3, d0, d1, d2, d3 float64) {
	n := len(xs)
	q1, q2 = q1[:n], q2[:n]
	er, ei, or, oi = er[:n], ei[:n], or[:n], oi[:n]
	for k, x := range xs {
		p1, p2 := q1[k], q2[k]
		t0 := a0*x*p1 + p2
		t1 := a1*x*t0 + p1
		t2 := a2*x*t1 + t0
		t3 := a3*x*t2 + t1
		er[k] += c0*t0 + c2*t2
		ei[k] += d0*t0 + d2*t2
		or[k] += c1*t1 + c3*t3
		oi[k] += d1*t1 + d3*t3
		q1[k], q2[k] = t3, t2
	}
}

// adjGroup advances the recursion of every pair by the four degrees
// l0..l0+3 (l0-m even) and returns the analysis sums (re, im) per degree.
func adjGroup(xs, q1, q2, er, ei, or, oi []float64, a0, a1, a2, a3 float64) (s [8]float64) {
	n := len(xs)
	q1, q2 = q1[:n], q2[:n]
	er, ei, or, oi = er[:n], ei[:n], or[:n], oi[:n]
	var s0, s1, s2, s3, s4, s5, s6, s7 float64
	for k, x := range xs {
		p1, p2 := q1[k], q2[k]
		t0 := a0*x*p1 + p2
		t1 := a1*x*t0 + p1
		t2 := a2*x*t1 + t0
		t3 := a3*x*t2 + t1
		vr, vi, ur, ui := er[k], ei[k], or[k], oi[k]
		s0 += t0 * vr
		s1 += t0 * vi
		s2 += t1 * ur
		s3 += t1 * ui
		s4 += t2 * vr
		s5 += t2 * vi
		s6 += t3 * ur
		s7 += t3 * ui
		q1[k], q2[k] = t3, t2
	}
	return [8]float64{s0, s1, s2, s3, s4, s5, s6, s7}
}
