package sh

import (
	"fmt"
	"math"
	"sync"
)

// Points is a reusable plan for synthesis at, and the transposed operator
// from, a set of scattered points (colatitude, east longitude, radians).
// Points with the same colatitude form one ring and share its Legendre sums;
// rings mirrored about the equator share their recursion. One synthesis
// costs O(LMax^2) per distinct colatitude pair plus O(LMax) per point, so a
// regular grid given as a list of points costs little more than on a Grid.
// Points is safe for concurrent use.
type Points struct {
	lmax       int
	colat, lon []float64
	rc         *recursion
	rg         *ringSet  // over the distinct colatitudes
	ringStart  []int     // points of ring r are pts[ringStart[r]:ringStart[r+1]]
	pts        []int     // point indices grouped by ring
	c1, s1     []float64 // cos and sin of each longitude
	pool       sync.Pool // *pointWork
}

type pointWork struct {
	leg    legWork
	cm, sm []float64 // cos(m lon), sin(m lon) per point
}

// NewPoints returns a plan for degree lmax at the given points; the slices
// are copied. It panics if lmax < 0, the lengths differ, or a colatitude is
// outside [0, pi] or a longitude is not finite.
func NewPoints(lmax int, colat, lon []float64) *Points {
	if lmax < 0 {
		panic("sh: NewPoints with negative lmax")
	}
	if len(colat) != len(lon) {
		panic(fmt.Sprintf("sh: NewPoints with %d colatitudes and %d longitudes", len(colat), len(lon)))
	}
	for i := range colat {
		if !(colat[i] >= 0 && colat[i] <= math.Pi) || math.IsNaN(lon[i]) || math.IsInf(lon[i], 0) {
			panic(fmt.Sprintf("sh: point %d at colatitude %v, longitude %v is not on the sphere", i, colat[i], lon[i]))
		}
	}
	p := &Points{lmax: lmax, colat: append([]float64(nil), colat...), lon: append([]float64(nil), lon...), rc: newRecursion(lmax)}
	p.pts = make([]int, len(colat))
	for i := range p.pts {
		p.pts[i] = i
	}
	sortByColat(p.pts, p.colat)
	var ucolat []float64
	for k, i := range p.pts {
		if k == 0 || p.colat[i] != ucolat[len(ucolat)-1] {
			ucolat = append(ucolat, p.colat[i])
			p.ringStart = append(p.ringStart, k)
		}
	}
	p.ringStart = append(p.ringStart, len(p.pts))
	if len(ucolat) > 0 {
		p.rg = newRingSet(ucolat)
	} else {
		p.rg = &ringSet{}
	}
	p.c1, p.s1 = make([]float64, len(lon)), make([]float64, len(lon))
	for i, l := range p.lon {
		p.s1[i], p.c1[i] = math.Sincos(l)
	}
	return p
}

// ring returns the point indices of distinct-colatitude ring r.
func (p *Points) ring(r int) []int { return p.pts[p.ringStart[r]:p.ringStart[r+1]] }

func sortByColat(idx []int, colat []float64) {
	// Simple merge sort keeps this allocation-light and stable.
	if len(idx) < 2 {
		return
	}
	tmp := make([]int, len(idx))
	var rec func(a, t []int)
	rec = func(a, t []int) {
		if len(a) < 2 {
			return
		}
		h := len(a) / 2
		rec(a[:h], t[:h])
		rec(a[h:], t[h:])
		i, j, k := 0, h, 0
		for i < h && j < len(a) {
			if colat[a[j]] < colat[a[i]] {
				t[k] = a[j]
				j++
			} else {
				t[k] = a[i]
				i++
			}
			k++
		}
		k += copy(t[k:], a[i:h])
		copy(t[k:], a[j:])
		copy(a, t[:len(a)])
	}
	rec(idx, tmp)
}

// LMax returns the degree of the plan.
func (p *Points) LMax() int { return p.lmax }

// Len returns the number of points.
func (p *Points) Len() int { return len(p.colat) }

func (p *Points) get() *pointWork {
	if v := p.pool.Get(); v != nil {
		return v.(*pointWork)
	}
	return &pointWork{leg: newLegWork(len(p.rg.north), p.lmax), cm: make([]float64, len(p.lon)), sm: make([]float64, len(p.lon))}
}

// Synthesis evaluates the field of c (canonical; degrees above the plan's
// LMax ignored) at the points into dst (allocated when nil) and returns it.
func (p *Points) Synthesis(dst []float64, c *Coeffs) []float64 {
	if c.Conv != Canonical {
		panic("sh: Points.Synthesis needs canonical coefficients")
	}
	if dst == nil {
		dst = make([]float64, len(p.lon))
	} else if len(dst) != len(p.lon) {
		panic(fmt.Sprintf("sh: Points.Synthesis destination has length %d, want %d", len(dst), len(p.lon)))
	}
	clear(dst)
	w := p.get()
	defer p.pool.Put(w)
	lmax := min(p.lmax, c.LMax)
	for m := 0; m <= lmax; m++ {
		p.trig(w, m)
		lw := &w.leg
		p.rg.sectoral(lw.sv, lw.se, p.rc, m)
		cf := p.rc.cfac[p.rc.off[m] : p.rc.off[m]+lmax-m+1]
		for j := range cf {
			i := Index(m+j, m)
			lw.cr[j], lw.ci[j] = c.C[i]*cf[j], c.S[i]*cf[j]
		}
		p.rg.legendre(lw, p.rc, m, lmax, false, p.starts(lw, m, lmax))
		for q, n := range p.rg.north {
			a, b := lw.er[q]+lw.or[q], lw.ei[q]+lw.oi[q]
			for _, i := range p.ring(n) {
				dst[i] += a*w.cm[i] + b*w.sm[i]
			}
			if s := p.rg.south[q]; s >= 0 {
				a, b := lw.er[q]-lw.or[q], lw.ei[q]-lw.oi[q]
				for _, i := range p.ring(s) {
					dst[i] += a*w.cm[i] + b*w.sm[i]
				}
			}
		}
	}
	return dst
}

// Adjoint computes the transpose of Synthesis,
// dst_lm = sum_p v_p Y_lm(theta_p, phi_p) (cosine and sine parts), into dst
// (allocated when nil; LMax must match) and returns it.
func (p *Points) Adjoint(dst *Coeffs, v []float64) *Coeffs {
	if len(v) != len(p.lon) {
		panic(fmt.Sprintf("sh: Points.Adjoint input has length %d, want %d", len(v), len(p.lon)))
	}
	if dst == nil {
		dst = NewCoeffs(p.lmax, Canonical)
	} else if dst.LMax != p.lmax || dst.Conv != Canonical {
		panic("sh: Points.Adjoint destination does not match the plan")
	}
	w := p.get()
	defer p.pool.Put(w)
	lw := &w.leg
	for m := 0; m <= p.lmax; m++ {
		p.trig(w, m)
		for q, n := range p.rg.north {
			var gr, gi, hr, hi float64
			for _, i := range p.ring(n) {
				gr += v[i] * w.cm[i]
				gi += v[i] * w.sm[i]
			}
			if s := p.rg.south[q]; s >= 0 {
				for _, i := range p.ring(s) {
					hr += v[i] * w.cm[i]
					hi += v[i] * w.sm[i]
				}
			}
			lw.er[q], lw.ei[q] = gr+hr, gi+hi
			lw.or[q], lw.oi[q] = gr-hr, gi-hi
		}
		p.rg.sectoral(lw.sv, lw.se, p.rc, m)
		nl := p.lmax - m + 1
		clear(lw.cr[:nl])
		clear(lw.ci[:nl])
		p.rg.legendre(lw, p.rc, m, p.lmax, true, p.starts(lw, m, p.lmax))
		cf := p.rc.cfac[p.rc.off[m] : p.rc.off[m]+nl]
		for j := range cf {
			i := Index(m+j, m)
			dst.C[i] = lw.cr[j] * cf[j]
			if m > 0 {
				dst.S[i] = lw.ci[j] * cf[j]
			} else {
				dst.S[i] = 0
			}
		}
	}
	return dst
}

// starts computes the entry states of order m into the workspace.
func (p *Points) starts(lw *legWork, m, lmax int) orderStarts {
	lw.st.pair, lw.st.inj, lw.st.q1, lw.st.q2 = lw.st.pair[:0], lw.st.inj[:0], lw.st.q1[:0], lw.st.q2[:0]
	p.rg.appendStarts(&lw.st, p.rc, m, lmax, lw.sv, lw.se)
	return lw.st
}

// trig sets cm, sm to cos(m lon), sin(m lon); exact values every 32 orders,
// angle addition in between (error a few ulp).
func (p *Points) trig(w *pointWork, m int) {
	if m%32 == 0 {
		for i, l := range p.lon {
			w.sm[i], w.cm[i] = math.Sincos(float64(m) * l)
		}
		return
	}
	for i, c1 := range p.c1 {
		s1 := p.s1[i]
		c, s := w.cm[i], w.sm[i]
		w.cm[i], w.sm[i] = c*c1-s*s1, s*c1+c*s1
	}
}

// EvaluatePoints returns the field of c at the points (colat[i], lon[i])
// (radians) in dst (allocated when nil). It is a one-shot Points.Synthesis.
func EvaluatePoints(dst []float64, c *Coeffs, colat, lon []float64) []float64 {
	return NewPoints(c.LMax, colat, lon).Synthesis(dst, c)
}
