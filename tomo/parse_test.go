package tomo

import (
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// TestParseFloatMatchesStrconv checks the fast decimal parser against
// strconv.ParseFloat of the Go standard library, which rounds correctly
// (IEEE 754 round-to-nearest-even): the results must be bit-identical.
func TestParseFloatMatchesStrconv(t *testing.T) {
	cases := []string{
		"0", "-0", "+0", "1", "-1", "0.1", ".5", "5.", "-.25", "359.75", "-89.875",
		"2891", "1e3", "1E-3", "-2.5e+2", "123456789012345", "1234567890123456789",
		"0.000000000000000000001", "1e22", "1e23", "1e-22", "1e-23", "9007199254740993",
		"3.0000000000000004", "0.30000000000000004", "1.7976931348623157e308",
		"4.9e-324", "NaN", "nan", "inf", "-Inf", "0x1p-2", "00012.500", "000.000001",
	}
	for _, s := range cases {
		checkParse(t, s)
	}
	// Random decimals of the shapes found in grid files.
	r := rand.New(rand.NewPCG(1, 2))
	for n := 0; n < 200000; n++ {
		var s string
		switch n % 4 {
		case 0:
			s = strconv.FormatFloat((r.Float64()-0.5)*720, 'f', r.IntN(8), 64)
		case 1:
			s = strconv.FormatFloat((r.Float64()-0.5)*10, 'g', -1, 64)
		case 2:
			s = strconv.FormatFloat(math.Ldexp(r.Float64(), r.IntN(120)-60), 'e', r.IntN(17), 64)
		default:
			s = strconv.Itoa(r.IntN(2_000_000) - 1_000_000)
		}
		checkParse(t, s)
	}
}

func checkParse(t *testing.T, s string) {
	t.Helper()
	want, err := strconv.ParseFloat(s, 64)
	got, ok := parseFloat([]byte(s))
	if err != nil {
		if ok {
			t.Errorf("parseFloat(%q) = %v, strconv rejects it: %v", s, got, err)
		}
		return
	}
	if !ok {
		t.Errorf("parseFloat(%q) rejected, strconv gives %v", s, want)
		return
	}
	if math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
		t.Errorf("parseFloat(%q) = %v (%x), strconv gives %v (%x)", s, got, math.Float64bits(got), want, math.Float64bits(want))
	}
}

// TestParseFloatFortran checks the Fortran exponent letter D: the value
// must equal strconv.ParseFloat of the same text with E.
func TestParseFloatFortran(t *testing.T) {
	for _, s := range []string{"1.5D+02", "-2.891d3", "7.25D-01", "1.2345678901234567890D+02", "1d-30", "0.0D0"} {
		want, err := strconv.ParseFloat(strings.NewReplacer("D", "e", "d", "e").Replace(s), 64)
		got, ok := parseFloat([]byte(s))
		if err != nil || !ok || got != want {
			t.Errorf("parseFloat(%q) = %v, %v; want %v", s, got, ok, want)
		}
	}
}

// TestParseFloatRejects checks malformed numbers.
func TestParseFloatRejects(t *testing.T) {
	for _, s := range []string{"", "-", "+", ".", "e5", "1e", "1e+", "1.2.3", "12a", "--1", "1,5", "abc", "1e400"} {
		if v, ok := parseFloat([]byte(s)); ok {
			t.Errorf("parseFloat(%q) = %v, want rejection", s, v)
		}
	}
}
