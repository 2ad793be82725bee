package chart

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
