package routes

import (
	"math"

	"github.com/golang/geo/r3"
	"github.com/paulmach/orb"
)

// The WGS84 ellipsoid (NIMA TR8350.2, 3rd edition, 2000, table 3.1; from memory): semi-major axis
// a = 6378137 m and flattening f = 1/298.257223563. Everything else is derived.
const (
	wgs84A = 6378137.0
	wgs84F = 1 / 298.257223563
	wgs84B = wgs84A * (1 - wgs84F) // semi-minor axis, metres

	// meanRadiusM is the IUGG mean radius R1 = (2a + b)/3 of WGS84, metres. It turns tie and
	// margin tolerances given in metres into angles on the unit sphere; it never measures a
	// reported distance.
	meanRadiusM = (2*wgs84A + wgs84B) / 3

	degRad = math.Pi / 180
	radDeg = 180 / math.Pi
)

var (
	wgs84E2  = wgs84F * (2 - wgs84F)                   // first eccentricity squared
	wgs84Ep2 = wgs84E2 / ((1 - wgs84F) * (1 - wgs84F)) // second eccentricity squared
)

// Vincenty's iteration is trusted only while the two points are at least vincentyGuardRad (about
// 640 km) from being antipodal on the auxiliary sphere. Towards that band the slope of its λ
// iteration, about f·σ/sin σ, grows to 0.1 (which the Newton step below still handles), and closer
// in the iteration may not converge at all or may settle on a geodesic that is not the shortest;
// those pairs go to the fallback.
const (
	vincentyGuardRad = 0.1
	vincentyTolRad   = 1e-10 // stop after a Newton step on λ smaller than this
	vincentyMaxIter  = 50
)

var vincentyAntipodalCos = -math.Cos(vincentyGuardRad)

// ellPoint is a position prepared for the inverse problem: geodetic latitude and longitude in
// degrees and the sine and cosine of the reduced (parametric) latitude U, tan U = (1 − f) tan φ.
type ellPoint struct {
	latDeg, lonDeg float64
	sinU, cosU     float64
}

// point returns the position as it was given, [lon, lat] degrees.
func (p *ellPoint) point() orb.Point { return orb.Point{p.lonDeg, p.latDeg} }

// prepLatLon prepares a position given in degrees.
func prepLatLon(latDeg, lonDeg float64) ellPoint {
	if math.Abs(latDeg) == 90 {
		// Exactly at a pole, so that every longitude there is the same point.
		return ellPoint{latDeg: latDeg, lonDeg: lonDeg, sinU: math.Copysign(1, latDeg), cosU: 0}
	}
	s, c := math.Sincos(latDeg * degRad)
	return prepSinCos(latDeg, lonDeg, s, c)
}

// prepSinCos prepares a position whose latitude's sine and cosine are already known (for example
// from a unit vector, where they are z and √(x² + y²)); it needs no trigonometry and is exact at
// the poles.
func prepSinCos(latDeg, lonDeg, sinPhi, cosPhi float64) ellPoint {
	su := (1 - wgs84F) * sinPhi
	h := 1 / math.Sqrt(su*su+cosPhi*cosPhi)
	return ellPoint{latDeg: latDeg, lonDeg: lonDeg, sinU: su * h, cosU: cosPhi * h}
}

// GeodesicDistM returns the length in metres of the shortest geodesic on the WGS84 ellipsoid
// between a and b ([lon, lat] degrees). It does not allocate.
//
// Method and error bound: Vincenty's inverse (Survey Review 23(176), 1975), its λ iteration
// solved by Newton steps (see vincenty), for every pair at least 0.1 rad (about 640 km) from
// antipodal on the auxiliary sphere. This takes about 0.2 µs and agrees with GeographicLib's
// GeodSolve within 1 µm for pairs under 50 km, within 0.1 mm under 1,000 km and within 0.5 mm at
// any distance (the rest being Vincenty's truncated series; all three checked live in the tests on
// 3,200 pairs). The remaining, nearly antipodal pairs, where Vincenty's iteration converges slowly,
// fails or can pick a geodesic that is not the shortest, go to Karney's inverse (J. Geodesy
// 87:43–55, 2013: Newton's method on the azimuth from an astroid starting guess, sixth-order series
// in the third flattening); it agrees with GeodSolve within 1 µm there, including exactly
// antipodal and polar pairs, and costs about 1.5 µs.
//
// Inputs are taken as given: latitudes outside [-90, 90] or non-finite coordinates give a
// meaningless answer, so validate first (ValidateLatLon).
func GeodesicDistM(a, b orb.Point) float64 {
	p1 := prepLatLon(a[1], a[0])
	p2 := prepLatLon(b[1], b[0])
	return inverseDist(&p1, &p2)
}

// GeodesicInverse returns the shortest WGS84 geodesic from a to b ([lon, lat] degrees): its length
// in metres and its azimuths at a and at b in degrees clockwise from true north in [0, 360) (the
// azimuth at b is the direction of travel on arrival). Method and error bound as GeodesicDistM
// (it iterates further for the azimuths' sake, so its length may differ from GeodesicDistM's by up
// to 1 µm). The azimuths agree with GeodSolve within 1e-7°, or within 10 nm of lateral offset at
// the far end on lines so short that this is larger, wherever they are well defined (not for
// coincident or exactly antipodal points, where any azimuth is as good; at a pole the azimuth is
// the limit approaching the pole along the given longitude). It does not allocate.
func GeodesicInverse(a, b orb.Point) (distM, azADeg, azBDeg float64) {
	p1 := prepLatLon(a[1], a[0])
	p2 := prepLatLon(b[1], b[0])
	s, az1, az2, ok := vincenty(&p1, &p2, true)
	if !ok {
		s, az1, az2 = karneyInverse(p1.latDeg, p1.lonDeg, p2.latDeg, p2.lonDeg)
	}
	return s, normDeg(az1), normDeg(az2)
}

// inverseDist is GeodesicDistM on prepared points.
func inverseDist(p1, p2 *ellPoint) float64 {
	s, _, _, ok := vincenty(p1, p2, false)
	if !ok {
		s, _, _ = karneyInverse(p1.latDeg, p1.lonDeg, p2.latDeg, p2.lonDeg)
	}
	return s
}

// vincenty solves the inverse problem by Vincenty's method. It reports ok = false, and no answer,
// when the pair is inside the antipodal guard band or the iteration has not converged after
// vincentyMaxIter steps. Azimuths (degrees, in (-180, 180]) are computed only when wantAz.
//
// Vincenty iterates λ ← g(λ), which converges linearly with ratio g′ ≈ f. Here each step is
// instead a Newton step on λ − g(λ) = 0 with the leading-order slope
// g′ ≈ f·d(σ sin α)/dλ = f·[σ (cos U1 cos U2 cos λ − sin²α cos σ)/sin σ + sin²α]
// (dσ/dλ = sin α), which contracts by O(f²) per step: two steps for a city-scale pair, three or
// four across a continent. On stopping, σ (to second order), sin σ, cos σ and sin α are carried
// to the final λ and cos 2σm recomputed from them, so the series below see the converged values
// (left over: the Newton residual ~f²·step and, on lines of a metre, ~f³σ).
func vincenty(p1, p2 *ellPoint, wantAz bool) (s, az1, az2 float64, ok bool) {
	const f = wgs84F
	dLon := p2.lonDeg - p1.lonDeg
	if dLon > 180 || dLon < -180 {
		dLon = math.Remainder(dLon, 360)
	}
	L := dLon * degRad
	sinU1, cosU1, sinU2, cosU2 := p1.sinU, p1.cosU, p2.sinU, p2.cosU
	sUsU, cUcU := sinU1*sinU2, cosU1*cosU2
	lambda := L
	var sinSig, cosSig, sig, sinAlpha, cos2Alpha, cos2SigM float64
	converged := false
	for iter := 0; iter < vincentyMaxIter; iter++ {
		sinL, cosL := math.Sincos(lambda)
		t1 := cosU2 * sinL
		t2 := cosU1*sinU2 - sinU1*cosU2*cosL
		sinSig = math.Sqrt(t1*t1 + t2*t2)
		cosSig = sUsU + cUcU*cosL
		if iter == 0 && cosSig < vincentyAntipodalCos {
			return 0, 0, 0, false
		}
		if sinSig == 0 {
			// Coincident points (antipodal ones were sent away above).
			return 0, 0, 0, true
		}
		sig = math.Atan2(sinSig, cosSig)
		invSinSig := 1 / sinSig
		sinAlpha = cUcU * sinL * invSinSig
		cos2Alpha = 1 - sinAlpha*sinAlpha
		cos2SigM = 0
		if cos2Alpha != 0 {
			cos2SigM = cosSig - 2*sUsU/cos2Alpha
		} // else: both points on the equator, the term is multiplied by zero below
		C := f / 16 * cos2Alpha * (4 + f*(4-3*cos2Alpha))
		g := L + (1-C)*f*sinAlpha*(sig+C*sinSig*(cos2SigM+C*cosSig*(-1+2*cos2SigM*cos2SigM)))
		dSinAlpha := (cUcU*cosL - sinAlpha*sinAlpha*cosSig) * invSinSig // d(sin α)/dλ
		slope := f * (sig*dSinAlpha + sinAlpha*sinAlpha)                // g′(λ) to leading order, |g′| ≲ 0.1
		d := (g - lambda) * (1 + slope*(1+slope))                       // ÷ (1 − g′), to O(g′³)
		lambda += d
		// For the distance a step below vincentyTolRad leaves ~f²·1e-10 rad; the azimuths also
		// need λ right relative to itself (on a line of millimetres the east-west component is λ).
		if math.Abs(d) <= vincentyTolRad && (!wantAz || math.Abs(d) <= 1e-15*math.Abs(lambda)) {
			// σ to second order (σ″ = d(sin α)/dλ): on lines of a metre the step stops at
			// d ≈ f·σ, where a first-order carry would leave cos²α·d²/(2σ) ≈ f²σ.
			dSig := sinAlpha*d + 0.5*dSinAlpha*d*d
			sig += dSig
			sinSig, cosSig = sinSig+cosSig*dSig, cosSig-sinSig*dSig
			sinAlpha += dSinAlpha * d
			cos2Alpha = 1 - sinAlpha*sinAlpha
			cos2SigM = 0
			if cos2Alpha != 0 {
				cos2SigM = cosSig - 2*sUsU/cos2Alpha
			}
			converged = true
			break
		}
	}
	if !converged {
		return 0, 0, 0, false
	}
	u2 := cos2Alpha * wgs84Ep2
	A := 1 + u2/16384*(4096+u2*(-768+u2*(320-175*u2)))
	B := u2 / 1024 * (256 + u2*(-128+u2*(74-47*u2)))
	c2m2 := cos2SigM * cos2SigM
	dSig := B * sinSig * (cos2SigM + B/4*(cosSig*(-1+2*c2m2)-B/6*cos2SigM*(-3+4*sinSig*sinSig)*(-3+4*c2m2)))
	s = wgs84B * A * (sig - dSig)
	if wantAz {
		sinL, cosL := math.Sincos(lambda)
		az1 = math.Atan2(cosU2*sinL, cosU1*sinU2-sinU1*cosU2*cosL) * radDeg
		az2 = math.Atan2(cosU1*sinL, -sinU1*cosU2+cosU1*sinU2*cosL) * radDeg
	}
	return s, az1, az2, true
}

// GreatCircleRad returns the central angle in radians, in [0, π], between a and b ([lon, lat]
// degrees) on the unit sphere, treating geodetic latitude as spherical latitude (the sphere on
// which route arcs live). It uses the atan2 form (Vincenty's special case for the sphere), which
// is accurate at all distances, unlike the arccos form near 0 and the haversine near π.
func GreatCircleRad(a, b orb.Point) float64 {
	s1, c1 := math.Sincos(a[1] * degRad)
	s2, c2 := math.Sincos(b[1] * degRad)
	sl, cl := math.Sincos(remainder360(b[0]-a[0]) * degRad)
	t1 := c2 * sl
	t2 := c1*s2 - s1*c2*cl
	return math.Atan2(math.Sqrt(t1*t1+t2*t2), s1*s2+c1*c2*cl)
}

// remainder360 returns math.Remainder(d, 360), d in degrees taken to [−180, 180], without the
// division where d is already there (most differences of longitudes and headings), where the
// remainder is d itself.
func remainder360(d float64) float64 {
	if d >= -180 && d <= 180 {
		return d
	}
	return math.Remainder(d, 360)
}

// normDeg maps an angle in degrees to [0, 360).
func normDeg(d float64) float64 {
	d = math.Mod(d, 360)
	if d < 0 {
		d += 360
	}
	if d >= 360 { // -tiny + 360 rounds to 360
		d = 0
	}
	return d
}

// localMaxM is the longest distance localDistM is used for.
const localMaxM = 1000

// localDistM returns the WGS84 geodesic distance in metres between two nearby points given as
// unit vectors on the sphere of geodetic latitude, separated by the angle delta (radians), from the
// ellipsoid's metric at their midpoint: ds² = M² dφ² + N² cos²φ dλ² against dθ² = dφ² + cos²φ dλ²,
// so ds = dθ·√(M² cos²A + N² sin²A) along the direction A the points lie in. The error is of
// order e²·δ³·a: below 0.1 µm for points up to localMaxM apart (checked against Vincenty in the
// tests), at any latitude including the poles.
func localDistM(p, q r3.Vector, delta float64) float64 {
	m := p.Add(q)
	m = m.Mul(1 / m.Norm())
	d := q.Sub(p) // parallel to the arc's tangent at its midpoint
	east := -m.Y*d.X + m.X*d.Y
	h2 := m.X*m.X + m.Y*m.Y
	north := -m.Z*(m.X*d.X+m.Y*d.Y) + h2*d.Z // both scaled by cos φ, which cancels below
	w2 := 1 - wgs84E2*m.Z*m.Z
	mer := (1 - wgs84E2) / w2 // M/N
	t := north*north + east*east
	if t == 0 {
		return delta * wgs84A / math.Sqrt(w2)
	}
	return delta * wgs84A / math.Sqrt(w2) * math.Sqrt((mer*mer*north*north+east*east)/t)
}

// pairDistM returns the WGS84 geodesic distance in metres between two points given both as unit
// vectors and prepared: from the local metric (localDistM) when they are under localMaxM apart,
// within 0.1 µm of Vincenty at a tenth of the cost, else by inverseDist.
func pairDistM(pv r3.Vector, pp *ellPoint, qv r3.Vector, qp *ellPoint) float64 {
	cx, cy, cz := pv.Y*qv.Z-pv.Z*qv.Y, pv.Z*qv.X-pv.X*qv.Z, pv.X*qv.Y-pv.Y*qv.X
	delta := math.Atan2(math.Sqrt(cx*cx+cy*cy+cz*cz), pv.X*qv.X+pv.Y*qv.Y+pv.Z*qv.Z)
	if delta*wgs84A < localMaxM {
		return localDistM(pv, qv, delta)
	}
	return inverseDist(pp, qp)
}
