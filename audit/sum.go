package audit

import (
	"math"
	"math/big"
	"math/bits"
)

// sumScale is the fixed point of Sum: values are held as integers of
// 2⁻⁵² (about 2.2e-16), so that |x| < 2¹¹ fits one int64 term.
const sumScale = 52

// Sum adds float64 values exactly and in any order: each value is rounded
// once to a multiple of 2⁻⁵² and the multiples are added as 128-bit
// integers, so that the total does not depend on the order of the values
// or on how they were split among partial sums (SPEC §9). The total differs
// from the exact sum of the values by at most n × 2⁻⁵³ for n values.
type Sum struct {
	Hi int64
	Lo uint64
}

// MaxSumTerm bounds the values Sum takes; log losses are clipped well
// below it.
const MaxSumTerm = 1 << 10

// Add adds x, |x| ≤ MaxSumTerm.
func (s *Sum) Add(x float64) {
	v := int64(math.RoundToEven(math.Ldexp(x, sumScale)))
	lo, carry := bits.Add64(s.Lo, uint64(v), 0)
	s.Hi += int64(carry)
	if v < 0 {
		s.Hi-- // the sign extension of v
	}
	s.Lo = lo
}

// Merge adds another sum.
func (s *Sum) Merge(o Sum) {
	lo, carry := bits.Add64(s.Lo, o.Lo, 0)
	s.Hi += o.Hi + int64(carry)
	s.Lo = lo
}

// Float64 returns the sum rounded to the nearest float64.
func (s Sum) Float64() float64 {
	if (s.Hi == 0 && s.Lo < 1<<63) || (s.Hi == -1 && s.Lo >= 1<<63) {
		return math.Ldexp(float64(int64(s.Lo)), -sumScale) // exact int64, one rounding
	}
	v := new(big.Int).SetInt64(s.Hi)
	v.Lsh(v, 64).Add(v, new(big.Int).SetUint64(s.Lo))
	f, _ := new(big.Float).SetInt(v).Float64()
	return math.Ldexp(f, -sumScale)
}
