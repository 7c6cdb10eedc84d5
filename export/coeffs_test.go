package export

import (
	"bytes"
	"errors"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"cmbflux/flux/sh"
)

// randomCoeffs returns reproducible coefficients with awkward values
// (tiny, huge, negative zero) so that exact round trips are really tested.
func randomCoeffs(lmax int, conv sh.Convention, seed uint64) *sh.Coeffs {
	rng := rand.New(rand.NewPCG(seed, 7))
	c := sh.NewCoeffs(lmax, conv)
	for l := 0; l <= lmax; l++ {
		for m := 0; m <= l; m++ {
			i := sh.Index(l, m)
			c.C[i] = rng.NormFloat64() * math.Pow(10, float64(rng.IntN(40)-20))
			if m > 0 {
				c.S[i] = rng.NormFloat64() / 3
			}
		}
	}
	c.C[sh.Index(1, 1)] = math.Copysign(0, -1)
	c.C[sh.Index(1, 0)] = 5e-324 // smallest subnormal
	return c
}

func testMeta() *Meta {
	return &Meta{
		Quantity: "heat flux through the core-mantle boundary",
		Units:    "mW/m^2",
		Sign:     "positive = heat out of the core",
		Version:  "0.0.0-test",
		Inputs:   []Input{{Name: "demo", SHA256: strings.Repeat("ab", 32)}},
		Params:   map[string]string{"qstar": "0.8", "lmax": "6", "taper": "none", "a": "1", "zeta": "x y"},
	}
}

var allConvs = []sh.Convention{
	{Norm: sh.Orthonormal}, {Norm: sh.Orthonormal, CondonShortley: true},
	{Norm: sh.FourPi}, {Norm: sh.Schmidt, CondonShortley: true}, {Norm: sh.Unnormalized},
}

var writers = map[Format]func(w *bytes.Buffer, c *sh.Coeffs, m *Meta, o *CoeffOptions) error{
	FormatText: func(w *bytes.Buffer, c *sh.Coeffs, m *Meta, o *CoeffOptions) error {
		return WriteCoeffsText(w, c, m, o)
	},
	FormatCSV: func(w *bytes.Buffer, c *sh.Coeffs, m *Meta, o *CoeffOptions) error { return WriteCoeffsCSV(w, c, m, o) },
	FormatJSON: func(w *bytes.Buffer, c *sh.Coeffs, m *Meta, o *CoeffOptions) error {
		return WriteCoeffsJSON(w, c, m, o)
	},
}

// noNegZero returns x with -0 replaced by 0, as the writers print it.
func noNegZero(x []float64) []float64 {
	y := make([]float64, len(x))
	for i, v := range x {
		y[i] = v + 0
	}
	return y
}

func sameBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

// Writing then reading in the file's own convention gives back the very
// same float64 bits, in every format, row order and with degree 0 omitted.
func TestCoeffRoundTripExact(t *testing.T) {
	for _, f := range []Format{FormatText, FormatCSV, FormatJSON} {
		for _, conv := range allConvs {
			for _, opt := range []CoeffOptions{{Conv: conv}, {Conv: conv, Order: MMajor}, {Conv: conv, OmitDegree0: true}} {
				c := randomCoeffs(9, conv, 1)
				if opt.OmitDegree0 {
					c.C[0] = 0
				}
				var buf bytes.Buffer
				if err := writers[f](&buf, c, testMeta(), &opt); err != nil {
					t.Fatal(err)
				}
				tab, err := ReadCoeffs(bytes.NewReader(buf.Bytes()), "rt."+string(f), nil)
				if err != nil {
					t.Fatalf("%s %v: %v\n%s", f, opt, err, buf.String())
				}
				if len(tab.Warnings) != 0 {
					t.Errorf("%s %v: unexpected warnings %q", f, opt, tab.Warnings)
				}
				got := tab.Coeffs
				if got.Conv != conv || got.LMax != c.LMax || !sameBits(got.C, noNegZero(c.C)) || !sameBits(got.S, noNegZero(c.S)) {
					t.Errorf("%s %+v: round trip is not exact", f, opt)
				}
				m := testMeta()
				if tab.Meta.Units != m.Units || tab.Meta.Sign != m.Sign || tab.Meta.Quantity != m.Quantity ||
					tab.Meta.Version != m.Version || len(tab.Meta.Inputs) != 1 || tab.Meta.Inputs[0] != m.Inputs[0] ||
					tab.Meta.RadiusKm != DefaultRadiusKm || len(tab.Meta.Params) != len(m.Params) || tab.Meta.Params["zeta"] != "x y" {
					t.Errorf("%s: metadata not read back: %+v", f, tab.Meta)
				}
			}
		}
	}
}

// Identical inputs give byte-identical files; map order never leaks.
func TestCoeffDeterministic(t *testing.T) {
	for f, w := range writers {
		var a, b bytes.Buffer
		for i, buf := range []*bytes.Buffer{&a, &b} {
			m := testMeta()
			for k := range 50 { // a big map makes random iteration order visible
				m.Params[strings.Repeat("k", k%7+1)+string(rune('a'+k%26))] = "v"
			}
			_ = i
			if err := w(buf, randomCoeffs(5, sh.Canonical, 3), m, &CoeffOptions{Conv: sh.Convention{Norm: sh.Schmidt}}); err != nil {
				t.Fatal(err)
			}
		}
		if !bytes.Equal(a.Bytes(), b.Bytes()) {
			t.Errorf("%s: two writes differ", f)
		}
	}
}

// The header states every part of the convention in words.
func TestCoeffHeaderStatesConvention(t *testing.T) {
	var buf bytes.Buffer
	opt := &CoeffOptions{Conv: sh.Convention{Norm: sh.Schmidt, CondonShortley: true}}
	if err := WriteCoeffsText(&buf, randomCoeffs(2, sh.Canonical, 1), testMeta(), opt); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{
		"# quantity = heat flux through the core-mantle boundary\n", "# units = mW/m^2\n",
		"# sign = positive = heat out of the core\n", "# form = real\n", "# normalization = schmidt\n",
		"# condon_shortley_phase = included\n", "# lmax = 2\n", "# reference_radius_km = 3480\n",
		"# longitude_origin = phi = 0 at the Greenwich meridian\n", "# longitude_direction = phi increases eastward\n",
		"# degree_0 = included\n", "# orders = 0..l\n", "# columns = l m cos sin\n", "# rows = 6\n",
		"# input = " + strings.Repeat("ab", 32) + " demo\n", "# param.qstar = 0.8\n", "# cmbflux_version = 0.0.0-test\n",
	} {
		if !strings.Contains(buf.String(), want) {
			t.Errorf("header lacks %q:\n%s", want, buf.String())
		}
	}
	if strings.Index(buf.String(), "# param.a = 1") > strings.Index(buf.String(), "# param.zeta") {
		t.Error("parameters are not sorted")
	}
}

// Conversion checked against closed forms of the 4-pi normalized
// functions (Abramowitz & Stegun 1964, ch. 8; see references.md):
// 4-pi Y_21 = sqrt(15) sin t cos t, while the Schmidt form is
// sqrt(1/3) * 3 sin t cos t = sqrt(3) sin t cos t, so a 4-pi coefficient 1
// is sqrt(5) in Schmidt; the Condon-Shortley phase flips odd orders.
func TestCoeffConvertedOnWrite(t *testing.T) {
	c := sh.NewCoeffs(2, sh.Convention{Norm: sh.FourPi})
	c.Set(2, 1, 1, 0)
	c.Set(2, 2, 0, 1)
	for _, tc := range []struct {
		conv     sh.Convention
		c21, s22 float64
	}{
		// Schmidt P22 = sqrt(1/12) * 3 sin^2 = (sqrt(3)/2) sin^2 and 4-pi
		// P22 = (sqrt(15)/2) sin^2 (A&S ch. 8): ratio sqrt(5) again.
		{sh.Convention{Norm: sh.Schmidt}, math.Sqrt(5), math.Sqrt(5)},
		{sh.Convention{Norm: sh.Schmidt, CondonShortley: true}, -math.Sqrt(5), math.Sqrt(5)},
		// Orthonormal = 4-pi / sqrt(4 pi) (references.md), so coefficients
		// grow by sqrt(4 pi).
		{sh.Convention{Norm: sh.Orthonormal}, math.Sqrt(4 * math.Pi), math.Sqrt(4 * math.Pi)},
	} {
		var buf bytes.Buffer
		if err := WriteCoeffsText(&buf, c, nil, &CoeffOptions{Conv: tc.conv}); err != nil {
			t.Fatal(err)
		}
		tab, err := ReadCoeffs(&buf, "conv.txt", nil)
		if err != nil {
			t.Fatal(err)
		}
		c21, _ := tab.Coeffs.At(2, 1)
		_, s22 := tab.Coeffs.At(2, 2)
		if math.Abs(c21-tc.c21) > 1e-14 || math.Abs(s22-tc.s22) > 1e-14 {
			t.Errorf("%v: C21 = %v, S22 = %v, want %v, %v", tc.conv, c21, s22, tc.c21, tc.s22)
		}
	}
}

// The complex form: c_lm = (C - i S)/sqrt(2) for m > 0 in the same
// normalization (the real functions carry the extra sqrt(2), references.md
// "(2 - delta_m0)"), c_l,-m = conj(c_lm); reading it back gives the real
// coefficients to rounding.
func TestCoeffComplex(t *testing.T) {
	c := randomCoeffs(6, sh.Canonical, 5)
	for _, neg := range []bool{false, true} {
		for f, w := range writers {
			var buf bytes.Buffer
			if err := w(&buf, c, testMeta(), &CoeffOptions{Complex: true, NegativeOrders: neg, Order: MMajor}); err != nil {
				t.Fatal(err)
			}
			if f == FormatText && !strings.Contains(buf.String(), "# columns = l m re im\n") {
				t.Error("complex header lacks columns = l m re im")
			}
			tab, err := ReadCoeffs(&buf, "cx", nil)
			if err != nil {
				t.Fatalf("%s neg=%v: %v", f, neg, err)
			}
			if !tab.Complex {
				t.Error("Complex not reported")
			}
			for i := range c.C {
				if d := math.Abs(tab.Coeffs.C[i]-c.C[i]) + math.Abs(tab.Coeffs.S[i]-c.S[i]); d > 1e-15*(math.Abs(c.C[i])+math.Abs(c.S[i])) {
					t.Errorf("%s neg=%v: index %d differs by %v", f, neg, i, d)
				}
			}
		}
	}
	var buf bytes.Buffer
	c2 := sh.NewCoeffs(1, sh.Canonical)
	c2.Set(1, 1, 2, 4)
	// 2/sqrt(2) and 4/sqrt(2) as float64 division rounds them.
	WriteCoeffsText(&buf, c2, nil, &CoeffOptions{Complex: true, NegativeOrders: true})
	for _, want := range []string{"\n1 -1 1.414213562373095 2.82842712474619\n", "\n1 1 1.414213562373095 -2.82842712474619\n"} {
		if !strings.Contains(buf.String(), want) {
			t.Errorf("complex rows lack %q:\n%s", want, buf.String())
		}
	}
}

var schmidt = &sh.Convention{Norm: sh.Schmidt}

// A plain table from elsewhere: heading line, Fortran exponents, missing
// degree 1 reported as a warning and read as zero.
func TestReadPlainTable(t *testing.T) {
	in := "degree order g h\n0 0 1.5 0\n2 0 1.0D-03 0\n2 1 2 3\n2 2 -4 5e-1\n"
	tab, err := ReadCoeffs(strings.NewReader(in), "plain.dat", &CoeffReadOptions{Conv: schmidt})
	if err != nil {
		t.Fatal(err)
	}
	if !tab.Declared || tab.Coeffs.Conv != *schmidt || tab.Coeffs.LMax != 2 {
		t.Errorf("got %+v", tab)
	}
	if c, _ := tab.Coeffs.At(2, 0); c != 1e-3 {
		t.Errorf("C20 = %v, want 1e-3", c)
	}
	if _, s := tab.Coeffs.At(2, 2); s != 0.5 {
		t.Errorf("S22 = %v", s)
	}
	w := strings.Join(tab.Warnings, "\n")
	if !strings.Contains(w, "plain.dat:1: skipped as a heading line") || !strings.Contains(w, "2 (l, m) pairs up to lmax = 2 are missing and read as zero: degree 1 (all orders)") {
		t.Errorf("warnings = %q", tab.Warnings)
	}
	// The same table as CSV.
	tab, err = ReadCoeffs(strings.NewReader(strings.ReplaceAll(in, " ", ",")), "plain.csv", &CoeffReadOptions{Conv: schmidt})
	if err != nil || tab.Coeffs.C[sh.Index(2, 1)] != 2 {
		t.Fatalf("csv: %v", err)
	}
}

func TestReadCoeffErrors(t *testing.T) {
	hdr := func() string {
		var buf bytes.Buffer
		WriteCoeffsText(&buf, sh.NewCoeffs(1, sh.Canonical), testMeta(), nil)
		return buf.String()
	}()
	canon := &sh.Convention{}
	for _, tc := range []struct {
		name, in string
		conv     *sh.Convention
		want     string
	}{
		{"dup", "0 0 1 0\n1 0 2 0\n1 1 3 4\n1 0 5 0\n", schmidt, "dup:4: duplicate (l, m) = (1, 0), first at line 2"},
		{"mgtl", "0 0 1 0\n1 2 3 4\n", schmidt, "mgtl:2: order m = 2 is above degree l = 1"},
		{"neg-m", "0 0 1 0\n1 -1 3 4\n", schmidt, "neg-m:2: order m = -1 is negative in a real cos/sin table"},
		{"neg-l", "-1 0 1 0\n", schmidt, "neg-l:1: degree l = -1 is negative"},
		{"sin0", "0 0 1 0\n# note\n\n1 0 3 0.25\n", schmidt, "sin0:4: sine coefficient 0.25 at m = 0 must be zero"},
		{"text", "0 0 1 0\n1 0 abc 0\n", schmidt, `text:2: value 1: "abc" is not a number`},
		{"int", "0 0 1 0\n1.5 0 1 0\n", schmidt, `int:2: degree l: "1.5" is not an integer`},
		{"cols", "0 0 1\n", schmidt, "cols:1: 3 columns, want 4"},
		{"nan", "0 0 NaN 0\n", schmidt, "nan:1: value is not finite"},
		{"range", "0 0 1e999 0\n", schmidt, `range:1: value 1: "1e999" is out of the float64 range`},
		{"undeclared", "0 0 1 0\n", nil, "undeclared: no cmbflux header: declare"},
		{"empty", "# nothing\n", schmidt, "empty: no coefficient rows"},
		{"conflict", hdr, schmidt, "the file declares orthonormal, no Condon-Shortley phase but schmidt, no Condon-Shortley phase was asked for"},
		{"rows", strings.Replace(hdr, "# rows = 3", "# rows = 4", 1), nil, "header rows = 4 but the file has 3 data rows"},
		{"lmax", hdr + "2 0 1 0\n", canon, "degree l = 2 is above the header's lmax = 1"},
		{"cs", strings.Replace(hdr, "condon_shortley_phase = excluded", "condon_shortley_phase = maybe", 1), nil, `header condon_shortley_phase: "maybe", want included or excluded`},
		{"version", strings.Replace(hdr, "cmbflux-coefficients/1", "cmbflux-coefficients/9", 1), nil, "version 9 is newer"},
		{"header-data", strings.Replace(hdr, "\n0 0 ", "\nx 0 ", 1), nil, `degree l: "x" is not an integer`},
	} {
		_, err := ReadCoeffs(strings.NewReader(tc.in), tc.name, &CoeffReadOptions{Conv: tc.conv, Format: FormatText})
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want it to contain %q", tc.name, err, tc.want)
			continue
		}
		if !errors.Is(err, ErrBadInput) {
			t.Errorf("%s: error does not wrap ErrBadInput", tc.name)
		}
	}
}

func TestReadCoeffJSONErrors(t *testing.T) {
	var buf bytes.Buffer
	WriteCoeffsJSON(&buf, sh.NewCoeffs(1, sh.Canonical), nil, nil)
	good := buf.String()
	lines := strings.Split(good, "\n")
	dataLine := 0
	for i, l := range lines {
		if strings.Contains(l, `"data"`) {
			dataLine = i + 1
		}
	}
	for _, tc := range []struct{ in, want string }{
		{strings.Replace(good, `"l",`, `"l"`, 1), "j.json:23: invalid JSON"},
		{good[:len(good)/2], "j.json:"},
		{strings.Replace(good, `"data": [`, `"data": [[0, 0, 1],`, 1), "j.json:" + strconv.Itoa(dataLine) + ": 3 columns, want 4"},
		{strings.Replace(good, `"data": [`, `"data": [["a"],`, 1), "j.json:" + strconv.Itoa(dataLine) + ": data row 1: want a list of 4 numbers"},
		{strings.Replace(good, `"orthonormal"`, `"sideways"`, 1), `unknown normalization "sideways"`},
	} {
		_, err := ReadCoeffs(strings.NewReader(tc.in), "j.json", nil)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("error %v, want %q", err, tc.want)
		}
	}
}

// CSV errors carry the line in the file, header lines included.
func TestReadCoeffCSVErrors(t *testing.T) {
	var buf bytes.Buffer
	WriteCoeffsCSV(&buf, sh.NewCoeffs(2, sh.Canonical), nil, nil)
	good := buf.String()
	lines := strings.Split(good, "\n")
	heading := 0
	for i, l := range lines {
		if l == "l,m,cos,sin" {
			heading = i + 1
		}
	}
	if heading == 0 {
		t.Fatal("no heading record")
	}
	for _, tc := range []struct{ in, want string }{
		{strings.Replace(good, "\n2,1,0,0\n", "\n2,1,0,0\n2,1,1,0\n", 1), "c.csv:" + strconv.Itoa(heading+6) + ": duplicate (l, m) = (2, 1), first at line " + strconv.Itoa(heading+5)},
		{strings.Replace(good, "l,m,cos,sin", "l,m,re,im", 1), "c.csv:" + strconv.Itoa(heading) + `: heading "l,m,re,im" does not match`},
		{strings.Replace(good, "\n1,0,0,0\n", "\n1,0,\"0,0\n", 1), "c.csv:"},
		{strings.Replace(good, "\n1,1,0,0\n", "\n1,1,0,zero\n", 1), "c.csv:" + strconv.Itoa(heading+3) + `: value 2: "zero" is not a number`},
	} {
		_, err := ReadCoeffs(strings.NewReader(tc.in), "c.csv", nil)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("error %v, want %q", err, tc.want)
		}
	}
	// Converting to a convention that cannot hold the degree is an error,
	// not an infinite coefficient (flux/sh limits unnormalized degrees).
	if err := WriteCoeffsText(&bytes.Buffer{}, randomCoeffs(400, sh.Canonical, 1), nil, &CoeffOptions{Conv: sh.Convention{Norm: sh.Unnormalized}}); err == nil {
		t.Error("unnormalized coefficients of degree 400 were written")
	}
}

// header_lines counts the '#' lines, so "skip N lines" works in tools that
// do not know comments.
func TestHeaderLinesCount(t *testing.T) {
	var outs []string
	for _, f := range []Format{FormatText, FormatCSV} {
		var b bytes.Buffer
		WriteCoeffs(&b, f, randomCoeffs(3, sh.Canonical, 2), testMeta(), nil)
		outs = append(outs, b.String())
		b.Reset()
		WriteGrid(&b, f, testGrid(), testMeta())
		outs = append(outs, b.String())
	}
	for _, s := range outs {
		n := 0
		for _, l := range strings.Split(s, "\n") {
			if strings.HasPrefix(l, "#") {
				n++
			}
		}
		if !strings.Contains(s, "\n# header_lines = "+strconv.Itoa(n)+"\n") {
			t.Errorf("%d '#' lines but header says otherwise:\n%s", n, s[:200])
		}
	}
}

// With the Condon-Shortley phase, the complex form follows sh.ComplexCoeffs
// (checked there against scipy.special.sph_harm): A_l,-m = (-1)^m conj(A_lm).
func TestCoeffComplexCondonShortley(t *testing.T) {
	cs := sh.Convention{Norm: sh.Orthonormal, CondonShortley: true}
	c := sh.NewCoeffs(1, cs)
	c.Set(1, 1, 2, 4)
	var buf bytes.Buffer
	if err := WriteCoeffsText(&buf, c, nil, &CoeffOptions{Conv: cs, Complex: true, NegativeOrders: true}); err != nil {
		t.Fatal(err)
	}
	// A_11 = (2 - 4i)/sqrt(2); A_1,-1 = -conj(A_11) = (-2 - 4i)/sqrt(2).
	for _, want := range []string{"\n1 -1 -1.414213562373095 -2.82842712474619\n", "\n1 1 1.414213562373095 -2.82842712474619\n",
		"# orders = -l..l\n", "Y_l^-m = (-1)^m conj(Y_l^m)"} {
		if !strings.Contains(buf.String(), want) {
			t.Errorf("complex table lacks %q:\n%s", want, buf.String())
		}
	}
	tab, err := ReadCoeffs(strings.NewReader(buf.String()), "cs.txt", nil)
	if err != nil {
		t.Fatal(err)
	}
	if cc, ss := tab.Coeffs.At(1, 1); math.Abs(cc-2) > 1e-15 || math.Abs(ss-4) > 1e-15 {
		t.Errorf("read back (%v, %v), want (2, 4)", cc, ss)
	}
	bad := strings.Replace(buf.String(), "\n1 -1 -1.414213562373095 -2.82842712474619\n", "\n1 -1 1.414213562373095 2.82842712474619\n", 1)
	if _, err := ReadCoeffs(strings.NewReader(bad), "cs.txt", nil); err == nil || !strings.Contains(err.Error(), "is not -conj of c_1,1") {
		t.Errorf("inconsistent negative order: %v", err)
	}
}
