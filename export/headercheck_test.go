package export

import (
	"bufio"
	"bytes"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
	"testing"

	"cmbflux/flux/sh"
)

// headercheckCoeffs is the field of testdata/headercheck.py in the
// canonical convention (real, orthonormal, no Condon-Shortley phase); the
// formulas are those of the script.
func headercheckCoeffs() *sh.Coeffs {
	const lmax = 4
	c := sh.NewCoeffs(lmax, sh.Canonical)
	for l := 0; l <= lmax; l++ {
		for m := 0; m <= l; m++ {
			a := (math.Pow(-1, float64(l))*float64(1+l) + 0.5*float64(m)) / float64(1+m*m)
			b := 0.0
			if m > 0 {
				b = 0.3*float64(l) - 0.2*float64(m)
			}
			c.Set(l, m, a, b)
		}
	}
	return c
}

// headerNorm is the factor N_lm of each normalization as the header's
// normalization_factor line states it (want), and its value. The real form
// carries (2 - delta_m0), the complex form does not. These are the
// definitions of references.md (4-pi: integral of Y^2 = 4 pi; Schmidt:
// 4 pi/(2l+1); orthonormal: 1; unnormalised: 1 as the factor).
func headerNorm(n sh.Normalization, complexForm bool, l, m int) (want string, v float64) {
	d, dt := 2.0, "(2 - delta_m0) "
	if m == 0 {
		d = 1
	}
	if complexForm {
		d, dt = 1, ""
	}
	r := 1.0
	for k := l - m + 1; k <= l+m; k++ {
		r /= float64(k) // (l-m)!/(l+m)!
	}
	switch n {
	case sh.Orthonormal:
		return "N_lm = sqrt(" + dt + "(2l+1)/(4 pi) (l-m)!/(l+m)!)", math.Sqrt(d * float64(2*l+1) / (4 * math.Pi) * r)
	case sh.FourPi:
		return "N_lm = sqrt(" + dt + "(2l+1) (l-m)!/(l+m)!)", math.Sqrt(d * float64(2*l+1) * r)
	case sh.Schmidt:
		return "N_lm = sqrt(" + dt + "(l-m)!/(l+m)!)", math.Sqrt(d * r)
	}
	return "N_lm = 1", 1
}

// TestHeaderMeansWhatItSays writes the field of testdata/headercheck.py in
// every normalization, with and without the Condon-Shortley phase, real
// and complex (all orders), parses the text file here without the package's
// reader, evaluates the expansion exactly as the header states it
// (expansion, normalization_factor and legendre lines), and compares with
// the field computed by SciPy (scipy.special.lpmv, headercheck_table_test.go).
// A wrong conversion or a header that misstates it fails.
func TestHeaderMeansWhatItSays(t *testing.T) {
	const tol = 1e-13 // relative to the largest term, rounding only
	c := headercheckCoeffs()
	for _, norm := range []sh.Normalization{sh.Orthonormal, sh.FourPi, sh.Schmidt, sh.Unnormalized} {
		for _, cs := range []bool{false, true} {
			for _, cx := range []bool{false, true} {
				for _, order := range []RowOrder{LMajor, MMajor} {
					conv := sh.Convention{Norm: norm, CondonShortley: cs}
					var buf bytes.Buffer
					if err := WriteCoeffsText(&buf, c, nil, &CoeffOptions{Conv: conv, Complex: cx, NegativeOrders: cx, Order: order}); err != nil {
						t.Fatal(err)
					}
					name := conv.String() + map[bool]string{false: " real", true: " complex"}[cx] + " " + order.String()
					head, rows := parseCoeffTextForCheck(t, buf.Bytes())
					wantNorm, _ := headerNorm(norm, cx, 0, 0)
					wantLeg := map[bool]string{
						false: "P_l^m(x) = (1 - x^2)^(m/2) d^m/dx^m P_l(x), no Condon-Shortley phase",
						true:  "P_l^m(x) = (-1)^m (1 - x^2)^(m/2) d^m/dx^m P_l(x), Condon-Shortley phase included",
					}[cs]
					wantExp := "f(theta, phi) = sum_{l} sum_{m=0..l} N_lm P_l^m(cos theta) [cos_lm cos(m phi) + sin_lm sin(m phi)]"
					if cx {
						neg := "Y_l^-m = conj(Y_l^m)"
						if cs {
							neg = "Y_l^-m = (-1)^m conj(Y_l^m)"
						}
						wantExp = "f(theta, phi) = sum_{l} sum_{m=-l..l} c_lm Y_l^m(theta, phi), Y_l^m = N_lm P_l^m(cos theta) exp(i m phi) for m >= 0, " + neg
					}
					for k, v := range map[string]string{"normalization_factor": wantNorm, "legendre": wantLeg, "expansion": wantExp, "colatitude": "theta = 0 at the north pole, pi at the south pole", "longitude_origin": "phi = 0 at the Greenwich meridian", "longitude_direction": "phi increases eastward"} {
						if head[k] != v {
							t.Fatalf("%s: header %s = %q; the evaluation below assumes %q", name, k, head[k], v)
						}
					}
					for _, pt := range headerCheck {
						ph := pt.lon * math.Pi / 180
						plm := func(l, m int) float64 {
							p := pt.p[l*(l+1)/2+m]
							if cs && m%2 != 0 {
								p = -p
							}
							return p
						}
						var sum complex128
						scale := 0.0
						for _, r := range rows {
							am := r.m
							if am < 0 {
								am = -am
							}
							_, n := headerNorm(norm, cx, r.l, am)
							var term complex128
							if cx {
								y := complex(n*plm(r.l, am), 0) * cmplx.Exp(complex(0, float64(am)*ph))
								if r.m < 0 {
									y = cmplx.Conj(y)
									if cs && am%2 != 0 {
										y = -y
									}
								}
								term = complex(r.a, r.b) * y
							} else {
								term = complex(n*plm(r.l, r.m)*(r.a*math.Cos(float64(r.m)*ph)+r.b*math.Sin(float64(r.m)*ph)), 0)
							}
							sum += term
							scale = math.Max(scale, cmplx.Abs(term))
						}
						if math.Abs(real(sum)-pt.f) > tol*math.Max(scale, 1) || math.Abs(imag(sum)) > tol*math.Max(scale, 1) {
							t.Errorf("%s at colat %v, lon %v: the header's expansion gives %v, SciPy %v", name, pt.colat, pt.lon, sum, pt.f)
						}
					}
				}
			}
		}
	}
}

type checkRow struct {
	l, m int
	a, b float64
}

// parseCoeffTextForCheck reads "# key = value" header lines and "l m a b"
// rows, independently of ReadCoeffs.
func parseCoeffTextForCheck(t *testing.T, data []byte) (map[string]string, []checkRow) {
	t.Helper()
	head := map[string]string{}
	var rows []checkRow
	sc := bufio.NewScanner(bytes.NewReader(data))
	for sc.Scan() {
		line := sc.Text()
		if s, ok := strings.CutPrefix(line, "# "); ok {
			if k, v, ok := strings.Cut(s, " = "); ok {
				head[k] = v
			}
			continue
		}
		f := strings.Fields(line)
		if len(f) != 4 {
			t.Fatalf("row %q", line)
		}
		l, err1 := strconv.Atoi(f[0])
		m, err2 := strconv.Atoi(f[1])
		a, err3 := strconv.ParseFloat(f[2], 64)
		b, err4 := strconv.ParseFloat(f[3], 64)
		if err1 != nil || err2 != nil || err3 != nil || err4 != nil {
			t.Fatalf("row %q", line)
		}
		rows = append(rows, checkRow{l, m, a, b})
	}
	if want, _ := strconv.Atoi(head["rows"]); len(rows) != want || len(rows) == 0 {
		t.Fatalf("%d rows, header says %q", len(rows), head["rows"])
	}
	return head, rows
}
