package demo

import (
	"math"

	"github.com/paulmach/orb"
)

// StreetKind is what sort of road a street is.
type StreetKind string

const (
	KindAvenue     StreetKind = "avenue"     // a town-centre avenue, along AvenueBearingDeg
	KindStreet     StreetKind = "street"     // a town-centre cross street, at right angles to the avenues
	KindRing       StreetKind = "ring"       // the ring road round the centre (a closed line)
	KindExpressway StreetKind = "expressway" // the fast road from the ring out to the headland
	KindSlip       StreetKind = "slip"       // the slip road leaving the expressway at its sharp exit
	KindLane       StreetKind = "lane"       // the country lane beyond the slip road
)

// Street is one named road: its vertices in the order it is drawn ([lon, lat] WGS84 degrees, rounded
// to 1e-7°). The ring's first and last vertices are the same point.
type Street struct {
	Name   string
	Kind   StreetKind
	Points []orb.Point
}

// Sizes of the town, metres (ranges are drawn from the seed).
const (
	blockAlongMinM, blockAlongMaxM   = 105.0, 140.0 // between cross streets, along an avenue
	blockAcrossMinM, blockAcrossMaxM = 110.0, 150.0 // between avenues, along a cross street
	nodeJitterM                      = 6.0          // how far an intersection may sit off the regular grid
	ringMarginMinM, ringMarginMaxM   = 300.0, 400.0 // from the grid's edge out to the ring
	ringVertices                     = 48           // the ring's vertices; every twelfth meets a main road
	fastSegMinM, fastSegMaxM         = 380.0, 450.0 // expressway segment lengths
	fastDriftMaxDeg                  = 20.0         // how far the expressway's heading wanders from its first
	exitTurnMinDeg, exitTurnMaxDeg   = 64.0, 76.0   // the sharp exit's turn
	slipBendDeg                      = 15.0         // each further bend of the slip road, same way round
)

// layout is the town in the local frame, before it is named and turned into degrees.
type layout struct {
	u, w   vec       // unit vectors along the avenues (AvenueBearingDeg) and the cross streets (+90°)
	nodes  [][]vec   // nodes[i][j]: cross street i meets avenue j
	mS, mA int       // indices of Tidemark Street and Lantern Avenue
	centre vec       // the square where they cross; the ring's centre
	ring   []vec     // ringVertices points from +u towards +w: clockwise on the map
	spokes [4]int    // ring vertices where the main roads meet it, towards +u, +w, −u, −w
	fastAt int       // the ring vertex the expressway leaves from
	fast   []vec     // the expressway, fast[0] = ring[fastAt]
	exitAt int       // the expressway vertex of the sharp exit
	slip   []vec     // the slip road, slip[0] = fast[exitAt]
	lane   []vec     // the lane, lane[0] = the slip road's end
	slipSg float64   // +1 when the exit turns right (clockwise), −1 left
	names  townNames // street names drawn for this seed
}

type townNames struct {
	avenues []string // by j (Lantern Avenue at mA)
	streets []string // by i (Tidemark Street at mS)
	lane    string
}

// newLayout draws the town's roads from the seed.
func newLayout(seed uint64) *layout {
	r := newRNG(seed, "roads")
	l := &layout{u: dir(AvenueBearingDeg), w: dir(AvenueBearingDeg + 90)}

	// The grid: ns cross streets along u, na avenues along w, irregular spacing.
	ns, na := 8+r.intn(2), 5+r.intn(2)
	l.mS, l.mA = ns/2, na/2
	us, ws := make([]float64, ns), make([]float64, na)
	for i := 1; i < ns; i++ {
		us[i] = us[i-1] + r.between(blockAlongMinM, blockAlongMaxM)
	}
	for j := 1; j < na; j++ {
		ws[j] = ws[j-1] + r.between(blockAcrossMinM, blockAcrossMaxM)
	}
	// Origin lies on Lantern Avenue (w = 0), midway along the block before the square.
	u0, w0 := (us[l.mS-1]+us[l.mS])/2, ws[l.mA]
	for i := range us {
		us[i] -= u0
	}
	for j := range ws {
		ws[j] -= w0
	}
	l.nodes = make([][]vec, ns)
	for i := range ns {
		l.nodes[i] = make([]vec, na)
		for j := range na {
			// An intersection moved along u bends its cross street, along w its avenue; the two main
			// roads stay straight, so that they run out to the ring along its axes.
			du, dw := r.between(-nodeJitterM, nodeJitterM), r.between(-nodeJitterM, nodeJitterM)
			if i == l.mS {
				du = 0
			}
			if j == l.mA {
				dw = 0
			}
			l.nodes[i][j] = l.at(us[i]+du, ws[j]+dw)
		}
	}
	l.centre = l.nodes[l.mS][l.mA]

	// The ring: an ellipse round the square, a margin outside the grid, its radius swelling and
	// shrinking smoothly by up to 4.5 % round the way. Vertices at equal steps of the ellipse's angle
	// sit closest together where it bends most (the ends of the long axis), which keeps every bend
	// between two segments under 16° (the tests check < 25°, the rule sets' lowest turn threshold).
	au := max(us[l.mS]-us[0], us[ns-1]-us[l.mS]) + r.between(ringMarginMinM, ringMarginMaxM)
	aw := max(ws[l.mA]-ws[0], ws[na-1]-ws[l.mA]) + r.between(ringMarginMinM, ringMarginMaxM)
	ph2, ph3 := r.between(0, 2*math.Pi), r.between(0, 2*math.Pi)
	l.ring = make([]vec, ringVertices)
	for k := range ringVertices {
		phi := 2 * math.Pi * float64(k) / ringVertices
		sw := 1 + 0.03*math.Sin(2*phi+ph2) + 0.015*math.Sin(3*phi+ph3)
		c, s := math.Cos(phi), math.Sin(phi)
		if k%(ringVertices/4) == 0 { // on an axis: exactly, so the main road meets it straight
			c, s = math.Round(c), math.Round(s)
		}
		l.ring[k] = l.centre.add(l.u.mul(au * c * sw)).add(l.w.mul(aw * s * sw))
	}
	q := ringVertices / 4
	l.spokes = [4]int{0, q, 2 * q, 3 * q}

	// The expressway leaves the ring between two main roads, outward, its heading wandering a little.
	l.fastAt = q*r.intn(4) + 4 + r.intn(5)
	h0 := l.ring[l.fastAt].sub(l.centre).bearingDeg() + r.between(-8, 8)
	h := h0
	l.exitAt = 7 + r.intn(2)
	l.fast = []vec{l.ring[l.fastAt]}
	for m := 1; m <= l.exitAt+2; m++ {
		if m > 1 {
			step := r.between(1, 5) * r.sign()
			if math.Abs(h+step-h0) > fastDriftMaxDeg {
				step = -step
			}
			h += step
		}
		p := l.fast[m-1].add(dir(h).mul(r.between(fastSegMinM, fastSegMaxM)))
		l.fast = append(l.fast, p)
	}

	// The sharp exit: the slip road turns off by 64–76° and bends on the same way round, then the lane
	// wanders on to a hamlet.
	l.slipSg = r.sign()
	hIn := l.fast[l.exitAt].sub(l.fast[l.exitAt-1]).bearingDeg()
	hs := hIn + l.slipSg*r.between(exitTurnMinDeg, exitTurnMaxDeg)
	l.slip = []vec{l.fast[l.exitAt]}
	for m, lenM := range []float64{r.between(90, 110), 80, 80} {
		if m > 0 {
			hs += l.slipSg * slipBendDeg
		}
		l.slip = append(l.slip, l.slip[m].add(dir(hs).mul(lenM)))
	}
	l.lane = []vec{l.slip[len(l.slip)-1]}
	for m := range 3 {
		hs += r.between(-8, 8)
		l.lane = append(l.lane, l.lane[m].add(dir(hs).mul(r.between(150, 200))))
	}

	// Names: Lantern Avenue and Tidemark Street fixed, the rest shuffled from their lists.
	avs := shuffled(r, avenueNames)
	sts := shuffled(r, streetNames)
	l.names.avenues = make([]string, na)
	for j := range na {
		if j == l.mA {
			l.names.avenues[j] = MainAvenueName
		} else {
			l.names.avenues[j] = avs[j] + " Avenue"
		}
	}
	l.names.streets = make([]string, ns)
	for i := range ns {
		if i == l.mS {
			l.names.streets[i] = MainStreetName
		} else {
			l.names.streets[i] = sts[i] + " Street"
		}
	}
	l.names.lane = r.pick(laneNames) + " Lane"
	return l
}

// at returns the local point at u metres along the avenues and w metres along the cross streets.
func (l *layout) at(u, w float64) vec { return l.u.mul(u).add(l.w.mul(w)) }

// shuffled returns a shuffled copy of xs.
func shuffled(r *rng, xs []string) []string {
	out := append([]string(nil), xs...)
	r.shuffle(len(out), func(i, j int) { out[i], out[j] = out[j], out[i] })
	return out
}

// road is a street in the local frame, with its name and kind.
type road struct {
	name string
	kind StreetKind
	pts  []vec
}

// roads returns every street in the local frame, in the order of Scenario.Streets: the avenues
// (Lantern Avenue running on to the ring at both ends), the cross streets (Tidemark Street likewise),
// the ring (closed), the expressway, the slip road and the lane.
func (l *layout) roads() []road {
	ns, na := len(l.nodes), len(l.nodes[0])
	var out []road
	for j := range na {
		var pts []vec
		if j == l.mA {
			pts = append(pts, l.ring[l.spokes[2]])
		}
		for i := range ns {
			pts = append(pts, l.nodes[i][j])
		}
		if j == l.mA {
			pts = append(pts, l.ring[l.spokes[0]])
		}
		out = append(out, road{l.names.avenues[j], KindAvenue, pts})
	}
	for i := range ns {
		var pts []vec
		if i == l.mS {
			pts = append(pts, l.ring[l.spokes[3]])
		}
		pts = append(pts, l.nodes[i]...)
		if i == l.mS {
			pts = append(pts, l.ring[l.spokes[1]])
		}
		out = append(out, road{l.names.streets[i], KindStreet, pts})
	}
	ring := append(append([]vec(nil), l.ring...), l.ring[0])
	out = append(out,
		road{RingName, KindRing, ring},
		road{ExpresswayName, KindExpressway, l.fast},
		road{SlipName, KindSlip, l.slip},
		road{l.names.lane, KindLane, l.lane},
	)
	return out
}

// streets turns roads into Streets in degrees.
func streetsOf(rs []road) []Street {
	out := make([]Street, len(rs))
	for k, rd := range rs {
		pts := make([]orb.Point, len(rd.pts))
		for i, p := range rd.pts {
			pts[i] = lonLat(p)
		}
		out[k] = Street{Name: rd.name, Kind: rd.kind, Points: pts}
	}
	return out
}
