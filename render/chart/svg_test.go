package chart

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"image/png"
	"io"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// svgDoc is what the tests read back from a chart's SVG: its texts and
// paths, in document order.
type svgDoc struct {
	texts []svgText
	paths []svgPath
}

type svgText struct {
	x, y float64 // as written; a smaller y is higher on the page
	s    string
}

type svgPath struct {
	d     string
	style map[string]string
}

// parseSVG reads an SVG document with encoding/xml, failing the test if it
// is not well-formed XML with an <svg> root.
func parseSVG(t *testing.T, data []byte) svgDoc {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(data))
	var doc svgDoc
	var root string
	var inText *svgText
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("the SVG is not well-formed XML: %v", err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = el.Name.Local
			}
			switch el.Name.Local {
			case "path":
				p := svgPath{style: map[string]string{}}
				for _, a := range el.Attr {
					switch a.Name.Local {
					case "d":
						p.d = a.Value
					case "style":
						for _, kv := range strings.Split(a.Value, ";") {
							if k, v, ok := strings.Cut(kv, ":"); ok {
								p.style[k] = v
							}
						}
					}
				}
				doc.paths = append(doc.paths, p)
			case "text":
				inText = &svgText{}
				for _, a := range el.Attr {
					switch a.Name.Local {
					case "x":
						inText.x, _ = strconv.ParseFloat(a.Value, 64)
					case "y":
						inText.y, _ = strconv.ParseFloat(a.Value, 64)
					}
				}
			}
		case xml.CharData:
			if inText != nil {
				inText.s += string(el)
			}
		case xml.EndElement:
			if el.Name.Local == "text" && inText != nil {
				doc.texts = append(doc.texts, *inText)
				inText = nil
			}
		}
	}
	if root != "svg" {
		t.Fatalf("the root element is <%s>, not <svg>", root)
	}
	return doc
}

// count is how many texts read exactly s.
func (d svgDoc) count(s string) int {
	n := 0
	for _, tx := range d.texts {
		if tx.s == s {
			n++
		}
	}
	return n
}

// text is the first text reading exactly s.
func (d svgDoc) text(t *testing.T, s string) svgText {
	t.Helper()
	for _, tx := range d.texts {
		if tx.s == s {
			return tx
		}
	}
	t.Fatalf("no text %q in the chart; texts: %v", s, d.strings())
	return svgText{}
}

// last is the last text reading exactly s (the legend comes first, the
// data after it).
func (d svgDoc) last(t *testing.T, s string) svgText {
	t.Helper()
	for i := len(d.texts) - 1; i >= 0; i-- {
		if d.texts[i].s == s {
			return d.texts[i]
		}
	}
	t.Fatalf("no text %q in the chart; texts: %v", s, d.strings())
	return svgText{}
}

func (d svgDoc) strings() []string {
	var out []string
	for _, tx := range d.texts {
		out = append(out, tx.s)
	}
	return out
}

// filled are the paths filled with the colour c (as the SVG writes it,
// "#RRGGBB").
func (d svgDoc) filled(c string) []svgPath {
	var out []svgPath
	for _, p := range d.paths {
		if p.style["fill"] == c {
			out = append(out, p)
		}
	}
	return out
}

var numberRE = regexp.MustCompile(`-?[0-9.]+(?:e[-+]?[0-9]+)?`)

// bounds is the bounding box of a path's points (arcs' radii ignored).
func (p svgPath) bounds() (x0, y0, x1, y1 float64) {
	x0, y0, x1, y1 = math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, cmd := range regexp.MustCompile(`[MLC][^MLCAZ]*`).FindAllString(p.d, -1) {
		nums := numberRE.FindAllString(cmd[1:], -1)
		for i := 0; i+1 < len(nums); i += 2 {
			x, _ := strconv.ParseFloat(nums[i], 64)
			y, _ := strconv.ParseFloat(nums[i+1], 64)
			x0, y0, x1, y1 = min(x0, x), min(y0, y), max(x1, x), max(y1, y)
		}
	}
	return
}

// points is the number of M and L commands of a path.
func (p svgPath) points() int {
	return strings.Count(p.d, "M") + strings.Count(p.d, "L")
}

// strokeKey identifies a stroked path's pen: colour, width and dashes.
func (p svgPath) strokeKey() string {
	return fmt.Sprintf("%s|%s|%s", p.style["stroke"], p.style["stroke-width"], p.style["stroke-dasharray"])
}

// colour writes a colour as the SVG writer does.
func colour(c interface{ RGBA() (r, g, b, a uint32) }) string {
	r, g, b, _ := c.RGBA()
	return fmt.Sprintf("#%02X%02X%02X", r>>8, g>>8, b>>8)
}

// drawn draws a chart into memory.
func drawn(t *testing.T, f func(io.Writer, Options) error, opt Options) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := f(&buf, opt); err != nil {
		t.Fatalf("drawing failed: %v", err)
	}
	return buf.Bytes()
}

// checkCommon checks what every chart must do: byte-identical SVG and PNG
// across two runs, SVG that parses, and a PNG of the size asked for.
func checkCommon(t *testing.T, f func(io.Writer, Options) error) svgDoc {
	t.Helper()
	a, b := drawn(t, f, Options{}), drawn(t, f, Options{})
	if !bytes.Equal(a, b) {
		t.Errorf("two SVG runs differ")
	}
	doc := parseSVG(t, a)
	opt := Options{Format: PNG, Width: 400, Height: 300, DPI: 90}
	p1, p2 := drawn(t, f, opt), drawn(t, f, opt)
	if !bytes.Equal(p1, p2) {
		t.Errorf("two PNG runs differ")
	}
	img, err := png.Decode(bytes.NewReader(p1))
	if err != nil {
		t.Fatalf("the PNG does not decode: %v", err)
	}
	// 400 × 300 points at 90 pixels an inch: 500 × 375 pixels.
	if got := img.Bounds().Size(); got.X != 500 || got.Y != 375 {
		t.Errorf("the PNG is %d × %d pixels, want 500 × 375", got.X, got.Y)
	}
	return doc
}

// sortedBy returns the labels in the order of their texts' y (top first).
func sortedBy(t *testing.T, doc svgDoc, labels []string) []string {
	t.Helper()
	out := slices.Clone(labels)
	slices.SortFunc(out, func(a, b string) int {
		ya, yb := doc.text(t, a).y, doc.text(t, b).y
		switch {
		case ya < yb:
			return -1
		case ya > yb:
			return 1
		}
		return 0
	})
	return out
}
