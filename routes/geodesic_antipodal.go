package routes

// The fallback inverse for pairs Vincenty's iteration cannot be trusted with (nearly antipodal),
// after C. F. F. Karney, "Algorithms for geodesics", J. Geodesy 87:43–55 (2013). Equation numbers
// below are the paper's. The series are of sixth order in the third flattening n and in ε, which
// for WGS84 leaves truncation errors of about 15 nm; their coefficients are checked against
// numerical quadrature in geodesic_antipodal_test.go.

import "math"

const (
	kTol0    = 2.220446049250313e-16 // machine epsilon
	kTol1    = 200 * kTol0
	kMaxIt1  = 20
	kMaxIt2  = kMaxIt1 + 53 + 10
	kOrder   = 6
	kTinyDeg = 1.4916681462400413e-154 // √(smallest normal double)
)

var (
	kTol2    = math.Sqrt(kTol0)
	kTolB    = kTol0 * kTol2
	kXThresh = 1000 * kTol2
	kN       = wgs84F / (2 - wgs84F) // third flattening
	kF1      = 1 - wgs84F
	kEtol2   = 0.1 * kTol2 / math.Sqrt(math.Max(0.001, wgs84F)*math.Min(1, 1-wgs84F/2)/2)

	// a3Coeff[k] is the coefficient of ε^k in A3 (eq. 24), a3Coeff[0] = 1.
	a3Coeff [kOrder]float64
	// c3Coeff[l][k] is the coefficient of ε^k in C3l (eq. 25).
	c3Coeff [kOrder][kOrder]float64
)

func init() {
	n := kN
	a3Coeff = [kOrder]float64{
		1,
		-(1.0/2 - n/2),
		-(1.0/4 + n/8 - 3*n*n/8),
		-(1.0/16 + 3*n/16 + n*n/16),
		-(3.0/64 + n/32),
		-3.0 / 128,
	}
	c3Coeff[1] = [kOrder]float64{0, 1.0/4 - n/4, 1.0/8 - n*n/8, 3.0/64 + 3*n/64 - n*n/64, 5.0/128 + n/64, 3.0 / 128}
	c3Coeff[2] = [kOrder]float64{0, 0, 1.0/16 - 3*n/32 + n*n/32, 3.0/64 - n/32 - 3*n*n/64, 3.0/128 + n/128, 5.0 / 256}
	c3Coeff[3] = [kOrder]float64{0, 0, 0, 5.0/192 - 3*n/64 + 5*n*n/192, 3.0/128 - 5*n/192, 7.0 / 512}
	c3Coeff[4] = [kOrder]float64{0, 0, 0, 0, 7.0/512 - 7*n/256, 7.0 / 512}
	c3Coeff[5] = [kOrder]float64{0, 0, 0, 0, 0, 21.0 / 2560}
}

// seriesA1 returns A1 (eq. 17).
func seriesA1(eps float64) float64 {
	e2 := eps * eps
	return (1 + e2*(1.0/4+e2*(1.0/64+e2*(1.0/256)))) / (1 - eps)
}

// seriesC1 fills c[1..6] with C1l (eq. 18).
func seriesC1(eps float64, c *[kOrder + 1]float64) {
	e2 := eps * eps
	e := eps
	c[1] = e * (-1.0/2 + e2*(3.0/16+e2*(-1.0/32)))
	e *= eps
	c[2] = e * (-1.0/16 + e2*(1.0/32+e2*(-9.0/2048)))
	e *= eps
	c[3] = e * (-1.0/48 + e2*(3.0/256))
	e *= eps
	c[4] = e * (-5.0/512 + e2*(3.0/512))
	e *= eps
	c[5] = e * (-7.0 / 1280)
	e *= eps
	c[6] = e * (-7.0 / 2048)
}

// seriesA2 returns A2 (eq. 42).
func seriesA2(eps float64) float64 {
	e2 := eps * eps
	return (1 + e2*(1.0/4+e2*(9.0/64+e2*(25.0/256)))) * (1 - eps)
}

// seriesC2 fills c[1..6] with C2l (eq. 43).
func seriesC2(eps float64, c *[kOrder + 1]float64) {
	e2 := eps * eps
	e := eps
	c[1] = e * (1.0/2 + e2*(1.0/16+e2*(1.0/32)))
	e *= eps
	c[2] = e * (3.0/16 + e2*(1.0/32+e2*(35.0/2048)))
	e *= eps
	c[3] = e * (5.0/48 + e2*(5.0/256))
	e *= eps
	c[4] = e * (35.0/512 + e2*(7.0/512))
	e *= eps
	c[5] = e * (63.0 / 1280)
	e *= eps
	c[6] = e * (77.0 / 2048)
}

// seriesA3 returns A3 (eq. 24) for WGS84.
func seriesA3(eps float64) float64 {
	v := 0.0
	for k := kOrder - 1; k >= 0; k-- {
		v = v*eps + a3Coeff[k]
	}
	return v
}

// seriesC3 fills c[1..5] with C3l (eq. 25) for WGS84.
func seriesC3(eps float64, c *[kOrder + 1]float64) {
	for l := 1; l < kOrder; l++ {
		v := 0.0
		for k := kOrder - 1; k >= 0; k-- {
			v = v*eps + c3Coeff[l][k]
		}
		c[l] = v
	}
	c[kOrder] = 0
}

// sinSeries returns Σ_{l=1..6} c[l]·sin(2lσ) given sin σ and cos σ, by Clenshaw summation.
func sinSeries(sinx, cosx float64, c *[kOrder + 1]float64) float64 {
	ar := 2 * (cosx - sinx) * (cosx + sinx) // 2 cos 2σ
	var b1, b2 float64
	for l := kOrder; l >= 1; l-- {
		b1, b2 = c[l]+ar*b1-b2, b1
	}
	return 2 * sinx * cosx * b1
}

// epsOf returns ε for k² (eq. 16), written to avoid cancellation.
func epsOf(k2 float64) float64 {
	return k2 / (2*(1+math.Sqrt(1+k2)) + k2)
}

func norm2(s, c float64) (float64, float64) {
	r := math.Hypot(s, c)
	return s / r, c / r
}

// angRound rounds tiny values so that the differences of nearly equal angles are exact.
func angRound(x float64) float64 {
	const z = 1.0 / 16
	y := math.Abs(x)
	if w := z - y; w > 0 {
		y = z - w
	}
	return math.Copysign(y, x)
}

// sinCosDeg returns the sine and cosine of x degrees, exact at multiples of 90°.
func sinCosDeg(x float64) (s, c float64) {
	r := math.Remainder(x, 360)
	q := math.Round(r / 90)
	r -= 90 * q
	s, c = math.Sincos(r * degRad)
	switch int(q) & 3 {
	case 1:
		s, c = c, -s
	case 2:
		s, c = -s, -c
	case 3:
		s, c = -c, s
	}
	c += 0 // turn -0 into +0
	if s == 0 {
		s = math.Copysign(0, x)
	}
	return s, c
}

// karneyLengths returns the reduced distances s12/b and m12/b (eqs. 38–41) along the geodesic with
// parameter eps between auxiliary-sphere arc positions σ1 and σ2.
func karneyLengths(eps, sig12, ssig1, csig1, dn1, ssig2, csig2, dn2 float64) (s12b, m12b float64) {
	var ca, cb [kOrder + 1]float64
	a1 := seriesA1(eps)
	seriesC1(eps, &ca)
	a2 := seriesA2(eps)
	seriesC2(eps, &cb)
	m0x := a1 - a2
	b1 := sinSeries(ssig2, csig2, &ca) - sinSeries(ssig1, csig1, &ca)
	s12b = a1 * (sig12 + b1)
	b2 := sinSeries(ssig2, csig2, &cb) - sinSeries(ssig1, csig1, &cb)
	j12 := m0x*sig12 + (a1*b1 - a2*b2)
	m12b = dn2*(csig1*ssig2) - dn1*(ssig1*csig2) - csig1*csig2*j12
	return s12b, m12b
}

// karneyAstroid returns the positive root k of k⁴ + 2k³ − (x² + y² − 1)k² − 2y²k − y² = 0 (eq. 55).
func karneyAstroid(x, y float64) float64 {
	p, q := x*x, y*y
	r := (p + q - 1) / 6
	if q == 0 && r <= 0 {
		return 0
	}
	S := p * q / 4
	r2 := r * r
	r3 := r * r2
	disc := S * (S + 2*r3)
	u := r
	if disc >= 0 {
		T3 := S + r3
		if T3 < 0 {
			T3 -= math.Sqrt(disc)
		} else {
			T3 += math.Sqrt(disc)
		}
		T := math.Cbrt(T3)
		if T != 0 {
			u += T + r2/T
		}
	} else {
		ang := math.Atan2(math.Sqrt(-disc), -(S + r3))
		u += 2 * r * math.Cos(ang/3)
	}
	v := math.Sqrt(u*u + q)
	var uv float64
	if u < 0 {
		uv = q / (v - u)
	} else {
		uv = u + v
	}
	w := (uv - q) / (2 * v)
	return uv / (math.Sqrt(uv+w*w) + w)
}

// karneyStart returns the starting azimuth for Newton's method (§4), or, for short lines it can
// solve directly, sig12 ≥ 0 with the final azimuth and dnm.
func karneyStart(sbet1, cbet1, sbet2, cbet2, lam12, slam12, clam12 float64) (sig12, salp1, calp1, salp2, calp2, dnm float64) {
	sig12 = -1
	sbet12 := sbet2*cbet1 - cbet2*sbet1
	cbet12 := cbet2*cbet1 + sbet2*sbet1
	sbet12a := sbet2*cbet1 + cbet2*sbet1
	shortline := cbet12 >= 0 && sbet12 < 0.5 && cbet2*lam12 < 0.5
	var somg12, comg12 float64
	if shortline {
		sbetm2 := (sbet1 + sbet2) * (sbet1 + sbet2)
		sbetm2 /= sbetm2 + (cbet1+cbet2)*(cbet1+cbet2)
		dnm = math.Sqrt(1 + wgs84Ep2*sbetm2)
		omg12 := lam12 / (kF1 * dnm)
		somg12, comg12 = math.Sincos(omg12)
	} else {
		somg12, comg12 = slam12, clam12
	}
	salp1 = cbet2 * somg12
	if comg12 >= 0 {
		calp1 = sbet12 + cbet2*sbet1*somg12*somg12/(1+comg12)
	} else {
		calp1 = sbet12a - cbet2*sbet1*somg12*somg12/(1-comg12)
	}
	ssig12 := math.Hypot(salp1, calp1)
	csig12 := sbet1*sbet2 + cbet1*cbet2*comg12
	switch {
	case shortline && ssig12 < kEtol2:
		salp2 = cbet1 * somg12
		t := 1 - comg12
		if comg12 >= 0 {
			t = somg12 * somg12 / (1 + comg12)
		}
		calp2 = sbet12 - cbet1*sbet2*t
		salp2, calp2 = norm2(salp2, calp2)
		sig12 = math.Atan2(ssig12, csig12)
	case math.Abs(kN) > 0.1 || csig12 >= 0 || ssig12 >= 6*math.Abs(kN)*math.Pi*cbet1*cbet1:
		// The zeroth-order spherical estimate is good enough.
	default:
		// Nearly antipodal: scale to the coordinates of §5 where the antipodal point is the
		// origin, then solve the astroid problem.
		lam12x := math.Atan2(-slam12, -clam12) // lam12 − π
		k2 := sbet1 * sbet1 * wgs84Ep2
		lamscale := wgs84F * cbet1 * seriesA3(epsOf(k2)) * math.Pi
		betscale := lamscale * cbet1
		x := lam12x / lamscale
		y := sbet12a / betscale
		if y > -kTol1 && x > -1-kXThresh {
			salp1 = math.Min(1, -x)
			calp1 = -math.Sqrt(1 - salp1*salp1)
		} else {
			k := karneyAstroid(x, y)
			omg12a := lamscale * (-x * k / (1 + k))
			somg12, comg12 = math.Sincos(omg12a)
			comg12 = -comg12
			salp1 = cbet2 * somg12
			calp1 = sbet12a - cbet2*sbet1*somg12*somg12/(1-comg12)
		}
	}
	if !(salp1 <= 0) {
		salp1, calp1 = norm2(salp1, calp1)
	} else {
		salp1, calp1 = 1, 0
	}
	return sig12, salp1, calp1, salp2, calp2, dnm
}

// karneyLambda12 evaluates the longitude difference reached by the geodesic leaving point 1 with
// azimuth alp1 when it reaches point 2's latitude, minus the target λ12 (eq. 5–8), and its
// derivative with respect to alp1 (eq. 46) when diffp.
type lambdaState struct {
	salp2, calp2, sig12, ssig1, csig1, ssig2, csig2, eps float64
}

func karneyLambda12(sbet1, cbet1, dn1, sbet2, cbet2, dn2, salp1, calp1, slam120, clam120 float64, diffp bool) (v, dv float64, st lambdaState) {
	if sbet1 == 0 && calp1 == 0 {
		calp1 = -kTinyDeg // break the degeneracy of the equatorial line
	}
	salp0 := salp1 * cbet1
	calp0 := math.Hypot(calp1, salp1*sbet1)
	ssig1 := sbet1
	somg1 := salp0 * sbet1
	csig1 := calp1 * cbet1
	comg1 := csig1
	ssig1, csig1 = norm2(ssig1, csig1)

	var salp2, calp2 float64
	if cbet2 != cbet1 {
		salp2 = salp0 / cbet2
	} else {
		salp2 = salp1
	}
	if cbet2 != cbet1 || math.Abs(sbet2) != -sbet1 {
		var t float64
		if cbet1 < -sbet1 {
			t = (cbet2 - cbet1) * (cbet1 + cbet2)
		} else {
			t = (sbet1 - sbet2) * (sbet1 + sbet2)
		}
		calp2 = math.Sqrt((calp1*cbet1)*(calp1*cbet1)+t) / cbet2
	} else {
		calp2 = math.Abs(calp1)
	}
	ssig2 := sbet2
	somg2 := salp0 * sbet2
	csig2 := calp2 * cbet2
	comg2 := csig2
	ssig2, csig2 = norm2(ssig2, csig2)

	sig12 := math.Atan2(math.Max(0, csig1*ssig2-ssig1*csig2), csig1*csig2+ssig1*ssig2)
	somg12 := math.Max(0, comg1*somg2-somg1*comg2)
	comg12 := comg1*comg2 + somg1*somg2
	eta := math.Atan2(somg12*clam120-comg12*slam120, comg12*clam120+somg12*slam120)
	k2 := calp0 * calp0 * wgs84Ep2
	eps := epsOf(k2)
	var c3 [kOrder + 1]float64
	seriesC3(eps, &c3)
	b312 := sinSeries(ssig2, csig2, &c3) - sinSeries(ssig1, csig1, &c3)
	domg12 := -wgs84F * seriesA3(eps) * salp0 * (sig12 + b312)
	v = eta + domg12
	if diffp {
		if calp2 == 0 {
			dv = -2 * kF1 * dn1 / sbet1
		} else {
			_, m12b := karneyLengths(eps, sig12, ssig1, csig1, dn1, ssig2, csig2, dn2)
			dv = m12b * kF1 / (calp2 * cbet2)
		}
	}
	return v, dv, lambdaState{salp2, calp2, sig12, ssig1, csig1, ssig2, csig2, eps}
}

// karneyInverse solves the inverse problem on WGS84 for any pair of valid positions (degrees):
// distance in metres and azimuths in degrees in (-180, 180].
func karneyInverse(lat1, lon1, lat2, lon2 float64) (s12, azi1, azi2 float64) {
	lon12 := math.Remainder(lon2-lon1, 360)
	lonsign := 1.0
	if math.Signbit(lon12) {
		lonsign = -1
	}
	lon12 = angRound(lon12 * lonsign)
	lam12 := lon12 * degRad
	slam12, clam12 := sinCosDeg(lon12)
	lon12s := 180 - lon12 // the supplementary longitude difference

	lat1 = angRound(lat1)
	lat2 = angRound(lat2)
	swapp := 1.0
	if math.Abs(lat1) < math.Abs(lat2) {
		swapp = -1
		lonsign = -lonsign
		lat1, lat2 = lat2, lat1
	}
	latsign := -1.0
	if math.Signbit(lat1) {
		latsign = 1
	}
	lat1 *= latsign
	lat2 *= latsign
	// Now 0 ≤ lon12 ≤ 180, -90 ≤ lat1 ≤ -0 and lat1 ≤ lat2 ≤ -lat1.

	sbet1, cbet1 := sinCosDeg(lat1)
	sbet1 *= kF1
	sbet1, cbet1 = norm2(sbet1, cbet1)
	cbet1 = math.Max(kTinyDeg, cbet1)
	sbet2, cbet2 := sinCosDeg(lat2)
	sbet2 *= kF1
	sbet2, cbet2 = norm2(sbet2, cbet2)
	cbet2 = math.Max(kTinyDeg, cbet2)
	if cbet1 < -sbet1 {
		if cbet2 == cbet1 {
			sbet2 = math.Copysign(sbet1, sbet2)
		}
	} else if math.Abs(sbet2) == -sbet1 {
		cbet2 = cbet1
	}
	dn1 := math.Sqrt(1 + wgs84Ep2*sbet1*sbet1)
	dn2 := math.Sqrt(1 + wgs84Ep2*sbet2*sbet2)

	var salp1, calp1, salp2, calp2, sig12, s12x float64
	meridian := lat1 == -90 || slam12 == 0
	if meridian {
		// Both ends on one full meridian: the geodesic may run along it.
		calp1, salp1 = clam12, slam12
		calp2, salp2 = 1, 0
		ssig1, csig1 := sbet1, calp1*cbet1
		ssig2, csig2 := sbet2, calp2*cbet2
		sig12 = math.Atan2(math.Max(0, csig1*ssig2-ssig1*csig2), csig1*csig2+ssig1*ssig2)
		s12b, m12b := karneyLengths(kN, sig12, ssig1, csig1, dn1, ssig2, csig2, dn2)
		if sig12 < 1 || m12b >= 0 {
			if sig12 < 3*kTinyDeg || (sig12 < kTol0 && (s12b < 0 || m12b < 0)) {
				s12b = 0
			}
			s12x = s12b * wgs84B
		} else {
			meridian = false // beyond the conjugate point: not the shortest line
		}
	}
	if !meridian {
		if sbet1 == 0 && lon12s >= wgs84F*180 {
			// Along the equator.
			calp1, calp2, salp1, salp2 = 0, 0, 1, 1
			s12x = wgs84A * lam12
		} else {
			var dnm float64
			sig12, salp1, calp1, salp2, calp2, dnm = karneyStart(sbet1, cbet1, sbet2, cbet2, lam12, slam12, clam12)
			if sig12 >= 0 {
				s12x = sig12 * wgs84B * dnm
			} else {
				// Newton's method on alp1, safeguarded by bisection of a bracket (§4).
				salp1a, calp1a := kTinyDeg, 1.0
				salp1b, calp1b := kTinyDeg, -1.0
				tripn, tripb := false, false
				var st lambdaState
				for numit := 0; ; numit++ {
					var v, dv float64
					v, dv, st = karneyLambda12(sbet1, cbet1, dn1, sbet2, cbet2, dn2, salp1, calp1, slam12, clam12, numit < kMaxIt1)
					lim := 1.0
					if tripn {
						lim = 8
					}
					if tripb || !(math.Abs(v) >= lim*kTol0) || numit == kMaxIt2 {
						break
					}
					if v > 0 && (numit > kMaxIt1 || calp1/salp1 > calp1b/salp1b) {
						salp1b, calp1b = salp1, calp1
					} else if v < 0 && (numit > kMaxIt1 || calp1/salp1 < calp1a/salp1a) {
						salp1a, calp1a = salp1, calp1
					}
					if numit < kMaxIt1 && dv > 0 {
						dalp1 := -v / dv
						if math.Abs(dalp1) < math.Pi {
							sdalp1, cdalp1 := math.Sincos(dalp1)
							nsalp1 := salp1*cdalp1 + calp1*sdalp1
							if nsalp1 > 0 {
								calp1 = calp1*cdalp1 - salp1*sdalp1
								salp1 = nsalp1
								salp1, calp1 = norm2(salp1, calp1)
								tripn = math.Abs(v) <= 16*kTol0
								continue
							}
						}
					}
					salp1 = (salp1a + salp1b) / 2
					calp1 = (calp1a + calp1b) / 2
					salp1, calp1 = norm2(salp1, calp1)
					tripn = false
					tripb = math.Abs(salp1a-salp1)+(calp1a-calp1) < kTolB ||
						math.Abs(salp1-salp1b)+(calp1-calp1b) < kTolB
				}
				salp2, calp2 = st.salp2, st.calp2
				s12b, _ := karneyLengths(st.eps, st.sig12, st.ssig1, st.csig1, dn1, st.ssig2, st.csig2, dn2)
				s12x = s12b * wgs84B
			}
		}
	}
	s12 = 0 + s12x
	if swapp < 0 {
		salp1, salp2 = salp2, salp1
		calp1, calp2 = calp2, calp1
	}
	salp1 *= swapp * lonsign
	calp1 *= swapp * latsign
	salp2 *= swapp * lonsign
	calp2 *= swapp * latsign
	return s12, math.Atan2(salp1, calp1) * radDeg, math.Atan2(salp2, calp2) * radDeg
}
