package chart

import (
	"math"
	"strconv"

	"github.com/forkcast/forkcast/render"
	"gonum.org/v1/plot"
)

// Axis names what an axis of a chart measures.
type Axis struct {
	// Label is the axis title in plain words, with its unit where it has
	// one: "Expected value (EUR)", "Probability of oil".
	Label string
	// Percent writes the axis numbers as percentages: the value 0.25 is
	// shown as "25%". Otherwise numbers are written with thousands
	// separators: "1,250,000".
	Percent bool
}

// numberTicks places about target ticks at round steps (1, 2, 2.5 or 5
// times a power of ten) and writes them with thousands separators, or as
// percentages.
type numberTicks struct {
	percent bool
	target  int
}

func (t numberTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil
	}
	step := tickStep(lo, hi, t.target)
	first := math.Ceil(lo/step - 1e-9)
	last := math.Floor(hi/step + 1e-9)
	if !(last-first <= 1000) || math.Abs(first) > 1e15 || math.Abs(last) > 1e15 {
		// A span too narrow for its size: its ticks could not be told
		// apart (and counting them in float64 would not advance).
		return nil
	}
	scale := 1.0
	if t.percent {
		scale = 100
	}
	decimals := decimalsFor(step * scale)
	var ticks []plot.Tick
	for i := 0; i <= int(last-first); i++ {
		v := (first + float64(i)) * step
		if math.Abs(v) < step*1e-9 {
			v = 0
		}
		label := formatNumber(v*scale, decimals)
		if t.percent {
			label += "%"
		}
		ticks = append(ticks, plot.Tick{Value: v, Label: label})
	}
	return ticks
}

// tickStep is the round step (1, 2, 2.5 or 5 times a power of ten) whose
// number of ticks in [lo, hi] is nearest target; on a tie, the larger.
func tickStep(lo, hi float64, target int) float64 {
	raw := (hi - lo) / float64(max(target-1, 1))
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	best, bestMiss := 0.0, math.Inf(1)
	for _, e := range []float64{0.1, 1, 10} {
		for _, m := range []float64{1, 2, 2.5, 5} {
			step := m * mag * e
			count := math.Floor(hi/step+1e-9) - math.Ceil(lo/step-1e-9) + 1
			miss := math.Abs(count - float64(target))
			if miss < bestMiss || (miss == bestMiss && step > best) {
				best, bestMiss = step, miss
			}
		}
	}
	return best
}

// decimalsFor is the number of decimals that writes every multiple of step
// exactly (at most 9).
func decimalsFor(step float64) int {
	for d := 0; d < 9; d++ {
		s := step * math.Pow(10, float64(d))
		if math.Abs(s-math.Round(s)) < 1e-6*math.Max(1, math.Abs(s)) {
			return d
		}
	}
	return 9
}

// formatNumber writes v with the given decimals and thousands separators:
// 1234567.5 → "1,234,567.5". Zero is never written with a minus sign.
func formatNumber(v float64, decimals int) string {
	return render.Grouped(strconv.FormatFloat(v, 'f', decimals, 64))
}

// formatValue writes a value shown beside a mark or a bar: with up to
// significant digits that keep it readable, thousands separators, and as
// a percentage when percent is set.
func formatValue(v float64, percent bool) string {
	if percent {
		return formatNumber(v*100, shortDecimals(v*100)) + "%"
	}
	return formatNumber(v, shortDecimals(v))
}

// shortDecimals keeps four significant digits below 1,000 and none above,
// trailing zeros dropped.
func shortDecimals(v float64) int {
	a := math.Abs(v)
	if a >= 1000 || a == 0 {
		return 0
	}
	d := 3 - int(math.Floor(math.Log10(a)))
	d = min(max(d, 0), 9)
	for d > 0 {
		s := v * math.Pow(10, float64(d-1))
		if math.Abs(s-math.Round(s)) > 1e-9*math.Max(1, math.Abs(s)) {
			break
		}
		d--
	}
	return d
}
