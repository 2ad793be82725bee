package chart

import (
	"math"
	"math/rand/v2"
	"slices"
)

// Invented scenarios the tests and examples draw: sourcing a fare-gate
// controller for a set of depots (demo data only).

func demoTornado() Tornado {
	return Tornado{
		Title: "What the sourcing decision hangs on",
		Value: Axis{Label: "Expected value (EUR)"},
		Base:  402_500,
		Bars: []Bar{
			{Label: "Licence fee", Start: 446_000, End: 352_000, StartLabel: "200,000", EndLabel: "300,000"},
			{Label: "Chance of a slip", Start: 438_000, End: 383_000, StartLabel: "15%", EndLabel: "45%",
				Marks: []Mark{{At: 396_000, Label: "Buy ↔ Build"}}},
			{Label: "Lease rate per depot", Start: 402_500, End: 470_000, StartLabel: "55,000", EndLabel: "70,000",
				Marks: []Mark{{At: 431_000, Label: "Buy → Lease"}}},
			{Label: "Development cost", Start: 430_000, End: 371_000, StartLabel: "340,000", EndLabel: "460,000"},
			{Label: "Rework payoff", Start: 395_000, End: 409_000, StartLabel: "700,000", EndLabel: "860,000"},
		},
	}
}

func demoSpider() Spider {
	return Spider{
		Title:  "Expected value as each estimate moves",
		Value:  Axis{Label: "Expected value (EUR)"},
		Base:   402_500,
		Change: PercentOfBase,
		Lines: []SpiderLine{
			{Label: "Licence fee", Base: 240_000, Low: 200_000, High: 300_000,
				Points: []Point{{200_000, 446_000}, {220_000, 424_000}, {240_000, 402_500}, {270_000, 377_000}, {300_000, 352_000}}},
			{Label: "Chance of a slip", Base: 0.30, Low: 0.15, High: 0.45,
				Points:   []Point{{0.15, 438_000}, {0.225, 420_000}, {0.30, 402_500}, {0.375, 392_000}, {0.45, 383_000}},
				Switches: []float64{0.33}},
			{Label: "Lease rate per depot", Base: 61_000, Low: 55_000, High: 70_000,
				Points:   []Point{{55_000, 402_500}, {58_000, 402_500}, {61_000, 402_500}, {65_500, 431_000}, {70_000, 470_000}},
				Switches: []float64{63_000}},
			{Label: "Development cost", Base: 380_000, Low: 340_000, High: 460_000,
				Points: []Point{{340_000, 430_000}, {360_000, 416_000}, {380_000, 402_500}, {420_000, 387_000}, {460_000, 371_000}}},
		},
	}
}

// demoSweep: three options against the chance of a slip, linear in it:
// build 520,000 − 600,000·p, buy 360,000 (flat), lease 250,000 + 300,000·p
// (invented). Build and buy meet at p = 160,000 / 600,000 = 0.2667; buy
// and lease at p = 110,000 / 300,000 = 0.3667.
func demoSweep() Sweep {
	s := Sweep{
		Title: "Each option's value as the chance of a slip changes",
		Input: Axis{Label: "Chance of a slip", Percent: true},
		Value: Axis{Label: "Expected value (EUR)"},
		Switches: []Mark{
			{At: 160_000.0 / 600_000, Label: "26.7%: Build → Buy"},
			{At: 110_000.0 / 300_000, Label: "36.7%: Buy → Lease"},
		},
	}
	build, buy, lease := Curve{Label: "Build in house"}, Curve{Label: "Buy a licence"}, Curve{Label: "Lease per depot"}
	for k := 0; k <= 10; k++ {
		p := 0.15 + 0.03*float64(k)
		s.X = append(s.X, p)
		build.Values = append(build.Values, 520_000-600_000*p)
		buy.Values = append(buy.Values, 360_000)
		lease.Values = append(lease.Values, 250_000+300_000*p)
	}
	s.Options = []Curve{build, buy, lease}
	return s
}

// demoMap: the best option over the chance of a slip p and the licence
// fee L, with build 520,000 − 600,000·p, buy 600,000 − L and lease
// 250,000 + 300,000·p (invented). Build = buy on L = 80,000 + 600,000·p,
// buy = lease on L = 350,000 − 300,000·p, build = lease on p = 0.3; all
// three meet at (0.3, 260,000).
func demoMap(nx, ny int) StrategyMap {
	m := StrategyMap{
		Title:   "Best option by chance of a slip and licence fee",
		X:       Axis{Label: "Chance of a slip", Percent: true},
		Y:       Axis{Label: "Licence fee (EUR)"},
		Options: []string{"Build in house", "Buy a licence", "Lease per depot"},
		Boundaries: []Segment{
			{Point{0.2, 200_000}, Point{0.3, 260_000}},
			{Point{0.3, 260_000}, Point{0.45, 215_000}},
			{Point{0.3, 260_000}, Point{0.3, 300_000}},
		},
	}
	for i := 0; i < nx; i++ {
		m.XValues = append(m.XValues, 0.15+0.30*float64(i)/float64(nx-1))
	}
	for j := 0; j < ny; j++ {
		m.YValues = append(m.YValues, 200_000+100_000*float64(j)/float64(ny-1))
	}
	for _, l := range m.YValues {
		var row []int
		for _, p := range m.XValues {
			v := []float64{520_000 - 600_000*p, 600_000 - l, 250_000 + 300_000*p}
			best := 0
			for k := range v {
				if v[k] > v[best] {
					best = k
				}
			}
			row = append(row, best)
		}
		m.Best = append(m.Best, row)
	}
	return m
}

// demoProfiles: the payoffs of the three sourcing routes (invented): build
// pays 1,150,000 − 380,000 = 770,000 on time (55%), 900,000 − 380,000 =
// 520,000 if it slips (30%), −380,000 if abandoned (15%); buy pays
// 1,000,000 − 240,000 = 760,000 (80%) or 780,000 − 240,000 = 540,000
// (20%); lease pays 12 × 61,000 = 732,000 for sure.
func demoProfiles() Profiles {
	return Profiles{
		Title: "Risk profiles of the sourcing routes",
		Value: Axis{Label: "Payoff (EUR)"},
		Options: []Distribution{
			{Label: "Build in house", Outcomes: []Outcome{{770_000, 0.55}, {520_000, 0.30}, {-380_000, 0.15}}},
			{Label: "Buy a licence", Outcomes: []Outcome{{760_000, 0.8}, {540_000, 0.2}}},
			{Label: "Lease per depot", Outcomes: []Outcome{{732_000, 1}}},
		},
		References: []Mark{{At: 0, Label: "Loss below 0"}},
	}
}

// demoSimulated: the total cost impact of an invented register of eight
// risks, before and after responses, drawn with a fixed seed; a risk
// occurs with its probability and then costs a triangular amount.
func demoSimulated(runs int) Simulated {
	type risk struct{ p, lo, mode, hi float64 }
	before := []risk{{0.3, 20e3, 40e3, 90e3}, {0.5, 5e3, 10e3, 30e3}, {0.15, 60e3, 80e3, 200e3}, {0.4, 10e3, 15e3, 25e3},
		{0.2, 30e3, 50e3, 70e3}, {0.6, 2e3, 5e3, 12e3}, {0.1, 100e3, 150e3, 300e3}, {0.35, 8e3, 12e3, 40e3}}
	after := slices.Clone(before)
	after[2].p, after[6].p = 0.05, 0.04
	rng := rand.New(rand.NewPCG(1, 2))
	tri := func(r risk) float64 {
		u := rng.Float64()
		f := (r.mode - r.lo) / (r.hi - r.lo)
		if u < f {
			return r.lo + math.Sqrt(u*(r.hi-r.lo)*(r.mode-r.lo))
		}
		return r.hi - math.Sqrt((1-u)*(r.hi-r.lo)*(r.hi-r.mode))
	}
	draw := func(rs []risk) []float64 {
		out := make([]float64, runs)
		for k := range out {
			for _, r := range rs {
				if rng.Float64() < r.p {
					out[k] += tri(r)
				}
			}
		}
		return out
	}
	return Simulated{
		Title:   "Total cost of the register's risks",
		Value:   Axis{Label: "Total cost impact (EUR)"},
		Markers: []Mark{{At: 150_000, Label: "Budget 150,000"}},
		Series: []SampleSet{
			{Label: "Before responses", Samples: draw(before), Markers: []Mark{{At: 75_300, Label: "Mean 75,300"}, {At: 118_000, Label: "P80 118,000"}}},
			{Label: "After responses", Samples: draw(after), Markers: []Mark{{At: 52_100, Label: "Mean 52,100"}, {At: 82_000, Label: "P80 82,000"}}},
		},
	}
}
