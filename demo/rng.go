package demo

// rng is SplitMix64 (Steele, Lea and Flood, "Fast splittable pseudorandom number generators",
// OOPSLA 2014), written out here rather than taken from math/rand so that a seed makes the same town
// under every Go release: the algorithm is these few lines and nothing else.
type rng struct{ state uint64 }

// newRNG returns the generator of one stream of the town: the seed mixed with a label, so that each
// part of the town (the grid, the businesses, each drive) draws from its own stream and changing how
// many numbers one part draws leaves the others as they were.
func newRNG(seed uint64, label string) *rng {
	// FNV-1a of the label, then one SplitMix64 step to spread it.
	h := uint64(14695981039346656037)
	for i := 0; i < len(label); i++ {
		h ^= uint64(label[i])
		h *= 1099511628211
	}
	r := &rng{state: seed ^ h}
	r.next()
	return r
}

// next returns the next 64 random bits.
func (r *rng) next() uint64 {
	r.state += 0x9e3779b97f4a7c15
	z := r.state
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// float returns a number in [0, 1) with 53 random bits.
func (r *rng) float() float64 { return float64(r.next()>>11) / (1 << 53) }

// between returns a number in [lo, hi).
func (r *rng) between(lo, hi float64) float64 { return lo + (hi-lo)*r.float() }

// intn returns an integer in [0, n), n > 0, by Lemire's multiply-shift on the top 32 bits (bias below
// n/2^32, immaterial for the small n drawn here).
func (r *rng) intn(n int) int { return int((r.next() >> 32) * uint64(n) >> 32) }

// sign returns −1 or +1 with equal chance.
func (r *rng) sign() float64 {
	if r.next()>>63 == 0 {
		return -1
	}
	return 1
}

// shuffle permutes the n items that swap exchanges (Fisher–Yates).
func (r *rng) shuffle(n int, swap func(i, j int)) {
	for i := n - 1; i > 0; i-- {
		swap(i, r.intn(i+1))
	}
}

// pick returns one of the strings, uniformly.
func (r *rng) pick(xs []string) string { return xs[r.intn(len(xs))] }
