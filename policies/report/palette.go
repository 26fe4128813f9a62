package report

import (
	"image/color"
	"math"
)

// The colours of Okabe & Ito (2008), "Color Universal Design", distinguishable
// under the common forms of colour blindness.
var (
	okBlack     = color.RGBA{0x00, 0x00, 0x00, 0xff}
	okOrange    = color.RGBA{0xE6, 0x9F, 0x00, 0xff}
	okSkyBlue   = color.RGBA{0x56, 0xB4, 0xE9, 0xff}
	okGreen     = color.RGBA{0x00, 0x9E, 0x73, 0xff} // bluish green
	okYellow    = color.RGBA{0xF0, 0xE4, 0x42, 0xff}
	okBlue      = color.RGBA{0x00, 0x72, 0xB2, 0xff}
	okVermilion = color.RGBA{0xD5, 0x5E, 0x00, 0xff}
	okPurple    = color.RGBA{0xCC, 0x79, 0xA7, 0xff} // reddish purple
	lightGrey   = color.RGBA{0xdd, 0xdd, 0xdd, 0xff}
	midGrey     = color.RGBA{0x88, 0x88, 0x88, 0xff}
	white       = color.RGBA{0xff, 0xff, 0xff, 0xff}
)

// viridisAnchors are eleven evenly spaced samples of the viridis colour map
// (van der Walt & Smith 2015, the default map of matplotlib since 2.0), from
// t = 0 (dark purple) to t = 1 (yellow). Values quoted from memory of the
// published hex table; between anchors colours are interpolated linearly in
// sRGB, which keeps lightness monotone.
var viridisAnchors = [...]color.RGBA{
	{0x44, 0x01, 0x54, 0xff},
	{0x48, 0x24, 0x75, 0xff},
	{0x41, 0x44, 0x87, 0xff},
	{0x35, 0x5f, 0x8d, 0xff},
	{0x2a, 0x78, 0x8e, 0xff},
	{0x21, 0x91, 0x8c, 0xff},
	{0x22, 0xa8, 0x84, 0xff},
	{0x44, 0xbf, 0x70, 0xff},
	{0x7a, 0xd1, 0x51, 0xff},
	{0xbd, 0xdf, 0x26, 0xff},
	{0xfd, 0xe7, 0x25, 0xff},
}

// viridis returns the viridis colour at t in [0, 1] (clamped).
func viridis(t float64) color.RGBA {
	if math.IsNaN(t) || t < 0 {
		t = 0
	}
	if t > 1 {
		t = 1
	}
	n := len(viridisAnchors) - 1
	x := t * float64(n)
	i := int(x)
	if i >= n {
		return viridisAnchors[n]
	}
	f := x - float64(i)
	a, b := viridisAnchors[i], viridisAnchors[i+1]
	mix := func(u, v uint8) uint8 { return uint8(math.Round(float64(u) + f*(float64(v)-float64(u)))) }
	return color.RGBA{mix(a.R, b.R), mix(a.G, b.G), mix(a.B, b.B), 0xff}
}

// costColour maps a cost to a colour: the cheapest cell is the lightest
// (yellow), costs at or above hi the darkest (purple).
func costColour(v, lo, hi float64) color.RGBA {
	if !(hi > lo) {
		return viridis(1)
	}
	return viridis(1 - (v-lo)/(hi-lo))
}

// hexColour prints c as #rrggbb for CSS.
func hexColour(c color.RGBA) string {
	const digits = "0123456789abcdef"
	b := []byte{'#', 0, 0, 0, 0, 0, 0}
	for i, v := range []uint8{c.R, c.G, c.B} {
		b[1+2*i] = digits[v>>4]
		b[2+2*i] = digits[v&15]
	}
	return string(b)
}
