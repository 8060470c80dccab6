package wire

import (
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"

	"pgregory.net/rapid"
)

// samePlainNumbers holds the speeds' fast path to the general decoder: when
// it takes an array, the general decoder reads the same numbers from it.
func samePlainNumbers(t interface{ Fatalf(string, ...any) }, raw string) bool {
	fast, ok := plainNumbers([]byte(raw))
	if !ok {
		return false
	}
	gen, err := numbersArray([]byte(raw), "route.speed_mps")
	if err != nil {
		t.Fatalf("plainNumbers(%s) = %v; the general decoder refuses it: %v", raw, fast, err)
	}
	if !slices.Equal(fast, gen) {
		t.Fatalf("plainNumbers(%s) = %v, the general decoder's %v", raw, fast, gen)
	}
	return true
}

// The fast path takes compact arrays of finite numbers, in every notation
// JSON allows, and reads what the general decoder reads.
func TestPlainNumbersMatchGeneral(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		vs := rapid.SliceOf(rapid.Float64().Filter(func(f float64) bool { return !math.IsInf(f, 0) && !math.IsNaN(f) })).Draw(t, "speeds")
		parts := make([]string, len(vs))
		for i, v := range vs {
			parts[i] = strconv.FormatFloat(v, rapid.SampledFrom([]byte{'g', 'e', 'E', 'f'}).Draw(t, "format"), -1, 64)
		}
		raw := "[" + strings.Join(parts, ",") + "]"
		if !samePlainNumbers(t, raw) {
			t.Fatalf("refused %s", raw)
		}
	})
}

// What the fast path must leave to the general decoder, which words the
// error or compacts the spaces.
func TestPlainNumbersRefuses(t *testing.T) {
	for _, raw := range []string{"[1, 2]", "[1,]", "[,1]", "[01]", "[1e999]", "[null]", "[1,2", "[-]", "[+1]", "[.5]", "[1.]", `["1"]`, "[[1]]", "[1,,2]", "[ ]"} {
		if _, ok := plainNumbers([]byte(raw)); ok {
			t.Errorf("plainNumbers(%s) took it", raw)
		}
	}
	for raw, want := range map[string][]float64{"[]": {}, "[0]": {0}, "[-0.5,1e2,13.9]": {-0.5, 100, 13.9}} {
		if got, ok := plainNumbers([]byte(raw)); !ok || !slices.Equal(got, want) {
			t.Errorf("plainNumbers(%s) = %v, %v, want %v", raw, got, ok, want)
		}
	}
}

// FuzzPlainNumbers: whatever the bytes, the fast path declines or agrees
// with the general decoder.
func FuzzPlainNumbers(f *testing.F) {
	for _, s := range []string{"[1,2.5,3e-7]", "[1, 2]", "[-0]", "[1e400]", "[1,]", "[]"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, raw string) { samePlainNumbers(t, raw) })
}
