package flux

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// gridLines holds a band-limited field exactly along the lines of a
// denseGrid, for the second derivatives that contour's quintic crossings
// use (it could also serve as a contour.Lines). A field of degree L restricted to a great
// circle is a trigonometric polynomial of degree L in the angle along it
// (the harmonics are homogeneous polynomials of degree <= L in x, y, z,
// common practice), and along a parallel it is the ring's Fourier series.
// Meridians j and j + nlon/2 form one great circle, parametrised by
// psi = colat on the first and 2 pi - colat on the second; its
// coefficients are the least-squares solution (exact up to rounding, since
// the samples are values of such a polynomial) from the grid values.
type gridLines struct {
	g     *denseGrid
	l     int
	alpha [][]float64 // per great circle, cos coefficients 0..L
	beta  [][]float64 // per great circle, sin coefficients 0..L (beta[0] = 0)
}

func newGridLines(g *denseGrid, l int) (*gridLines, error) {
	if g.nlon%2 != 0 {
		return nil, fmt.Errorf("flux: internal error: odd number of longitudes %d", g.nlon)
	}
	nr := len(g.colat)
	half := g.nlon / 2
	// Sample angles: all rows on the first meridian, interior rows on the
	// second.
	var psi []float64
	var rows []int
	for i := 0; i < nr; i++ {
		psi = append(psi, g.colat[i])
		rows = append(rows, i)
	}
	for i := nr - 2; i >= 1; i-- {
		psi = append(psi, 2*math.Pi-g.colat[i])
		rows = append(rows, -i)
	}
	np, nc := len(psi), 2*l+1
	if np < nc {
		return nil, fmt.Errorf("flux: internal error: %d samples for %d coefficients", np, nc)
	}
	a := mat.NewDense(np, nc, nil)
	for p, x := range psi {
		a.Set(p, 0, 1)
		for k := 1; k <= l; k++ {
			s, c := math.Sincos(float64(k) * x)
			a.Set(p, 2*k-1, c)
			a.Set(p, 2*k, s)
		}
	}
	b := mat.NewDense(np, half, nil)
	for p, r := range rows {
		for j := 0; j < half; j++ {
			if r >= 0 {
				b.Set(p, j, g.v[r*g.nlon+j])
			} else {
				b.Set(p, j, g.v[(-r)*g.nlon+j+half])
			}
		}
	}
	var qr mat.QR
	qr.Factorize(a)
	var x mat.Dense
	if err := qr.SolveTo(&x, false, b); err != nil {
		return nil, fmt.Errorf("flux: internal error fitting great circles: %v", err)
	}
	gl := &gridLines{g: g, l: l, alpha: make([][]float64, half), beta: make([][]float64, half)}
	for j := 0; j < half; j++ {
		al, be := make([]float64, l+1), make([]float64, l+1)
		al[0] = x.At(0, j)
		for k := 1; k <= l; k++ {
			al[k], be[k] = x.At(2*k-1, j), x.At(2*k, j)
		}
		gl.alpha[j], gl.beta[j] = al, be
	}
	return gl, nil
}

// trig2 returns the second derivative of sum_k a_k cos(k x) + b_k sin(k x).
func trig2(a, b []float64, x float64) float64 {
	s1, c1 := math.Sincos(x)
	ck, sk := 1.0, 0.0
	d2 := 0.0
	for k := 1; k < len(a); k++ {
		ck, sk = ck*c1-sk*s1, sk*c1+ck*s1
		fk := float64(k)
		d2 -= fk * fk * (a[k]*ck + b[k]*sk)
	}
	return d2
}

// secondDerivatives returns d2f/dlon2 and d2f/dlat2 (per degree squared) at
// the grid nodes, from the ring and great-circle series.
func (gl *gridLines) secondDerivatives() (dlon2, dlat2 []float64) {
	g := gl.g
	n := len(g.v)
	dlon2, dlat2 = make([]float64, n), make([]float64, n)
	half := g.nlon / 2
	const r2 = rad2deg * rad2deg
	for i, th := range g.colat {
		for j := 0; j < g.nlon; j++ {
			k := i*g.nlon + j
			if i > 0 && i < len(g.colat)-1 {
				dlon2[k] = trig2(g.ringA[i], g.ringB[i], 2*math.Pi*float64(j)/float64(g.nlon)) / r2
			}
			if j < half {
				dlat2[k] = trig2(gl.alpha[j], gl.beta[j], th) / r2
			} else {
				dlat2[k] = trig2(gl.alpha[j-half], gl.beta[j-half], 2*math.Pi-th) / r2
			}
		}
	}
	return dlon2, dlat2
}
