package routes

import (
	"math"
	"testing"
)

// fourierCos returns the cosine-series coefficients g_0..g_L of a function of period π sampled on
// 256 midpoints (exact to rounding for the smooth integrands here): g(σ) = g_0 + Σ g_l cos 2lσ.
func fourierCos(g func(float64) float64, L int) []float64 {
	const N = 256
	out := make([]float64, L+1)
	for j := range N {
		s := math.Pi * (float64(j) + 0.5) / N
		v := g(s)
		for l := 0; l <= L; l++ {
			out[l] += v * math.Cos(2*float64(l)*s)
		}
	}
	out[0] /= N
	for l := 1; l <= L; l++ {
		out[l] *= 2.0 / N
	}
	return out
}

// TestFallbackSeriesAgainstQuadrature checks the series of the antipodal fallback against direct
// numerical integration of the integrals they expand (Karney 2013, eqs. 7, 8, 15, 17–18, 24–25,
// 40–43): I(σ) = A(σ + Σ C_l sin 2lσ), so the integrand's Fourier coefficients are A and 2l·A·C_l.
// Over WGS84's range of ε the series must agree to the quadrature's rounding (2e-15). Source of
// the expected values: the quadrature itself.
func TestFallbackSeriesAgainstQuadrature(t *testing.T) {
	const tol = 2e-15
	for _, cosAlpha0Sq := range []float64{1, 0.7, 0.3, 0.01} {
		k2 := wgs84Ep2 * cosAlpha0Sq
		eps := epsOf(k2)
		sin2 := func(s float64) float64 { return math.Sin(s) * math.Sin(s) }
		g1 := fourierCos(func(s float64) float64 { return math.Sqrt(1 + k2*sin2(s)) }, kOrder)
		g2 := fourierCos(func(s float64) float64 { return 1 / math.Sqrt(1+k2*sin2(s)) }, kOrder)
		g3 := fourierCos(func(s float64) float64 {
			return (2 - wgs84F) / (1 + (1-wgs84F)*math.Sqrt(1+k2*sin2(s)))
		}, kOrder)
		var c1, c2, c3 [kOrder + 1]float64
		seriesC1(eps, &c1)
		seriesC2(eps, &c2)
		seriesC3(eps, &c3)
		check := func(name string, got, want float64) {
			if math.Abs(got-want) > tol {
				t.Errorf("cos²α0 = %v: %s = %.17g, quadrature %.17g (off by %.3g, tolerance %.3g)", cosAlpha0Sq, name, got, want, math.Abs(got-want), tol)
			}
		}
		check("A1", seriesA1(eps), g1[0])
		check("A2", seriesA2(eps), g2[0])
		check("A3", seriesA3(eps), g3[0])
		for l := 1; l <= kOrder; l++ {
			check("C1_"+string(rune('0'+l)), c1[l], g1[l]/(2*float64(l)*g1[0]))
			check("C2_"+string(rune('0'+l)), c2[l], g2[l]/(2*float64(l)*g2[0]))
			if l < kOrder {
				check("C3_"+string(rune('0'+l)), c3[l], g3[l]/(2*float64(l)*g3[0]))
			}
		}
	}
}

// TestFallbackAstroid checks the astroid root against its defining quartic (Karney 2013, eq. 55).
func TestFallbackAstroid(t *testing.T) {
	for _, xy := range [][2]float64{{-0.5, -0.3}, {-2, -1}, {0.3, -0.01}, {-0.99, -1e-6}, {-10, -5}, {-0.2, -2}} {
		x, y := xy[0], xy[1]
		k := karneyAstroid(x, y)
		res := k*k*k*k + 2*k*k*k - (x*x+y*y-1)*k*k - 2*y*y*k - y*y
		if k <= 0 || math.Abs(res) > 1e-12*math.Max(1, k*k*k*k) {
			t.Errorf("karneyAstroid(%v, %v) = %v, residual %.3g", x, y, k, res)
		}
	}
	if k := karneyAstroid(0.5, 0); k != 0 {
		t.Errorf("karneyAstroid(0.5, 0) = %v, want 0 (y = 0, |x| ≤ 1)", k)
	}
}

// TestFallbackSeriesOrder: at WGS84's small ε a wrong high-order coefficient hides below rounding,
// so check the order at larger ε. The series are complete through ε⁶, so halving ε must cut the
// error by at least 2^6.5 (a wrong ε⁶ coefficient gives only 2⁶).
func TestFallbackSeriesOrder(t *testing.T) {
	worst := func(eps float64) (a1, a2 float64, c1, c2 [kOrder + 1]float64) {
		k2 := 4 * eps / ((1 - eps) * (1 - eps)) // the k² whose ε (eq. 16) is eps
		sin2 := func(s float64) float64 { return math.Sin(s) * math.Sin(s) }
		g1 := fourierCos(func(s float64) float64 { return math.Sqrt(1 + k2*sin2(s)) }, kOrder)
		g2 := fourierCos(func(s float64) float64 { return 1 / math.Sqrt(1+k2*sin2(s)) }, kOrder)
		var s1, s2 [kOrder + 1]float64
		seriesC1(eps, &s1)
		seriesC2(eps, &s2)
		a1, a2 = math.Abs(seriesA1(eps)-g1[0]), math.Abs(seriesA2(eps)-g2[0])
		for l := 1; l <= kOrder; l++ {
			c1[l] = math.Abs(s1[l] - g1[l]/(2*float64(l)*g1[0]))
			c2[l] = math.Abs(s2[l] - g2[l]/(2*float64(l)*g2[0]))
		}
		return
	}
	a1x, a2x, c1x, c2x := worst(0.08)
	a1y, a2y, c1y, c2y := worst(0.04)
	ratio := func(name string, big, small float64) {
		if big > 1e-13 && big/small < math.Pow(2, 6.5) { // below 1e-13 rounding decides
			t.Errorf("%s: error %.3g at ε = 0.08 and %.3g at 0.04: ratio %.1f, want ≥ %.1f", name, big, small, big/small, math.Pow(2, 6.5))
		}
	}
	ratio("A1", a1x, a1y)
	ratio("A2", a2x, a2y)
	for l := 1; l <= kOrder; l++ {
		ratio("C1_"+string(rune('0'+l)), c1x[l], c1y[l])
		ratio("C2_"+string(rune('0'+l)), c2x[l], c2y[l])
	}
}
