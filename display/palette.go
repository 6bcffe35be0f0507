package display

import (
	"image/color"
	"math"
)

// The map colour scale is our own: a sequential ramp from dark indigo through blue,
// teal and green to pale yellow. Its anchor colours are converted to the OKLab
// space (B. Ottosson, "A perceptual color space for image processing", 2020),
// joined by straight lines there, and re-sampled at equal steps of OKLab distance,
// so equal steps in the data give equal perceived colour steps. The anchors were
// chosen so that OKLab lightness rises monotonically (it reads in grey print and
// for colour-blind readers as dark = low, light = high).
var rampAnchors = []color.NRGBA{
	{0x16, 0x14, 0x44, 0xff}, // dark indigo
	{0x2a, 0x3f, 0x8f, 0xff}, // blue
	{0x1f, 0x7f, 0x9c, 0xff}, // teal
	{0x3c, 0xaa, 0x84, 0xff}, // green
	{0x9c, 0xcf, 0x62, 0xff}, // yellow-green
	{0xf6, 0xeb, 0x9a, 0xff}, // pale yellow
}

// rampSize is the number of colours in the sampled ramp (the heat-map image is
// paletted with them).
const rampSize = 250

// ramp is the sampled colour scale, rampSize colours from low to high.
var ramp = makeRamp(rampAnchors, rampSize)

// rampColor returns the ramp colour for t in [0, 1] (clamped).
func rampColor(t float64) color.NRGBA { return ramp[rampIndex(t)] }

func rampIndex(t float64) int {
	if !(t > 0) {
		return 0
	}
	if t >= 1 {
		return rampSize - 1
	}
	return int(t*(rampSize-1) + 0.5)
}

// wheel is the colour scale of cyclic maps (phases): a circle in the OKLab a–b
// plane at constant lightness and chroma, rampSize hues going once round, so
// that −180° and +180° meet in one colour and no phase looks larger than
// another (common practice for phase maps; the lightness and chroma keep every
// hue inside sRGB).
var wheel = makeWheel(rampSize)

func makeWheel(n int) []color.NRGBA {
	out := make([]color.NRGBA, n)
	for i := range out {
		s, c := math.Sincos(2 * math.Pi * float64(i) / float64(n))
		out[i] = fromOKLab(oklab{0.70, 0.10 * c, 0.10 * s})
	}
	return out
}

// wheelIndex returns the wheel colour for t in [0, 1), taken modulo 1.
func wheelIndex(t float64) int {
	t -= math.Floor(t)
	return int(t*rampSize+0.5) % rampSize
}

type oklab struct{ L, a, b float64 }

func makeRamp(anchors []color.NRGBA, n int) []color.NRGBA {
	out := make([]color.NRGBA, n)
	for i, p := range rampLab(anchors, n) {
		out[i] = fromOKLab(p)
	}
	return out
}

// rampLab samples the OKLab polyline through the anchors at n points equally
// spaced in distance along it.
func rampLab(anchors []color.NRGBA, n int) []oklab {
	lab := make([]oklab, len(anchors))
	for i, c := range anchors {
		lab[i] = toOKLab(c)
	}
	// Cumulative OKLab distance along the polyline of anchors.
	cum := make([]float64, len(lab))
	for i := 1; i < len(lab); i++ {
		d := lab[i].sub(lab[i-1])
		cum[i] = cum[i-1] + math.Sqrt(d.L*d.L+d.a*d.a+d.b*d.b)
	}
	out := make([]oklab, n)
	seg := 1
	for k := range n {
		s := cum[len(cum)-1] * float64(k) / float64(n-1)
		for seg < len(cum)-1 && s > cum[seg] {
			seg++
		}
		f := (s - cum[seg-1]) / (cum[seg] - cum[seg-1])
		p, q := lab[seg-1], lab[seg]
		out[k] = oklab{p.L + f*(q.L-p.L), p.a + f*(q.a-p.a), p.b + f*(q.b-p.b)}
	}
	return out
}

func (p oklab) sub(q oklab) oklab { return oklab{p.L - q.L, p.a - q.a, p.b - q.b} }

// sRGB transfer function and its inverse (IEC 61966-2-1).
func srgbToLinear(c float64) float64 {
	if c <= 0.04045 {
		return c / 12.92
	}
	return math.Pow((c+0.055)/1.055, 2.4)
}

func linearToSRGB(c float64) float64 {
	if c <= 0.0031308 {
		return 12.92 * c
	}
	return 1.055*math.Pow(c, 1/2.4) - 0.055
}

// toOKLab and fromOKLab use the matrices of Ottosson (2020), "A perceptual color
// space for image processing".
func toOKLab(c color.NRGBA) oklab {
	r := srgbToLinear(float64(c.R) / 255)
	g := srgbToLinear(float64(c.G) / 255)
	b := srgbToLinear(float64(c.B) / 255)
	l := math.Cbrt(0.4122214708*r + 0.5363325363*g + 0.0514459929*b)
	m := math.Cbrt(0.2119034982*r + 0.6806995451*g + 0.1073969566*b)
	s := math.Cbrt(0.0883024619*r + 0.2817188376*g + 0.6299787005*b)
	return oklab{
		L: 0.2104542553*l + 0.7936177850*m - 0.0040720468*s,
		a: 1.9779984951*l - 2.4285922050*m + 0.4505937099*s,
		b: 0.0259040371*l + 0.7827717662*m - 0.8086757660*s,
	}
}

func fromOKLab(p oklab) color.NRGBA {
	l := p.L + 0.3963377774*p.a + 0.2158037573*p.b
	m := p.L - 0.1055613458*p.a - 0.0638541728*p.b
	s := p.L - 0.0894841775*p.a - 1.2914855480*p.b
	l, m, s = l*l*l, m*m*m, s*s*s
	r := 4.0767416621*l - 3.3077115913*m + 0.2309699292*s
	g := -1.2684380046*l + 2.6097574011*m - 0.3413193965*s
	b := -0.0041960863*l - 0.7034186147*m + 1.7076147010*s
	to8 := func(v float64) uint8 {
		v = linearToSRGB(min(max(v, 0), 1))
		return uint8(math.Round(v * 255))
	}
	return color.NRGBA{to8(r), to8(g), to8(b), 0xff}
}
