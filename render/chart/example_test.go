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

// FormatOf reads the format from the file name a user gives, and names
// the formats there are when it is neither.
func ExampleFormatOf() {
	for _, name := range []string{"tornado.svg", "map.PNG", "profile.pdf"} {
		f, err := chart.FormatOf(name)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Println(name, "→", f)
	}
	// Output:
	// tornado.svg → svg
	// map.PNG → png
	// "profile.pdf" ends in .pdf: charts are written as .svg or .png
}

// A sweep of one input: each option's value over the grid, the switch
// points from the analysis labelled.
func ExampleWriteSweep() {
	s := chart.Sweep{
		Input: chart.Axis{Label: "Prior probability of oil", Percent: true},
		Value: chart.Axis{Label: "Expected value (thousands)"},
		X:     []float64{0.15, 0.25, 0.35},
		Options: []chart.Curve{
			{Label: "Drill", Values: []float64{20, 100, 180}},
			{Label: "Sell", Values: []float64{90, 90, 90}},
		},
		Switches: []chart.Mark{{At: 0.2375, Label: "23.75%: Sell → Drill"}},
	}
	var buf bytes.Buffer
	fmt.Println(chart.WriteSweep(&buf, s, chart.Options{}))
	// Output:
	// <nil>
}

// A two-way strategy map: the best option in each cell of a grid over two
// inputs, with the exact boundary between the regions.
func ExampleWriteStrategyMap() {
	m := chart.StrategyMap{
		X:       chart.Axis{Label: "Prior probability of oil", Percent: true},
		Y:       chart.Axis{Label: "Offer for the land (thousands)"},
		XValues: []float64{0.1, 0.2, 0.3, 0.4},
		YValues: []float64{60, 90, 120},
		Options: []string{"Drill", "Sell"},
		// Drill is worth 800·p − 100; selling is worth the offer.
		Best: [][]int{
			{1, 1, 0, 0}, // offer 60: drill from p = 0.2 (60 = 60, a tie shown as sell)
			{1, 1, 0, 0}, // offer 90: drill above p = 0.2375
			{1, 1, 0, 0}, // offer 120: drill above p = 0.275
		},
		Boundaries: []chart.Segment{{From: chart.Point{X: 0.2, Y: 60}, To: chart.Point{X: 0.275, Y: 120}}},
	}
	var buf bytes.Buffer
	fmt.Println(chart.WriteStrategyMap(&buf, m, chart.Options{Format: chart.PNG}))
	// Output:
	// <nil>
}

// Risk profiles of two options, cumulative and as probability mass in
// panels, with a line at the loss threshold.
func ExampleWriteProfiles() {
	p := chart.Profiles{
		Value: chart.Axis{Label: "Payoff (thousands)"},
		Options: []chart.Distribution{
			{Label: "Drill", Outcomes: []chart.Outcome{{Value: 700, Probability: 0.25}, {Value: -100, Probability: 0.75}}},
			{Label: "Sell", Outcomes: []chart.Outcome{{Value: 90, Probability: 1}}},
		},
		References: []chart.Mark{{At: 0, Label: "Loss below 0"}},
	}
	var cum, mass bytes.Buffer
	err1 := chart.WriteProfiles(&cum, p, chart.Options{})
	p.Panels = true
	err2 := chart.WriteMass(&mass, p, chart.Options{})
	fmt.Println(err1, err2)
	// Output:
	// <nil> <nil>
}

// The histogram and cumulative chart of simulated totals, with the P80
// and a budget marked.
func ExampleWriteHistogram() {
	s := chart.Simulated{
		Value:   chart.Axis{Label: "Total cost impact (EUR)"},
		Markers: []chart.Mark{{At: 150_000, Label: "Budget"}},
		Series: []chart.SampleSet{{
			Label:   "Register total",
			Samples: []float64{0, 12_000, 40_000, 55_000, 61_000, 90_000, 118_000, 160_000},
			Markers: []chart.Mark{{At: 118_000, Label: "P80"}},
		}},
	}
	var hist, cum bytes.Buffer
	fmt.Println(chart.WriteHistogram(&hist, s, chart.Options{}), chart.WriteCumulative(&cum, s, chart.Options{}))
	// Output:
	// <nil> <nil>
}
