package exact

import (
	"math/big"
	"math/rand"
	"strconv"
	"testing"

	"github.com/shopspring/decimal"
)

// TestFloat64 checks Float64 against strconv.ParseFloat of the number's
// decimal text (the Go standard library's correctly rounded reading), for
// coefficients and powers of ten on both sides of what float64 holds
// exactly.
func TestFloat64(t *testing.T) {
	var p Pool
	coefs := []int64{1, -1, 3, 155, -7_777, 123_456_789, 1<<53 - 1, -(1<<53 - 1), 1 << 53, 9_007_199_254_740_993, 999_999_999_999_999_999}
	for _, c := range coefs {
		for e := int32(-30); e <= 30; e++ {
			n := Small(c, e)
			d := decimal.New(c, e)
			want, err := strconv.ParseFloat(d.String(), 64)
			if err != nil {
				t.Fatal(err)
			}
			if got := p.Float64(n); got != want {
				t.Errorf("%s: %v, want %v", d, got, want)
			}
		}
	}
}

// tenDivides is checked against math/big's remainder on random
// coefficients of one to five words, both signs, multiples of ten among
// them.
func TestTenDividesMatchesRem(t *testing.T) {
	rng := rand.New(rand.NewSource(7))
	ten := big.NewInt(10)
	for i := 0; i < 20000; i++ {
		c := new(big.Int).Rand(rng, new(big.Int).Lsh(big.NewInt(1), uint(1+rng.Intn(320))))
		if i%3 == 0 {
			c.Mul(c, ten)
		}
		if i%2 == 1 {
			c.Neg(c)
		}
		want := new(big.Int).Rem(c, ten).Sign() == 0
		if got := tenDivides(c); got != want {
			t.Fatalf("tenDivides(%s) = %v, want %v", c, got, want)
		}
	}
}
