package palettes

import (
	"fmt"
	"image/color"

	colorful "github.com/lucasb-eyer/go-colorful"
)

// Deficiency is a kind of dichromatic colour vision.
type Deficiency int

const (
	Protanopia   Deficiency = iota // no long-wavelength (red) cones
	Deuteranopia                   // no medium-wavelength (green) cones
)

// String returns the lowercase name of the deficiency.
func (d Deficiency) String() string {
	switch d {
	case Protanopia:
		return "protanopia"
	case Deuteranopia:
		return "deuteranopia"
	}
	return fmt.Sprintf("deficiency(%d)", int(d))
}

// machadoSeverity1 holds the severity-1.0 simulation matrices of Machado,
// Oliveira and Fernandes (2009), "A Physiologically-based Model for
// Simulation of Color Vision Deficiency", IEEE TVCG 15(6), 1291-1298,
// doi:10.1109/TVCG.2009.113, from the authors' supplementary table. They act
// on linear RGB. The values were taken from a public copy of that table (the
// colorspacious package's cvd.py) found with a source search, not recalled.
var machadoSeverity1 = [...][3][3]float64{
	Protanopia: {
		{0.152286, 1.052583, -0.204868},
		{0.114503, 0.786281, 0.099216},
		{-0.003882, -0.048116, 1.051998},
	},
	Deuteranopia: {
		{0.367322, 0.860646, -0.227968},
		{0.280085, 0.672501, 0.047413},
		{-0.011820, 0.042940, 0.968881},
	},
}

// Simulate returns how c looks to a dichromat with deficiency d, by the
// method of Machado, Oliveira and Fernandes (2009) at severity 1: the sRGB
// colour is linearised, multiplied by the matrix, clipped to [0,1] and
// encoded again. An unknown deficiency returns c unchanged. Alpha is kept.
func Simulate(c color.RGBA, d Deficiency) color.RGBA {
	if d < 0 || int(d) >= len(machadoSeverity1) {
		return c
	}
	in := colorful.Color{R: float64(c.R) / 255, G: float64(c.G) / 255, B: float64(c.B) / 255}
	r8, g8, b8 := simulate(in, d).RGB255()
	return color.RGBA{r8, g8, b8, c.A}
}

// simulate is Simulate without rounding the result to 8 bits; d must be
// a known deficiency.
func simulate(c colorful.Color, d Deficiency) colorful.Color {
	m := machadoSeverity1[d]
	r, g, b := c.LinearRgb()
	lr := m[0][0]*r + m[0][1]*g + m[0][2]*b
	lg := m[1][0]*r + m[1][1]*g + m[1][2]*b
	lb := m[2][0]*r + m[2][1]*g + m[2][2]*b
	return colorful.LinearRgb(lr, lg, lb).Clamped()
}
