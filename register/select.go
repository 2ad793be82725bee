package register

import (
	"github.com/shopspring/decimal"
)

// rankOf is the rank of the percentile at level p among n values, as
// dist.Sample.Percentile defines it: the smallest value whose cumulative
// proportion reaches p is the k-th smallest, k = ⌈p·n⌉ (at least 1), with
// p read as the shortest decimal that prints as it.
func rankOf(p float64, n int) int {
	k := decimal.NewFromFloat(p).Mul(decimal.NewFromInt(int64(n))).Ceil().IntPart()
	return int(min(max(k, 1), int64(n)))
}

// kth returns the k-th smallest of a (k from 1), reordering a. It
// partitions three ways around a median of three, so that the many equal
// totals of a register (every run in which no risk occurs) cost no more
// than distinct ones: linear time on average.
func kth(a []float64, k int) float64 {
	lo, hi := 0, len(a)-1
	k--
	for lo < hi {
		mid := lo + (hi-lo)/2
		pivot := median3(a[lo], a[mid], a[hi])
		// a[lo:lt] < pivot, a[lt:i] == pivot, a[gt+1:hi+1] > pivot.
		lt, i, gt := lo, lo, hi
		for i <= gt {
			switch x := a[i]; {
			case x < pivot:
				a[lt], a[i] = a[i], a[lt]
				lt++
				i++
			case x > pivot:
				a[i], a[gt] = a[gt], a[i]
				gt--
			default:
				i++
			}
		}
		switch {
		case k < lt:
			hi = lt - 1
		case k > gt:
			lo = gt + 1
		default:
			return pivot
		}
	}
	return a[k]
}

func median3(x, y, z float64) float64 {
	if x > y {
		x, y = y, x
	}
	if y > z {
		y = z
	}
	if x > y {
		return x
	}
	return y
}

func floatOf(d decimal.Decimal) float64 {
	f, _ := d.Float64()
	return f
}
