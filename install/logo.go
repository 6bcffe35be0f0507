package install

import (
	"bytes"
	"image"
	"image/color"
	"image/png"
	"math"
)

// Logo draws the kernel's logo at size×size pixels: a magnetization vector
// tipped off the vertical axis, riding the rim of its nutation cone, on a
// round dark-blue badge. It is drawn from geometry (4×4 supersampling per
// pixel), so every size is sharp and the bytes are the same on every run.
func Logo(size int) *image.NRGBA {
	img := image.NewNRGBA(image.Rect(0, 0, size, size))
	const ss = 4 // samples per pixel side
	s := float64(size)
	for py := 0; py < size; py++ {
		for px := 0; px < size; px++ {
			var r, g, b, a float64
			for sy := 0; sy < ss; sy++ {
				for sx := 0; sx < ss; sx++ {
					// Unit coordinates: x right, y up, origin at the centre.
					x := ((float64(px)+(float64(sx)+0.5)/ss)/s)*2 - 1
					y := 1 - ((float64(py)+(float64(sy)+0.5)/ss)/s)*2
					c := logoSample(x, y, 2/s)
					r += c[0] * c[3]
					g += c[1] * c[3]
					b += c[2] * c[3]
					a += c[3]
				}
			}
			n := float64(ss * ss)
			if a > 0 {
				r, g, b = r/a, g/a, b/a
			}
			img.SetNRGBA(px, py, color.NRGBA{
				R: uint8(math.Round(255 * r)),
				G: uint8(math.Round(255 * g)),
				B: uint8(math.Round(255 * b)),
				A: uint8(math.Round(255 * a / n)),
			})
		}
	}
	return img
}

// LogoPNG returns Logo(size) encoded as PNG.
func LogoPNG(size int) []byte {
	var buf bytes.Buffer
	if err := png.Encode(&buf, Logo(size)); err != nil {
		panic("install: png encoding of an in-memory image failed: " + err.Error())
	}
	return buf.Bytes()
}

// Logo geometry in unit coordinates (the badge is the unit disk).
var (
	logoApex   = [2]float64{0, -0.55} // the spin's origin, the cone's apex
	logoRimC   = [2]float64{0, 0.38}  // centre of the cone's rim (an ellipse seen from slightly above)
	logoRimA   = 0.46                 // rim semi-axes
	logoRimB   = 0.15
	logoTipAng = -0.55 // where on the rim the vector points (radians round the ellipse)
)

// logoSample returns the straight RGBA colour at (x, y); px is one pixel in
// unit coordinates, used for line widths.
func logoSample(x, y, px float64) [4]float64 {
	lw := math.Max(0.045, 1.6*px) // line half-width, never thinner than a pixel
	var c [4]float64
	over := func(r, g, b, a float64) {
		// Painter's "over" on straight colours with coverage a (0 or 1 here;
		// supersampling supplies the anti-aliasing).
		if a <= 0 {
			return
		}
		na := a + c[3]*(1-a)
		for i, v := range [3]float64{r, g, b} {
			c[i] = (v*a + c[i]*c[3]*(1-a)) / na
		}
		c[3] = na
	}
	rr := math.Hypot(x, y)
	if rr > 0.98 {
		return c
	}
	// Badge: deep blue with a lighter rim.
	if rr > 0.9 {
		over(0.30, 0.55, 0.85, 1)
	} else {
		over(0.07, 0.13, 0.28, 1)
	}
	tip := [2]float64{logoRimC[0] + logoRimA*math.Cos(logoTipAng), logoRimC[1] + logoRimB*math.Sin(logoTipAng)}
	// Vertical axis (B0), faint.
	if segDist(x, y, logoApex, [2]float64{0, 0.78}) < lw*0.6 {
		over(0.55, 0.62, 0.75, 1)
	}
	// Cone sides: apex to the rim's extremes.
	left := [2]float64{logoRimC[0] - logoRimA, logoRimC[1]}
	right := [2]float64{logoRimC[0] + logoRimA, logoRimC[1]}
	if segDist(x, y, logoApex, left) < lw*0.6 || segDist(x, y, logoApex, right) < lw*0.6 {
		over(0.45, 0.75, 0.95, 1)
	}
	// Rim: the path the vector's tip traces while it nutates.
	ex, ey := (x-logoRimC[0])/logoRimA, (y-logoRimC[1])/logoRimB
	if math.Abs(math.Hypot(ex, ey)-1)*logoRimB < lw*0.55 {
		over(0.45, 0.85, 1.0, 1)
	}
	// The magnetization vector: a thick shaft and an arrow head, warm orange.
	dx, dy := tip[0]-logoApex[0], tip[1]-logoApex[1]
	l := math.Hypot(dx, dy)
	ux, uy := dx/l, dy/l
	head := 0.22
	base := [2]float64{tip[0] - ux*head, tip[1] - uy*head}
	if segDist(x, y, logoApex, base) < lw*1.3 {
		over(1.0, 0.60, 0.15, 1)
	}
	hw := 0.11
	p1 := [2]float64{base[0] - uy*hw, base[1] + ux*hw}
	p2 := [2]float64{base[0] + uy*hw, base[1] - ux*hw}
	if inTriangle(x, y, tip, p1, p2) {
		over(1.0, 0.60, 0.15, 1)
	}
	// The spin itself at the apex.
	if math.Hypot(x-logoApex[0], y-logoApex[1]) < 0.08 {
		over(1.0, 0.85, 0.55, 1)
	}
	return c
}

// segDist is the distance from (x, y) to the segment ab.
func segDist(x, y float64, a, b [2]float64) float64 {
	vx, vy := b[0]-a[0], b[1]-a[1]
	t := ((x-a[0])*vx + (y-a[1])*vy) / (vx*vx + vy*vy)
	t = math.Max(0, math.Min(1, t))
	return math.Hypot(x-(a[0]+t*vx), y-(a[1]+t*vy))
}

// inTriangle reports whether (x, y) lies inside triangle abc (either winding).
func inTriangle(x, y float64, a, b, c [2]float64) bool {
	cross := func(p, q [2]float64) float64 { return (q[0]-p[0])*(y-p[1]) - (q[1]-p[1])*(x-p[0]) }
	d1, d2, d3 := cross(a, b), cross(b, c), cross(c, a)
	neg := d1 < 0 || d2 < 0 || d3 < 0
	pos := d1 > 0 || d2 > 0 || d3 > 0
	return !(neg && pos)
}
