package plots

import (
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Figure is one finished image: a title, a short note, a key of the
// traces, and one or more panels stacked top to bottom whose data areas
// line up, so that stacked panels share their frequency axis.
type Figure struct {
	// Name is a short file-name stem such as "gain-phase".
	Name string
	// Title heads the figure; Note, in smaller type beneath it, says what
	// the curves are referred to (ports, reference impedance).
	Title, Note string
	// Key lists the traces, laid out in rows under the title.
	Key []KeyEntry
	// Scale, when not nil, is the colour scale of a colour map, drawn
	// beneath the key.
	Scale *ColourScale
	// Panels are drawn top to bottom with equal data areas.
	Panels []*plot.Plot
	// Width and Height are the size Write renders at.
	Width, Height vg.Length
}

// KeyEntry is one item of a figure's key: a sample of how the trace is
// drawn and what it is.
type KeyEntry struct {
	Label  string
	Thumbs []plot.Thumbnailer
}

// Key sizes.
var (
	keySwatch = vg.Points(24) // length of the line sample
	keyInner  = vg.Points(5)  // between sample and label
	keyOuter  = vg.Points(16) // between entries
	keyRowGap = vg.Points(3)
)

// Draw draws the whole figure onto c, filling it.
func (f *Figure) Draw(c draw.Canvas) {
	c.SetColor(background)
	c.Fill(c.Rectangle.Path())
	c = draw.Crop(c, figureMargin, -figureMargin, figureMargin, -figureMargin)

	top := c.Max.Y
	if f.Title != "" {
		sty := textStyle(sansBold, titleSize, ink)
		sty.XAlign, sty.YAlign = draw.XLeft, draw.YTop
		c.FillText(sty, vg.Point{X: c.Min.X, Y: top}, f.Title)
		top -= sty.Height(f.Title) + vg.Points(2)
	}
	if f.Note != "" {
		sty := textStyle(sans, noteSize, inkSoft)
		sty.XAlign, sty.YAlign = draw.XLeft, draw.YTop
		for _, line := range wrapNote(f.Note, c.Max.X-c.Min.X, sty.Width) {
			c.FillText(sty, vg.Point{X: c.Min.X, Y: top}, line)
			top -= sty.Height(line)
		}
	}
	if len(f.Key) > 0 {
		top -= vg.Points(6)
		top = f.drawKey(c, top)
	}
	if f.Scale != nil {
		top -= vg.Points(6)
		top = f.Scale.draw(c, top)
	}
	top -= vg.Points(6)
	body := c
	body.Max.Y = top
	if len(f.Panels) == 0 || body.Max.Y <= body.Min.Y {
		return
	}
	rows := make([][]*plot.Plot, len(f.Panels))
	for i, p := range f.Panels {
		rows[i] = []*plot.Plot{p}
	}
	tiles := draw.Tiles{Rows: len(f.Panels), Cols: 1, PadY: panelGap}
	for i, cs := range plot.Align(rows, tiles, body) {
		f.Panels[i].Draw(cs[0])
	}
}

// wrapNote breaks note into lines no wider than width, between words. A
// word wider than the line is left whole.
func wrapNote(note string, width vg.Length, measure func(string) vg.Length) []string {
	var lines []string
	line := ""
	for _, word := range strings.Fields(note) {
		switch {
		case line == "":
			line = word
		case measure(line+" "+word) <= width:
			line += " " + word
		default:
			lines = append(lines, line)
			line = word
		}
	}
	return append(lines, line)
}

// drawKey lays the key out in rows from the top edge y down, starting a
// new row where an entry would cross the right margin, and returns the
// bottom of the last row.
func (f *Figure) drawKey(c draw.Canvas, y vg.Length) vg.Length {
	sty := textStyle(sans, keySize, ink)
	sty.XAlign, sty.YAlign = draw.XLeft, draw.YCenter
	rowH := sty.Height("Mg")
	x := c.Min.X
	mid := y - rowH/2
	for _, e := range f.Key {
		w := keySwatch + keyInner + sty.Width(e.Label)
		if x > c.Min.X && x+w > c.Max.X {
			x = c.Min.X
			mid -= rowH + keyRowGap
		}
		swatch := draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
			Min: vg.Point{X: x, Y: mid - rowH/2},
			Max: vg.Point{X: x + keySwatch, Y: mid + rowH/2},
		}}
		for _, t := range e.Thumbs {
			t.Thumbnail(&swatch)
		}
		c.FillText(sty, vg.Point{X: x + keySwatch + keyInner, Y: mid}, e.Label)
		x += w + keyOuter
	}
	return mid - rowH/2
}

// pngDPI renders PNGs at twice the 72 points per inch of the figure sizes,
// so that thin grid lines and small labels stay sharp on screens and in
// printed reports.
const pngDPI = 144

// Write renders f at its Width and Height into w, as "svg" or "png".
//
// SVG output names the Liberation Sans font rather than embedding it, so
// the files stay small; a viewer without the font substitutes a similar
// sans-serif face.
func Write(w io.Writer, format string, f *Figure) (err error) {
	if f == nil {
		return fmt.Errorf("plots: no figure to write")
	}
	if !(f.Width > 0) || !(f.Height > 0) {
		return fmt.Errorf("plots: figure %q has size %v × %v; both must be positive", f.Name, f.Width, f.Height)
	}
	var cw vg.CanvasWriterTo
	switch strings.ToLower(format) {
	case "svg":
		cw = vgsvg.New(f.Width, f.Height)
	case "png":
		cw = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(f.Width, f.Height), vgimg.UseDPI(pngDPI))}
	default:
		return fmt.Errorf("plots: unknown image format %q; use svg or png", format)
	}
	// The figures guard against the data they know of; this keeps a
	// drawing failure inside gonum/plot on some unforeseen input from
	// taking the whole command down with it.
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("plots: drawing figure %q: %v", f.Name, r)
		}
	}()
	f.Draw(draw.New(cw))
	if _, err := cw.WriteTo(w); err != nil {
		return fmt.Errorf("plots: writing figure %q as %s: %w", f.Name, format, err)
	}
	return nil
}

// Formats are the files a figure is written as, each by Write.
var Formats = []string{"svg", "png"}

// Files returns the files figs are written to in dir: each figure's
// Name with each of Formats as its extension, in that order.
func Files(dir string, figs []*Figure) []string {
	var paths []string
	for _, f := range figs {
		for _, format := range Formats {
			paths = append(paths, filepath.Join(dir, f.Name+"."+format))
		}
	}
	return paths
}
