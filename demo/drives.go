package demo

import (
	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
)

// Tour is one scripted drive through Port Wren: its vertices along the streets ([lon, lat] WGS84
// degrees, in the order driven) and the speed on each segment, SpeedsMps[i] for Points[i] →
// Points[i+1], in m/s. Speeds are multiples of 0.1 m/s chosen inside the drive's stated range in km/h
// (TownMinKmh and the like), so that × 3.6 never crosses its ends.
type Tour struct {
	Name        string
	Description string
	Points      []orb.Point
	SpeedsMps   []float64
}

// Route prepares the drive as a route (SPEC §4): the vertices and the per-segment speeds.
func (d Tour) Route() (*routes.Route, error) { return routes.New(d.Points, d.SpeedsMps) }

// The drives' names.
const (
	DriveTown       = "town"
	DriveRing       = "ring"
	DriveExpressway = "expressway"
)

// Stated speed ranges of the drives, km/h: every segment of the town and ring drives lies within its
// range, and every segment of the expressway drive up to its sharp exit; from the exit on, the speed
// falls below ExpresswayMinKmh and keeps falling.
const (
	TownMinKmh, TownMaxKmh             = 20.0, 50.0
	RingMinKmh, RingMaxKmh             = 50.0, 70.0
	ExpresswayMinKmh, ExpresswayMaxKmh = 100.0, 120.0
	// ExitTurnMinDeg is the least turn of the expressway's exit onto the slip road, degrees.
	ExitTurnMinDeg = 60.0
)

// Speeds, m/s, at 0.1 m/s steps strictly inside the ranges above (5.6 m/s = 20.16 km/h, 13.8 m/s =
// 49.68 km/h, and so on).
const (
	townSlowMinMps, townSlowMaxMps     = 5.6, 6.9   // turning, pulling away, arriving: 20–25 km/h
	townCruiseMinMps, townCruiseMaxMps = 8.4, 13.8  // between junctions: 30–50 km/h
	ringNearMinMps, ringNearMaxMps     = 13.9, 15.0 // beside a junction: 50–54 km/h
	ringFreeMinMps, ringFreeMaxMps     = 16.5, 19.4 // elsewhere: 59–70 km/h
	fastEntryMps                       = 27.8       // just on, and easing off before the exit: 100 km/h
	fastCruiseMinMps, fastCruiseMaxMps = 30.0, 33.3 // 108–120 km/h
)

// Lengths of the drives.
const (
	turnOutM, turnInM            = 20.0, 30.0           // slow stretches after and before a turn in town, metres
	townBlocksMin, townBlocksMax = 12, 16               // town drive length in blocks: [min, max]
	ringDriveSegments            = ringVertices * 3 / 4 // three quarters of the ring
)

// slipSpeedsMps are the slip road's speeds after the exit, segment by segment: 54, 43 and 34 km/h.
var slipSpeedsMps = []float64{15, 12, 9.5}

// speed0 returns a speed in [lo, hi] m/s rounded to 0.1 m/s (lo and hi themselves multiples of 0.1).
func speed0(r *rng, lo, hi float64) float64 {
	steps := int((hi-lo)*10 + 0.5)
	return float64(int(lo*10+0.5)+r.intn(steps+1)) / 10
}

// newDrives draws the three drives.
func newDrives(seed uint64, l *layout) []Tour {
	return []Tour{townDrive(seed, l), ringDrive(seed, l), expresswayDrive(seed, l)}
}

// townDrive is a walk on the grid: legs of 1–3 blocks along avenues and cross streets, turning left
// or right at a junction after each, never driving a block twice. It pulls away and turns slowly
// (20–25 km/h over 20 m after a turn and 30 m before one) and cruises at 30–50 km/h in between.
func townDrive(seed uint64, l *layout) Tour {
	r := newRNG(seed, "drive/town")
	ns, na := len(l.nodes), len(l.nodes[0])
	type node struct{ i, j int }
	steps := [4]node{{1, 0}, {0, 1}, {-1, 0}, {0, -1}} // +u, +w, −u, −w: each a right turn from the last
	var path []node
	for attempt := 0; ; attempt++ {
		if attempt == 1000 {
			panic("demo: no town drive found on the grid")
		}
		target := townBlocksMin + r.intn(townBlocksMax-townBlocksMin+1)
		cur := node{r.intn(ns), r.intn(na)}
		d := r.intn(4)
		path = []node{cur}
		used := map[[2]node]bool{}
		for legs := 0; len(path)-1 < target; legs++ {
			dirs := []int{d}
			if legs > 0 {
				dirs = []int{(d + 1) % 4, (d + 3) % 4}
				if r.intn(2) == 0 {
					dirs[0], dirs[1] = dirs[1], dirs[0]
				}
			}
			ok := false
			for _, nd := range dirs {
				n := min(1+r.intn(3), target-(len(path)-1))
				var leg []node
				p := cur
				for range n {
					q := node{p.i + steps[nd].i, p.j + steps[nd].j}
					if q.i < 0 || q.i >= ns || q.j < 0 || q.j >= na || used[[2]node{p, q}] || used[[2]node{q, p}] {
						break
					}
					leg = append(leg, q)
					p = q
				}
				if len(leg) == 0 {
					continue
				}
				prev := cur
				for _, q := range leg {
					used[[2]node{prev, q}] = true
					prev = q
				}
				path = append(path, leg...)
				cur, d, ok = prev, nd, true
				break
			}
			if !ok {
				break
			}
		}
		if len(path)-1 >= townBlocksMin {
			break
		}
	}

	var pts []vec
	var speeds []float64
	turnAt := func(k int) bool { // the drive starts, ends or turns at path[k]
		if k == 0 || k == len(path)-1 {
			return true
		}
		a, b, c := path[k-1], path[k], path[k+1]
		return b.i-a.i != c.i-b.i || b.j-a.j != c.j-b.j
	}
	for k := 0; k+1 < len(path); k++ {
		a, b := l.nodes[path[k].i][path[k].j], l.nodes[path[k+1].i][path[k+1].j]
		lenM := b.sub(a).len()
		pts = append(pts, a)
		if turnAt(k) {
			pts = append(pts, a.lerp(b, turnOutM/lenM))
			speeds = append(speeds, speed0(r, townSlowMinMps, townSlowMaxMps))
		}
		speeds = append(speeds, speed0(r, townCruiseMinMps, townCruiseMaxMps))
		if turnAt(k + 1) {
			pts = append(pts, a.lerp(b, 1-turnInM/lenM))
			speeds = append(speeds, speed0(r, townSlowMinMps, townSlowMaxMps))
		}
	}
	last := path[len(path)-1]
	pts = append(pts, l.nodes[last.i][last.j])
	return Tour{
		Name: DriveTown,
		Description: "through the town centre at 20–50 km/h, turning at junctions: " +
			"a slow 20 m after each turn and 30 m before the next",
		Points:    lonLats(pts),
		SpeedsMps: speeds,
	}
}

// ringDrive goes three quarters of the way round the ring from where a main road meets it, at
// 50–54 km/h on the stretches beside a junction and 59–70 km/h elsewhere.
func ringDrive(seed uint64, l *layout) Tour {
	r := newRNG(seed, "drive/ring")
	start, step := l.spokes[r.intn(4)], 1
	if r.intn(2) == 0 {
		step = ringVertices - 1 // anticlockwise on the map
	}
	junction := map[int]bool{l.fastAt: true}
	for _, k := range l.spokes {
		junction[k] = true
	}
	var pts []vec
	var speeds []float64
	k := start
	for range ringDriveSegments {
		next := (k + step) % ringVertices
		pts = append(pts, l.ring[k])
		if junction[k] || junction[next] {
			speeds = append(speeds, speed0(r, ringNearMinMps, ringNearMaxMps))
		} else {
			speeds = append(speeds, speed0(r, ringFreeMinMps, ringFreeMaxMps))
		}
		k = next
	}
	pts = append(pts, l.ring[k])
	return Tour{
		Name:        DriveRing,
		Description: "three quarters of the way round the Gorse Ring at 50–70 km/h, slower beside its junctions",
		Points:      lonLats(pts),
		SpeedsMps:   speeds,
	}
}

// expresswayDrive joins the expressway at the ring, runs out along it at 100–120 km/h, eases to
// 100 km/h and takes the sharp exit onto the slip road, slowing from 54 to 34 km/h.
func expresswayDrive(seed uint64, l *layout) Tour {
	r := newRNG(seed, "drive/expressway")
	pts := append([]vec(nil), l.fast[:l.exitAt+1]...)
	speeds := make([]float64, 0, l.exitAt+len(slipSpeedsMps))
	for m := range l.exitAt {
		if m == 0 || m == l.exitAt-1 {
			speeds = append(speeds, fastEntryMps)
		} else {
			speeds = append(speeds, speed0(r, fastCruiseMinMps, fastCruiseMaxMps))
		}
	}
	pts = append(pts, l.slip[1:]...)
	speeds = append(speeds, slipSpeedsMps...)
	return Tour{
		Name: DriveExpressway,
		Description: "out along the Tarrow Expressway at 100–120 km/h, easing to 100 km/h, then the sharp " +
			"exit onto the Tarrow Slip, slowing from 54 to 34 km/h",
		Points:    lonLats(pts),
		SpeedsMps: speeds,
	}
}

// lonLats converts local points to [lon, lat] degrees.
func lonLats(ps []vec) []orb.Point {
	out := make([]orb.Point, len(ps))
	for i, p := range ps {
		out[i] = lonLat(p)
	}
	return out
}
