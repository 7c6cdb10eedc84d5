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

// sectoralInit sets the start values to Pbar_00 = 1/sqrt(4 pi).
func (r *ringSet) sectoralInit(w *legWork) {
	for p := range r.north {
		w.sv[p] = 1 / math.Sqrt(4*math.Pi)
		w.se[p] = 0
	}
}

// sectoralStep advances the scaled start values from order m-1 to m:
// Pbar_mm = sect[m] sin(theta) Pbar_{m-1,m-1} (Holmes & Featherstone 2002,
// eq. 13), true value sv * 2^(600 se).
func (r *ringSet) sectoralStep(w *legWork, sect float64) {
	for p, s := range r.s {
		v := w.sv[p] * sect * s
		if v < scaleLow && v != 0 {
			v *= scaleBig
			w.se[p]--
		}
		w.sv[p] = v
	}
}

// legendre runs the degree recursion of order m over all ring pairs.
// Synthesis (adj false): accumulates sum_l cr[l-m] Pbar_lm/c_lm (and ci)
// into er, ei (l-m even) and or, oi (l-m odd) per pair.
// Adjoint (adj true): accumulates sum_pairs Q_lm * (er, ei or or, oi by
// parity) into cr[l-m], ci[l-m].
func (r *ringSet) legendre(w *legWork, rc *recursion, m, lmax int, adj bool) {
	np := len(r.north)
	al := rc.alpha[rc.off[m] : rc.off[m]+lmax-m+1]
	cr, ci := w.cr[:lmax-m+1], w.ci[:lmax-m+1]
	if !adj {
		clear(w.er)
		clear(w.ei)
		clear(w.or)
		clear(w.oi)
	}
	clear(w.q1)
	clear(w.q2)
	ngroup := (lmax - m) / 4
	tail := m + 1 + 4*ngroup
	nact := 0
	for p := np - 1; p >= 0; p-- {
		v, e := w.sv[p], w.se[p]
		if v == 0 {
			continue
		}
		x := r.x[p]
		l := m
		qa, qb := v, 0.0
		if e < 0 || v < startMin {
			// Scaled phase: true value qa * 2^(600 e).
			if e == 0 {
				qa *= scaleBig
				e = -1
			}
			for e < 0 && l < lmax {
				l++
				qa, qb = al[l-m]*x*qa+qb, qa
				if math.Abs(qa) >= scaleHigh {
					qa *= scaleSmall
					qb *= scaleSmall
					e++
				}
			}
			if e < 0 {
				continue // never reaches a significant size
			}
		}
		// Scalar advance from l to the pair's entry into the fast loop.
		inj := lmax + 1
		if l < tail {
			inj = min(m+1+4*((l-m+3)/4), tail)
		}
		for {
			j := l - m
			if adj {
				if j&1 == 0 {
					cr[j] += qa * w.er[p]
					ci[j] += qa * w.ei[p]
				} else {
					cr[j] += qa * w.or[p]
					ci[j] += qa * w.oi[p]
				}
			} else {
				if j&1 == 0 {
					w.er[p] += cr[j] * qa
					w.ei[p] += ci[j] * qa
				} else {
					w.or[p] += cr[j] * qa
					w.oi[p] += ci[j] * qa
				}
			}
			if l+1 >= inj {
				break
			}
			l++
			qa, qb = al[l-m]*x*qa+qb, qa
		}
		if inj <= lmax {
			w.inj[p] = inj
			w.order[nact] = p
			nact++
			w.ia[p], w.ib[p] = qa, qb
		}
	}
	// Pairs sorted by entry degree (nearly sorted already: insertion sort).
	ord := w.order[:nact]
	for i := 1; i < len(ord); i++ {
		for j := i; j > 0 && w.inj[ord[j]] < w.inj[ord[j-1]]; j-- {
			ord[j], ord[j-1] = ord[j-1], ord[j]
		}
	}
	k0, ptr := np, 0
	for g := range ngroup {
		l0 := m + 1 + 4*g
		k0, ptr = w.join(ord, ptr, k0, l0)
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
	k0, _ = w.join(ord, ptr, k0, tail)
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

// join copies the start state of the pairs entering at degree l0 into the
// fast-loop state and returns the new lowest active pair and list position.
func (w *legWork) join(ord []int, ptr, k0, l0 int) (int, int) {
	for ptr < len(ord) && w.inj[ord[ptr]] == l0 {
		p := ord[ptr]
		w.q1[p], w.q2[p] = w.ia[p], w.ib[p]
		k0 = min(k0, p)
		ptr++
	}
	return k0, ptr
}

// synthGroup advances the recursion of every pair by the four degrees
// l0..l0+3 (l0-m odd) and accumulates the synthesis sums.
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
		or[k] += c0*t0 + c2*t2
		oi[k] += d0*t0 + d2*t2
		er[k] += c1*t1 + c3*t3
		ei[k] += d1*t1 + d3*t3
		q1[k], q2[k] = t3, t2
	}
}

// adjGroup advances the recursion of every pair by the four degrees
// l0..l0+3 (l0-m odd) and returns the analysis sums (re, im) per degree.
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
		ur, ui, vr, vi := or[k], oi[k], er[k], ei[k]
		s0 += t0 * ur
		s1 += t0 * ui
		s2 += t1 * vr
		s3 += t1 * vi
		s4 += t2 * ur
		s5 += t2 * ui
		s6 += t3 * vr
		s7 += t3 * vi
		q1[k], q2[k] = t3, t2
	}
	return [8]float64{s0, s1, s2, s3, s4, s5, s6, s7}
}
