package chart_test

import (
	"bufio"
	"bytes"
	"fmt"

	"github.com/forkcast/forkcast/render/chart"
)

// A tornado diagram of two inputs of an invented sourcing decision,
// written as SVG; FormatOf picks the format from the file name a user
// gives.
func ExampleWriteTornado() {
	format, err := chart.FormatOf("sensitivity.svg")
	if err != nil {
		fmt.Println(err)
		return
	}
	t := chart.Tornado{
		Title: "What the decision hangs on",
		Value: chart.Axis{Label: "Expected value (EUR)"},
		Base:  402_500,
		Bars: []chart.Bar{
			{Label: "Chance of a slip", Start: 438_000, End: 383_000, StartLabel: "15%", EndLabel: "45%",
				Marks: []chart.Mark{{At: 396_000, Label: "Buy ↔ Build"}}},
			{Label: "Licence fee", Start: 446_000, End: 352_000, StartLabel: "200,000", EndLabel: "300,000"},
		},
	}
	var buf bytes.Buffer
	if err := chart.WriteTornado(&buf, t, chart.Options{Format: format}); err != nil {
		fmt.Println(err)
		return
	}
	first, _ := bufio.NewReader(&buf).ReadString('\n')
	fmt.Print(first)
	// Output:
	// <?xml version="1.0"?>
}

// A spider diagram with the change of each input measured in percent of
// its range, written as PNG.
func ExampleWriteSpider() {
	s := chart.Spider{
		Value:  chart.Axis{Label: "Expected value (EUR)"},
		Base:   402_500,
		Change: chart.PercentOfRange,
		Lines: []chart.SpiderLine{
			{Label: "Licence fee", Base: 240_000, Low: 200_000, High: 300_000,
				Points: []chart.Point{{X: 200_000, Y: 446_000}, {X: 240_000, Y: 402_500}, {X: 300_000, Y: 352_000}}},
			{Label: "Chance of a slip", Base: 0.30, Low: 0.15, High: 0.45,
				Points:   []chart.Point{{X: 0.15, Y: 438_000}, {X: 0.30, Y: 402_500}, {X: 0.45, Y: 383_000}},
				Switches: []float64{0.33}},
		},
	}
	var buf bytes.Buffer
	err := chart.WriteSpider(&buf, s, chart.Options{Format: chart.PNG, Width: 360, Height: 240, DPI: 72})
	fmt.Println(err, bytes.HasPrefix(buf.Bytes(), []byte("\x89PNG")))
	// Output:
	// <nil> true
}
