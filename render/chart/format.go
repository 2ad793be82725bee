package chart

import (
	"errors"
	"fmt"
	"path/filepath"
	"strings"
)

// Format is the file format a chart is written in.
type Format int

const (
	// SVG is scalable vector graphics, text that browsers and slide
	// programs read. It is the format of the zero Options.
	SVG Format = iota
	// PNG is a raster image at Options.DPI.
	PNG
)

// String is the format's usual file extension without the dot.
func (f Format) String() string {
	switch f {
	case SVG:
		return "svg"
	case PNG:
		return "png"
	}
	return fmt.Sprintf("Format(%d)", int(f))
}

// ErrFormat is wrapped by the error FormatOf returns for a file name whose
// extension names no format charts are written in.
var ErrFormat = errors.New("charts are written as .svg or .png")

// FormatOf picks the format from a file name's extension, .svg or .png in
// any case; any other extension, or none, is an error that names both.
func FormatOf(path string) (Format, error) {
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".svg":
		return SVG, nil
	case ".png":
		return PNG, nil
	case "":
		return 0, fmt.Errorf("%q has no extension: %w", path, ErrFormat)
	default:
		return 0, fmt.Errorf("%q ends in %s: %w", path, ext, ErrFormat)
	}
}

// Options say how a chart is written. The zero value writes SVG at a size
// that suits the chart and its data.
type Options struct {
	// Format is SVG (the zero value) or PNG.
	Format Format
	// Width and Height are the picture's size in points (1/72 inch).
	// Zero picks a size from the chart's kind and how much data it shows.
	Width, Height float64
	// DPI is the resolution of a PNG in pixels per inch; zero means
	// DefaultDPI. A PNG is Width·DPI/72 pixels wide (rounded up).
	DPI int
	// EmbedFonts puts the chart's typefaces inside an SVG (about 0.6 MB
	// more), so that it looks the same in every viewer. Without them an
	// SVG names its face and metric-compatible fallbacks (Arimo, Arial,
	// Helvetica); a viewer that has none of them draws wider text that
	// may run into its neighbours.
	EmbedFonts bool
}

// DefaultDPI is the resolution of a PNG unless Options.DPI says otherwise:
// two pixels a point, sharp on a slide or a high-density screen.
const DefaultDPI = 144

// Limits that keep a picture's size bounded whatever the data.
const (
	// MaxSide is the longest side of a chart in points (2 metres).
	MaxSide = 5_669.0
	// MaxPixels is the longest side of a PNG in pixels.
	MaxPixels = 16_384
	// MaxDPI is the highest PNG resolution accepted.
	MaxDPI = 1_200
)

// size resolves the picture's size in points from the options and the
// chart's own default, and checks it.
func (o Options) size(defW, defH float64) (w, h float64, dpi int, err error) {
	w, h, dpi = o.Width, o.Height, o.DPI
	if w == 0 {
		w = defW
	}
	if h == 0 {
		h = defH
	}
	if dpi == 0 {
		dpi = DefaultDPI
	}
	switch {
	case o.Format != SVG && o.Format != PNG:
		return 0, 0, 0, fmt.Errorf("chart: unknown format %v: %w", o.Format, ErrFormat)
	case !(w >= 72 && h >= 72) || w > MaxSide || h > MaxSide:
		return 0, 0, 0, fmt.Errorf("chart: a size of %g × %g points is outside 72 to %g points a side", w, h, MaxSide)
	case dpi < 18 || dpi > MaxDPI:
		return 0, 0, 0, fmt.Errorf("chart: a resolution of %d DPI is outside 18 to %d", dpi, MaxDPI)
	}
	if o.Format == PNG {
		if px := max(w, h) * float64(dpi) / 72; px > MaxPixels {
			return 0, 0, 0, fmt.Errorf("chart: a PNG of %.0f pixels a side is more than the limit of %d; lower the DPI or the size", px, MaxPixels)
		}
	}
	return w, h, dpi, nil
}
