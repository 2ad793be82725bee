package chart

import (
	"bytes"
	"errors"
	"io"
	"strings"
	"testing"
)

func TestFormatOf(t *testing.T) {
	for _, c := range []struct {
		path string
		want Format
		err  string
	}{
		{"tornado.svg", SVG, ""},
		{"out/Spider.PNG", PNG, ""},
		{"a.b.svg", SVG, ""},
		{"chart.pdf", 0, `"chart.pdf" ends in .pdf: charts are written as .svg or .png`},
		{"chart", 0, `"chart" has no extension: charts are written as .svg or .png`},
		{"chart.svg.txt", 0, "ends in .txt"},
	} {
		got, err := FormatOf(c.path)
		switch {
		case c.err == "" && (err != nil || got != c.want):
			t.Errorf("FormatOf(%q) = %v, %v; want %v", c.path, got, err, c.want)
		case c.err != "" && (err == nil || !strings.Contains(err.Error(), c.err) || !errors.Is(err, ErrFormat)):
			t.Errorf("FormatOf(%q) error %v; want one containing %q that wraps ErrFormat", c.path, err, c.err)
		}
	}
}

func TestOptionsAreChecked(t *testing.T) {
	data := demoTornado()
	for _, c := range []struct {
		name string
		opt  Options
		want string
	}{
		{"unknown format", Options{Format: 9}, "unknown format"},
		{"too small", Options{Width: 10, Height: 10}, "outside 72"},
		{"too large", Options{Width: 1e6}, "outside 72"},
		{"negative", Options{Height: -100}, "outside 72"},
		{"NaN", Options{Width: nan()}, "outside 72"},
		{"DPI", Options{Format: PNG, DPI: 5000}, "resolution of 5000 DPI"},
		{"pixels", Options{Format: PNG, Width: 5000, DPI: 600}, "more than the limit"},
	} {
		t.Run(c.name, func(t *testing.T) {
			err := WriteTornado(io.Discard, data, c.opt)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one containing %q", err, c.want)
			}
		})
	}
}

func nan() float64 { var z float64; return z / z }

// An SVG with its fonts embedded carries them as @font-face rules, still
// parses, and is still the same from run to run.
func TestEmbedFonts(t *testing.T) {
	draw := func(w io.Writer, o Options) error {
		o.EmbedFonts = true
		return WriteSpider(w, demoSpider(), o)
	}
	a, b := drawn(t, draw, Options{}), drawn(t, draw, Options{})
	if !bytes.Equal(a, b) {
		t.Errorf("two runs differ")
	}
	doc := parseSVG(t, a)
	if n := bytes.Count(a, []byte("@font-face")); n != 2 {
		t.Errorf("%d embedded faces, want 2 (regular and bold)", n)
	}
	if doc.count("Licence fee") != 1 {
		t.Errorf("text lost: %q", doc.strings())
	}
	plain := drawn(t, func(w io.Writer, o Options) error { return WriteSpider(w, demoSpider(), o) }, Options{})
	if bytes.Contains(plain, []byte("@font-face")) {
		t.Errorf("fonts embedded without being asked for")
	}
}
