package figure

import (
	"image/color"
	"math"
)

// lab is a colour in CIE 1976 L*a*b* under the D65 white point.
type lab struct{ L, A, B float64 }

// divergingStops are the control colours of the package's diverging scale,
// in CIELAB, at t = -1, -0.5, 0, 0.5, 1. Low values run through a steel
// blue to a deep indigo, high values through an ochre to a dark rust; the
// centre is a warm off-white. Lightness falls symmetrically away from the
// centre (95, 62, 27), so the order of values reads from lightness alone,
// and the two arms differ along the blue-yellow axis that the common
// red-green colour-vision deficiencies keep.
var divergingStops = [5]lab{
	{27, 14, -44},
	{62, -10, -30},
	{95, 0, 4},
	{62, 24, 52},
	{27, 34, 30},
}

// NoDataColor is the colour of map pixels where the field is NaN: a neutral
// mid-dark grey that neither arm of the diverging scale contains.
var NoDataColor = color.RGBA{R: 0x6b, G: 0x6b, B: 0x6b, A: 0xff}

// Diverging returns the colour of the package's diverging scale at t in
// [-1, 1]: -1 is the low end, 0 the centre, 1 the high end; t outside the
// range is clamped and NaN gives NoDataColor. Colours are interpolated
// linearly in CIELAB between the control colours and converted to sRGB.
func Diverging(t float64) color.RGBA {
	if math.IsNaN(t) {
		return NoDataColor
	}
	return divergingLab(t).rgba()
}

func divergingLab(t float64) lab {
	t = math.Max(-1, math.Min(1, t))
	u := (t + 1) * 2 // 0..4
	i := int(u)
	if i >= 4 {
		i = 3
	}
	f := u - float64(i)
	a, b := divergingStops[i], divergingStops[i+1]
	return lab{a.L + f*(b.L-a.L), a.A + f*(b.A-a.A), a.B + f*(b.B-a.B)}
}

// Scale maps values to colours of the diverging scale centred on Center
// with symmetric limits Center - HalfRange and Center + HalfRange.
type Scale struct {
	// Center is the value drawn in the centre colour, usually the mean.
	Center float64
	// HalfRange is the distance from Center to either limit; values beyond
	// the limits take the end colours. It must be positive.
	HalfRange float64
}

// lutSize is the number of precomputed colours of Scale.Color: odd, so
// that the centre is one of them, and fine enough that neighbours differ by
// less than one 8-bit level.
const lutSize = 2049

// divergingLUT holds Diverging at lutSize equally spaced t in [-1, 1].
var divergingLUT = func() []color.RGBA {
	t := make([]color.RGBA, lutSize)
	for i := range t {
		t[i] = Diverging(2*float64(i)/(lutSize-1) - 1)
	}
	return t
}()

// T returns the position (v - Center) / HalfRange of v on the scale, not
// clamped.
func (s Scale) T(v float64) float64 { return (v - s.Center) / s.HalfRange }

// Color returns the colour of value v: Diverging(s.T(v)) with t rounded to
// one of 2049 equally spaced levels in [-1, 1], which leaves the centre and
// the limits exact.
func (s Scale) Color(v float64) color.RGBA {
	t := s.T(v)
	if math.IsNaN(t) {
		return NoDataColor
	}
	t = math.Max(-1, math.Min(1, t))
	return divergingLUT[int(math.Round((t+1)/2*(lutSize-1)))]
}

// xyz returns the CIE XYZ tristimulus values (Y of white = 1) of c.
// CIE 15:2004 formulas for L*a*b*, D65 white (0.95047, 1, 1.08883).
func (c lab) xyz() (x, y, z float64) {
	fy := (c.L + 16) / 116
	fx := fy + c.A/500
	fz := fy - c.B/200
	inv := func(f float64) float64 {
		const d = 6.0 / 29
		if f > d {
			return f * f * f
		}
		return 3 * d * d * (f - 4.0/29)
	}
	return 0.95047 * inv(fx), inv(fy), 1.08883 * inv(fz)
}

// linearRGB returns the linear sRGB components of c, unclamped
// (IEC 61966-2-1 matrix from XYZ).
func (c lab) linearRGB() (r, g, b float64) {
	x, y, z := c.xyz()
	r = 3.2404542*x - 1.5371385*y - 0.4985314*z
	g = -0.9692660*x + 1.8760108*y + 0.0415560*z
	b = 0.0556434*x - 0.2040259*y + 1.0572252*z
	return r, g, b
}

// encodeSRGB applies the sRGB transfer function (IEC 61966-2-1).
func encodeSRGB(v float64) float64 {
	v = math.Max(0, math.Min(1, v))
	if v <= 0.0031308 {
		return 12.92 * v
	}
	return 1.055*math.Pow(v, 1/2.4) - 0.055
}

// decodeSRGB inverts encodeSRGB.
func decodeSRGB(v float64) float64 {
	if v <= 0.04045 {
		return v / 12.92
	}
	return math.Pow((v+0.055)/1.055, 2.4)
}

func (c lab) rgba() color.RGBA {
	r, g, b := c.linearRGB()
	q := func(v float64) uint8 { return uint8(math.Round(255 * encodeSRGB(v))) }
	return color.RGBA{R: q(r), G: q(g), B: q(b), A: 0xff}
}

// labFromLinear converts linear sRGB to CIELAB (D65).
func labFromLinear(r, g, b float64) lab {
	x := 0.4124564*r + 0.3575761*g + 0.1804375*b
	y := 0.2126729*r + 0.7151522*g + 0.0721750*b
	z := 0.0193339*r + 0.1191920*g + 0.9503041*b
	f := func(t float64) float64 {
		const d = 6.0 / 29
		if t > d*d*d {
			return math.Cbrt(t)
		}
		return t/(3*d*d) + 4.0/29
	}
	fx, fy, fz := f(x/0.95047), f(y), f(z/1.08883)
	return lab{116*fy - 16, 500 * (fx - fy), 200 * (fy - fz)}
}

// labOf converts an 8-bit sRGB colour to CIELAB.
func labOf(c color.RGBA) lab {
	return labFromLinear(decodeSRGB(float64(c.R)/255), decodeSRGB(float64(c.G)/255), decodeSRGB(float64(c.B)/255))
}

// seriesColors are the line colours of spectra, correlation and sweep
// plots: our own set, chosen to differ in lightness as well as hue so that
// they stay apart for red-green colour-blind readers and in grey print.
// Each series also gets its own dash pattern and marker.
var seriesColors = []color.RGBA{
	{0x1d, 0x3f, 0x8f, 0xff}, // dark blue
	{0xd0, 0x7a, 0x12, 0xff}, // orange
	{0x3a, 0x3a, 0x3a, 0xff}, // near black
	{0x5e, 0xa8, 0xd8, 0xff}, // sky blue
	{0x8a, 0x2f, 0x5e, 0xff}, // plum
	{0xb5, 0xa2, 0x2a, 0xff}, // olive gold
}
