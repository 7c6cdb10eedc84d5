package sh

import "math"

// Evaluator evaluates one expansion at many points, reusing its buffers.
// It holds a copy of the coefficients converted to Canonical, taken when it
// is made: later changes to the Coeffs it was made from are not seen.
//
// An Evaluator is not safe for concurrent use; make one per goroutine (they
// are cheap next to the work of a single evaluation at high degree).
//
// One evaluation costs O(LMax^2) operations and no allocation.
type Evaluator struct {
	c         *Coeffs
	g         plm
	row, drow []float64
	a, b      []float64 // per-order sums over degree of C P and S P
	da, db    []float64 // the same with dP/dcolat
}

// NewEvaluator returns an Evaluator for c. It panics if c's convention
// cannot represent its degree (see Convention.CheckDegree).
func NewEvaluator(c *Coeffs) *Evaluator {
	cc, err := c.Convert(Canonical)
	if err != nil {
		panic(err.Error())
	}
	n := c.LMax + 1
	return &Evaluator{
		c:   cc,
		row: make([]float64, n), drow: make([]float64, n),
		a: make([]float64, n), b: make([]float64, n),
		da: make([]float64, n), db: make([]float64, n),
	}
}

// LMax returns the maximum degree of the expansion.
func (e *Evaluator) LMax() int { return e.c.LMax }

// sums fills the per-order sums at colatitude colat.
func (e *Evaluator) sums(colat float64, grad bool) {
	lmax := e.c.LMax
	clear(e.a)
	clear(e.b)
	if grad {
		clear(e.da)
		clear(e.db)
	}
	e.g.reset(lmax, colat)
	C, S := e.c.C, e.c.S
	for l := 0; l <= lmax; l++ {
		row := e.row[:l+1]
		e.g.next(row)
		i0 := Index(l, 0)
		cl, sl := C[i0:i0+l+1], S[i0:i0+l+1]
		a, b := e.a[:l+1], e.b[:l+1]
		for m, p := range row {
			a[m] += cl[m] * p
			b[m] += sl[m] * p
		}
		if grad {
			d := e.drow[:l+1]
			derivRow(d, row, l)
			da, db := e.da[:l+1], e.db[:l+1]
			for m, p := range d {
				da[m] += cl[m] * p
				db[m] += sl[m] * p
			}
		}
	}
}

// Value returns f(colat, lon) = sum_lm C_lm Y_lm^c + S_lm Y_lm^s at
// colatitude colat and east longitude lon (radians). Any finite colat is
// accepted (the sphere is continued through the poles); it panics if colat
// is not finite.
func (e *Evaluator) Value(colat, lon float64) float64 {
	e.sums(colat, false)
	f := e.a[0]
	var t trig
	t.start(lon)
	for m := 1; m <= e.c.LMax; m++ {
		c, s := t.next(m)
		f += e.a[m]*c + e.b[m]*s
	}
	return f
}

// Grad returns the value f and the partial derivatives df/dcolat and
// df/dlon (per radian) at (colat, lon). The derivatives are exact
// derivatives of the truncated expansion and finite at the poles, where
// df/dlon is 0; the horizontal gradient on the unit sphere is
// (df/dcolat, df/dlon / sin(colat)).
func (e *Evaluator) Grad(colat, lon float64) (f, dfdcolat, dfdlon float64) {
	e.sums(colat, true)
	f, dfdcolat = e.a[0], e.da[0]
	var t trig
	t.start(lon)
	for m := 1; m <= e.c.LMax; m++ {
		fm := float64(m)
		c, s := t.next(m)
		f += e.a[m]*c + e.b[m]*s
		dfdcolat += e.da[m]*c + e.db[m]*s
		dfdlon += fm * (e.b[m]*c - e.a[m]*s)
	}
	return f, dfdcolat, dfdlon
}

// Evaluate returns the field of c at colatitude colat and east longitude
// lon (radians); see Evaluator.Value. Each call allocates an Evaluator; use
// NewEvaluator for many points. It panics under the conditions of
// NewEvaluator and Evaluator.Value.
func (c *Coeffs) Evaluate(colat, lon float64) float64 {
	return NewEvaluator(c).Value(colat, lon)
}

// EvaluateGrad returns the field of c and its partial derivatives with
// respect to colatitude and longitude (per radian) at (colat, lon); see
// Evaluator.Grad.
func (c *Coeffs) EvaluateGrad(colat, lon float64) (f, dfdcolat, dfdlon float64) {
	return NewEvaluator(c).Grad(colat, lon)
}

// trig produces cos(m lon), sin(m lon) for m = 1, 2, ... by the angle-sum
// recurrence, restarted from math.Sincos every trigReseed orders so that the
// rounding error stays within a few ulp (it grows about linearly between
// restarts).
type trig struct {
	lon, c1, s1, c, s float64
}

const trigReseed = 16

func (t *trig) start(lon float64) {
	t.lon = lon
	t.s1, t.c1 = math.Sincos(lon)
	t.c, t.s = 1, 0
}

// next returns cos(m lon), sin(m lon); m must increase by one per call from 1.
func (t *trig) next(m int) (c, s float64) {
	if m%trigReseed == 0 {
		t.s, t.c = math.Sincos(float64(m) * t.lon)
	} else {
		t.c, t.s = t.c*t.c1-t.s*t.s1, t.s*t.c1+t.c*t.s1
	}
	return t.c, t.s
}
