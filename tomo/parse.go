package tomo

import (
	"math"
	"strconv"
)

// pow10 holds the powers of ten that are exact in float64 (10^0 .. 10^22).
var pow10 = [...]float64{
	1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11,
	1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
}

// parseFloat parses a decimal number from b. It returns ok == false when b
// is not a number. Decimal numbers with at most 15 significant digits and a
// decimal exponent within +-22 are converted by Clinger's fast path (Clinger
// 1990, "How to read floating point numbers accurately", PLDI; from
// memory): the
// mantissa and the power of ten are both exact in float64, so one IEEE
// multiplication or division gives the correctly rounded result, identical
// to strconv.ParseFloat. Everything else (long mantissas, large exponents,
// NaN, Inf, hexadecimal) goes to strconv.ParseFloat. The Fortran exponent
// letters D and d (double-precision output, "1.5D+02") are accepted like E
// (common practice in files written by Fortran programs).
func parseFloat[T string | []byte](b T) (float64, bool) {
	i, n := 0, len(b)
	if n == 0 {
		return 0, false
	}
	neg := false
	if b[0] == '-' || b[0] == '+' {
		neg = b[0] == '-'
		i++
	}
	var mant uint64
	digits, exp := 0, 0
	sawDigit := false
	for ; i < n && b[i] >= '0' && b[i] <= '9'; i++ {
		sawDigit = true
		if mant == 0 && b[i] == '0' {
			continue // leading zeros are not significant
		}
		mant = mant*10 + uint64(b[i]-'0')
		digits++
	}
	if i < n && b[i] == '.' {
		i++
		for ; i < n && b[i] >= '0' && b[i] <= '9'; i++ {
			sawDigit = true
			if mant == 0 && b[i] == '0' {
				exp--
				continue
			}
			mant = mant*10 + uint64(b[i]-'0')
			digits++
			exp--
		}
	}
	if !sawDigit {
		return slowFloat(b)
	}
	fortran := false
	if i < n && (b[i] == 'e' || b[i] == 'E' || b[i] == 'd' || b[i] == 'D') {
		if b[i] == 'd' || b[i] == 'D' {
			fortran = true
		}
		i++
		eneg := false
		if i < n && (b[i] == '-' || b[i] == '+') {
			eneg = b[i] == '-'
			i++
		}
		if i == n {
			return 0, false
		}
		e := 0
		for ; i < n && b[i] >= '0' && b[i] <= '9'; i++ {
			if e < 10000 {
				e = e*10 + int(b[i]-'0')
			}
		}
		if eneg {
			e = -e
		}
		exp += e
	}
	if i != n {
		return slowFloat(b)
	}
	if digits > 15 || exp < -22 || exp > 22 {
		if fortran {
			// strconv does not know the Fortran exponent letter.
			c := []byte(string(b))
			for k, ch := range c {
				if ch == 'd' || ch == 'D' {
					c[k] = 'e'
				}
			}
			return slowFloat(c)
		}
		return slowFloat(b)
	}
	f := float64(mant)
	if exp < 0 {
		f /= pow10[-exp]
	} else {
		f *= pow10[exp]
	}
	if neg {
		f = -f
	}
	return f, true
}

// slowFloat is the general path of parseFloat.
func slowFloat[T string | []byte](b T) (float64, bool) {
	f, err := strconv.ParseFloat(string(b), 64)
	if err != nil {
		// strconv reports overflow with ErrRange and +-Inf; a coordinate or
		// value that overflows is not a number we can use.
		return 0, false
	}
	return f, true
}

// isMissingToken reports whether a field spells a missing value in words
// rather than as NaN: "NA", "N/A" or "null" (common practice in tabular
// data exports).
func isMissingToken[T string | []byte](b T) bool {
	switch string(b) {
	case "NA", "N/A", "na", "n/a", "null", "NULL":
		return true
	}
	return false
}

// isMissing reports whether v is NaN or equal to one of the sentinels.
func isMissing(v float64, sentinels []float64) bool {
	if math.IsNaN(v) {
		return true
	}
	for _, s := range sentinels {
		if v == s {
			return true
		}
	}
	return false
}
