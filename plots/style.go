package plots

import (
	"image/color"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The house style. Every figure takes its colours, type, line weights and
// spacing from here, so that a page of qpoint figures reads as one set.

func rgb(hex uint32) color.RGBA {
	return color.RGBA{R: uint8(hex >> 16), G: uint8(hex >> 8), B: uint8(hex), A: 0xff}
}

// Palette holds the trace colours in the order traces take them: harbour
// blue, amber, teal, raspberry, lilac and walnut. The set was chosen for
// this project so that every pair stays clearly apart (a CIE76 colour
// difference of at least 20) under simulated protanopia, deuteranopia and
// tritanopia as well as normal vision (TestPaletteApartUnderColourBlindness
// checks it), and every colour is dark enough for thin lines on white
// paper. Greyscale print cannot separate them all, so traces also take a
// dash pattern from their position (see traceLine).
var Palette = []color.Color{
	rgb(0x1F4E89), // harbour blue
	rgb(0xDB8A1F), // amber
	rgb(0x35A3A0), // teal
	rgb(0xA6325E), // raspberry
	rgb(0x8C7FD0), // lilac
	rgb(0x7A5230), // walnut
}

var (
	background = color.White
	ink        = rgb(0x2B3138) // titles, axis labels, panel frames
	inkSoft    = rgb(0x5A636C) // tick labels, notes, chart annotations
	gridMajor  = rgb(0xCBD2D9)
	gridMinor  = rgb(0xEBEEF2)
	zeroLine   = rgb(0xA4ADB6) // the 0 of a linear axis, a reference worth seeing
)

// dashPatterns pair with Palette by position; the first trace is solid.
var dashPatterns = [][]vg.Length{
	nil,
	{vg.Points(6), vg.Points(3)},
	{vg.Points(9), vg.Points(2.5), vg.Points(2), vg.Points(2.5)},
	{vg.Points(2), vg.Points(2)},
	{vg.Points(12), vg.Points(3)},
	{vg.Points(4), vg.Points(2), vg.Points(1), vg.Points(2), vg.Points(1), vg.Points(2)},
}

// Line weights and lengths.
var (
	traceWidth = vg.Points(1.5)
	frameWidth = vg.Points(0.6)
	majorWidth = vg.Points(0.5)
	minorWidth = vg.Points(0.4)

	figureMargin = vg.Points(12) // between the image edge and everything else
	panelGap     = vg.Points(16) // between stacked panels, clear of both panels' end labels
	tickGap      = vg.Points(4)  // between a panel frame and its tick labels
	labelGap     = vg.Points(4)  // between tick labels and the axis label
	markerRadius = vg.Points(2.6)
)

// Type: Liberation Sans throughout, which gonum/plot carries built in, so a
// figure renders the same on every machine without system fonts.
var (
	sans     = font.Font{Typeface: "Liberation", Variant: "Sans"}
	sansBold = font.Font{Typeface: "Liberation", Variant: "Sans", Weight: xfont.WeightBold}

	titleSize = vg.Points(13)
	noteSize  = vg.Points(9)
	labelSize = vg.Points(9.5)
	tickSize  = vg.Points(8.5)
	keySize   = vg.Points(9)
	smallSize = vg.Points(7.5) // chart annotations and marker labels
)

func textStyle(f font.Font, size vg.Length, c color.Color) text.Style {
	return text.Style{
		Color:   c,
		Font:    font.From(f, size),
		Handler: plot.DefaultTextHandler,
	}
}

// traceLine is the line style of the k-th trace of a figure.
func traceLine(k int) draw.LineStyle {
	return draw.LineStyle{
		Color:  Palette[k%len(Palette)],
		Width:  traceWidth,
		Dashes: dashPatterns[k%len(dashPatterns)],
	}
}

// NewPanel returns an empty plot in the house style: no title of its own
// (the figure carries it), a white background, tick labels just outside the
// data area, no tick marks and no axis lines, since the frame and grid
// drawn by framePlotter take their place.
func NewPanel(xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	p.BackgroundColor = nil // the figure paints the whole background once
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.LineStyle.Width = 0
		a.Padding = tickGap
		a.Tick.Length = 0
		a.Tick.Width = 0
		a.Tick.Label = textStyle(sans, tickSize, inkSoft)
		a.Label.TextStyle = textStyle(sans, labelSize, ink)
		a.Label.Padding = labelGap
	}
	p.X.Tick.Label.XAlign, p.X.Tick.Label.YAlign = draw.XCenter, draw.YTop
	p.Y.Tick.Label.XAlign, p.Y.Tick.Label.YAlign = draw.XRight, draw.YCenter
	p.X.Label.TextStyle.XAlign, p.X.Label.TextStyle.YAlign = draw.XCenter, draw.YBottom
	p.Y.Label.TextStyle.XAlign, p.Y.Label.TextStyle.YAlign = draw.XCenter, draw.YBottom
	p.X.Label.Text = xLabel
	p.Y.Label.Text = yLabel
	return p
}

// rgbaOver is a colour with alpha a, premultiplied as image/color expects.
func rgbaOver(hex uint32, a uint8) color.RGBA {
	c := rgb(hex)
	scale := func(v uint8) uint8 { return uint8(uint32(v) * uint32(a) / 0xff) }
	return color.RGBA{R: scale(c.R), G: scale(c.G), B: scale(c.B), A: a}
}
