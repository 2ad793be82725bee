package report_test

import (
	"bytes"
	"context"
	"encoding/json"
	"encoding/xml"
	"image/png"
	"io"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/render/chart"
	"github.com/forkcast/forkcast/report"
)

// depot is an invented decision with five ranged inputs of different
// weight, one of them a probability.
const depot = `title "Depot roof"
currency EUR

let repair   = 120_000  in 100_000 .. 150_000
let replace  = 260_000  in 200_000 .. 340_000
let p_storm  = 30%      in 10% .. 50%
let damage   = 400_000  in 300_000 .. 420_000
let grant    = 20_000   in 0 .. 30_000

decision "Roof"
  "Repair"  cost repair
    chance "Storm"
      "Storm"  p_storm  cost damage
      "Calm"   rest
  "Replace"  cost replace - grant
  "Wait"
    chance "Storm2"
      "Storm"  p_storm  cost damage * 1.5
      "Calm"   rest
`

func depotReport(t *testing.T, points int) *report.SensitivityReport {
	t.Helper()
	c, ds := lang.Load([]byte(depot), lang.Options{})
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	s, err := eval.AnalyseSensitivity(context.Background(), c, eval.SensitivityOptions{Points: points})
	if err != nil {
		t.Fatal(err)
	}
	return report.Sensitivity(c, s, report.SensitivityOptions{})
}

// svgText is a text of an SVG with its height on the page (larger is
// higher up).
type svgText struct {
	s    string
	x, y float64
}

// svgPath is a path's points (in the page's units, y up) and its style.
type svgPath struct {
	xs, ys []float64
	style  string
}

var number = regexp.MustCompile(`-?[0-9.]+`)

// parseSVG reads an SVG with encoding/xml, failing on anything that is not
// well-formed XML, and returns its texts and paths.
func parseSVG(t *testing.T, data []byte) (texts []svgText, paths []svgPath) {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(data))
	var cur *svgText
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			return texts, paths
		}
		if err != nil {
			t.Fatalf("the SVG is not well-formed XML: %v", err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			switch el.Name.Local {
			case "text":
				cur = &svgText{}
				for _, a := range el.Attr {
					switch a.Name.Local {
					case "x":
						cur.x, _ = strconv.ParseFloat(a.Value, 64)
					case "y":
						y, _ := strconv.ParseFloat(a.Value, 64)
						cur.y = -y // texts are written flipped
					}
				}
			case "path":
				var p svgPath
				for _, a := range el.Attr {
					switch a.Name.Local {
					case "d":
						ns := number.FindAllString(a.Value, -1)
						for i := 0; i+1 < len(ns); i += 2 {
							x, _ := strconv.ParseFloat(ns[i], 64)
							y, _ := strconv.ParseFloat(ns[i+1], 64)
							p.xs, p.ys = append(p.xs, x), append(p.ys, y)
						}
					case "style":
						p.style = a.Value
					}
				}
				paths = append(paths, p)
			}
		case xml.CharData:
			if cur != nil {
				cur.s += string(el)
			}
		case xml.EndElement:
			if el.Name.Local == "text" && cur != nil {
				texts = append(texts, *cur)
				cur = nil
			}
		}
	}
}

// write draws a chart twice, from two separate analyses, and fails unless
// the bytes are the same.
func write(t *testing.T, draw func(r *report.SensitivityReport, w io.Writer) error, points int) []byte {
	t.Helper()
	var a, b bytes.Buffer
	if err := draw(depotReport(t, points), &a); err != nil {
		t.Fatal(err)
	}
	if err := draw(depotReport(t, points), &b); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Fatal("two runs drew different bytes")
	}
	return a.Bytes()
}

func swingOrder(r *report.SensitivityReport) []string {
	var out []string
	for _, in := range r.Result.Inputs {
		out = append(out, in.Vary.String())
	}
	return out
}

func TestTornadoChart(t *testing.T) {
	r := depotReport(t, 0)
	order := swingOrder(r)
	// By hand: Repair is worth −repair − p·damage = −240,000, Replace
	// −(replace − grant) = −240,000, Wait −1.5·p·damage = −180,000: Wait
	// is best. p_storm 10% .. 50%: Wait −60,000 .. −300,000, Repair
	// −160,000 .. −320,000, Replace −240,000: best −60,000 .. −240,000,
	// swing 180,000. damage 300,000 .. 420,000: Wait −135,000 ..
	// −189,000, swing 54,000. repair, replace, grant: nothing beats Wait
	// (Repair −220,000 at best; Replace −180,000 at best, at replace =
	// 200,000, a tie): swing 0.
	if order[0] != "p_storm" || order[1] != "damage" {
		t.Fatalf("swing order %v", order)
	}
	svg := write(t, func(r *report.SensitivityReport, w io.Writer) error {
		return chart.WriteTornado(w, r.Tornado(), chart.Options{})
	}, 0)
	texts, paths := parseSVG(t, svg)
	// Each input named once; top to bottom in swing order.
	var ys []float64
	for _, name := range order {
		n, y := 0, 0.0
		for _, tx := range texts {
			if tx.s == name {
				n, y = n+1, tx.y
			}
		}
		if n != 1 {
			t.Fatalf("input %q written %d times", name, n)
		}
		ys = append(ys, y)
	}
	for i := 1; i < len(ys); i++ {
		if ys[i] >= ys[i-1] {
			t.Errorf("%s is not below %s", order[i], order[i-1])
		}
	}
	// One row of bar pieces (the two bar tones, left of the legend) per
	// input, at the heights of the names.
	legend := 0.0 // where the legend's names start; its swatches are just left of them
	for _, tx := range texts {
		if tx.s == "Input at its low value" {
			legend = tx.x
		}
	}
	rows := map[float64]bool{}
	for _, p := range paths {
		if !strings.Contains(p.style, "fill:#B4B4B4") && !strings.Contains(p.style, "fill:#505050") || len(p.ys) < 4 {
			continue
		}
		lo, hi := slices.Min(p.ys), slices.Max(p.ys)
		if slices.Min(p.xs) > legend-40 {
			continue // a legend swatch
		}
		rows[math.Round((lo+hi)/2)] = true
	}
	if len(rows) != len(order) {
		t.Errorf("%d rows of bars, want %d (one per input)", len(rows), len(order))
	}
	// PNG too, and it decodes.
	pngData := write(t, func(r *report.SensitivityReport, w io.Writer) error {
		return chart.WriteTornado(w, r.Tornado(), chart.Options{Format: chart.PNG, DPI: 72})
	}, 0)
	if _, err := png.Decode(bytes.NewReader(pngData)); err != nil {
		t.Errorf("the PNG does not decode: %v", err)
	}
}

func TestSpiderChart(t *testing.T) {
	r := depotReport(t, 10)
	order := swingOrder(r)
	sp := r.Spider()
	var lines []string
	for _, l := range sp.Lines {
		lines = append(lines, l.Label)
	}
	if !slices.Equal(lines, order) {
		t.Fatalf("spider lines %v, want the swing order %v", lines, order)
	}
	svg := write(t, func(r *report.SensitivityReport, w io.Writer) error {
		return chart.WriteSpider(w, r.Spider(), chart.Options{})
	}, 10)
	texts, paths := parseSVG(t, svg)
	// The legend lists the lines top to bottom in swing order.
	var ys []float64
	for _, name := range order {
		for _, tx := range texts {
			if tx.s == name {
				ys = append(ys, tx.y)
			}
		}
	}
	if len(ys) != len(order) {
		t.Fatalf("%d of %d inputs named in the legend", len(ys), len(order))
	}
	for i := 1; i < len(ys); i++ {
		if ys[i] >= ys[i-1] {
			t.Errorf("legend: %s is not below %s", order[i], order[i-1])
		}
	}
	// One drawn line per input: the unfilled paths through the 11 or
	// more points of a curve (grid lines and legend samples have two).
	n := 0
	for _, p := range paths {
		if strings.Contains(p.style, "fill:none") && len(p.xs) >= 11 {
			n++
		}
	}
	if n != len(order) {
		t.Errorf("%d lines drawn, want %d", n, len(order))
	}
}

func TestSensitivityJSONShape(t *testing.T) {
	r := depotReport(t, 0)
	var buf bytes.Buffer
	if err := r.WriteJSON(&buf); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Base   string
		Inputs []map[string]any
	}
	dec := json.NewDecoder(&buf)
	dec.UseNumber()
	if err := dec.Decode(&doc); err != nil {
		t.Fatal(err)
	}
	if doc.Base != "-180000" {
		t.Errorf("base %q, want -180000 (Wait: 1.5 × 30%% × 400,000)", doc.Base)
	}
	for _, in := range doc.Inputs {
		for _, k := range []string{"name", "low", "base", "high", "value_low", "value_high", "swing", "switches"} {
			if _, ok := in[k]; !ok {
				t.Errorf("input %v lacks %q", in["name"], k)
			}
		}
		for _, k := range []string{"low", "base", "high", "value_low", "value_high", "swing"} {
			if _, ok := in[k].(string); !ok {
				t.Errorf("input %v: %s is %T, want an exact decimal string", in["name"], k, in[k])
			}
		}
	}
	if doc.Inputs[0]["name"] != "p_storm" || doc.Inputs[0]["swing"] != "180000" {
		t.Errorf("first input %v swing %v", doc.Inputs[0]["name"], doc.Inputs[0]["swing"])
	}
}
