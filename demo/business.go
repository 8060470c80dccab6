package demo

import (
	"fmt"
	"slices"

	"github.com/viewspec/viewspec/timeline"
)

// Business is one invented business of Port Wren: its marker (id "pw-001"…, position [lon, lat]
// WGS84 degrees rounded to 1e-7°, priority a whole number in [0, 10], higher first), its name, its
// category ("bakery", "pharmacy", "fuel", …) and the street it stands on. Every business stands
// 12–45 m to one side of its street (set back from the road's centre line), away from junctions.
type Business struct {
	timeline.Marker
	Name     string
	Category string
	Street   string
}

// Business placement, metres and counts.
const (
	townBusinessesMin, townBusinessesMax = 80, 130 // businesses in the town centre: [min, max)
	slotEndClearM                        = 25.0    // no slot nearer a junction than this along the street
	slotSpacingM                         = 30.0    // one slot per this much street (per side)
	slotJitterM                          = 4.0     // a slot's shift along the street
	townSetbackMinM, townSetbackMaxM     = 12.0, 26.0
	roadSetbackMinM, roadSetbackMaxM     = 25.0, 45.0 // by the ring and the expressway
	laneSetbackMinM, laneSetbackMaxM     = 15.0, 25.0
)

// slot is a place a business may stand: a point on a road's centre line and the side it would stand on.
type slot struct {
	road, seg int // the road and its segment
	at        vec // on the centre line
	side      vec // unit vector from the centre line toward the business
}

// placed is a business before it has an id.
type placed struct {
	at       vec
	category *category
	street   string
}

// newBusinesses draws the businesses of the town centre and the roads out of it.
func newBusinesses(seed uint64, l *layout, rs []road) []Business {
	r := newRNG(seed, "businesses")
	var ps []placed

	// The town centre: every avenue and cross street offers slots on both sides between its
	// junctions; a shuffled choice of them gets a business each, in street order.
	var slots []slot
	for k, rd := range rs {
		if rd.kind != KindAvenue && rd.kind != KindStreet {
			continue
		}
		for s := 0; s+1 < len(rd.pts); s++ {
			a, b := rd.pts[s], rd.pts[s+1]
			lenM := b.sub(a).len()
			if lenM < 2*slotEndClearM+slotSpacingM {
				continue // too short to hold a business clear of both junctions
			}
			n := int((lenM-2*slotEndClearM)/slotSpacingM) + 1
			side := b.sub(a).unit().left()
			for m := range n {
				along := slotEndClearM + (lenM-2*slotEndClearM)*(float64(m)+0.5)/float64(n)
				for _, sg := range []float64{1, -1} {
					slots = append(slots, slot{road: k, seg: s, at: a.lerp(b, along/lenM), side: side.mul(sg)})
				}
			}
		}
	}
	count := min(len(slots), townBusinessesMin+r.intn(townBusinessesMax-townBusinessesMin))
	order := make([]int, len(slots))
	for i := range order {
		order[i] = i
	}
	r.shuffle(len(order), func(i, j int) { order[i], order[j] = order[j], order[i] })
	chosen := make([]bool, len(slots))
	for _, i := range order[:count] {
		chosen[i] = true
	}
	townWeights := 0
	for _, c := range categories {
		townWeights += c.townShare
	}
	for i, sl := range slots {
		if !chosen[i] {
			continue
		}
		rd := rs[sl.road]
		d := rd.pts[sl.seg+1].sub(rd.pts[sl.seg]).unit()
		at := sl.at.add(d.mul(r.between(-slotJitterM, slotJitterM))).
			add(sl.side.mul(r.between(townSetbackMinM, townSetbackMaxM)))
		ps = append(ps, placed{at: at, category: weightedCategory(r, townWeights), street: rd.name})
	}

	// By the ring: a few businesses outside it, on stretches away from its junctions.
	ringRoad, fastRoad, laneRoad := roadOf(rs, KindRing), roadOf(rs, KindExpressway), roadOf(rs, KindLane)
	junction := map[int]bool{l.fastAt: true}
	for _, k := range l.spokes {
		junction[k] = true
	}
	var ringSegs []int
	for k := range ringVertices {
		if !junction[k] && !junction[(k+1)%ringVertices] {
			ringSegs = append(ringSegs, k)
		}
	}
	r.shuffle(len(ringSegs), func(i, j int) { ringSegs[i], ringSegs[j] = ringSegs[j], ringSegs[i] })
	ringSegs = ringSegs[:4+r.intn(3)]
	slices.Sort(ringSegs)
	ringKinds := shuffled(r, []string{"fuel", "garage", "hotel", "café", "grocer", "restaurant"})
	for m, k := range ringSegs {
		a, b := l.ring[k], l.ring[(k+1)%ringVertices]
		mid := a.lerp(b, r.between(0.4, 0.6))
		out := b.sub(a).unit().left() // at right angles to the ring, away from the square
		if d := mid.sub(l.centre); out.e*d.e+out.n*d.n < 0 {
			out = out.mul(-1)
		}
		ps = append(ps, placed{at: mid.add(out.mul(r.between(roadSetbackMinM, roadSetbackMaxM))),
			category: categoryByName(ringKinds[m%len(ringKinds)]), street: ringRoad.name})
	}

	// By the expressway: a filling station just out of town, a service area halfway, and an inn
	// before the exit on the side away from the slip road.
	onFast := func(seg int, t, side float64, cat string) {
		a, b := l.fast[seg], l.fast[seg+1]
		n := b.sub(a).unit().left().mul(side)
		ps = append(ps, placed{at: a.lerp(b, t).add(n.mul(r.between(roadSetbackMinM, roadSetbackMaxM))),
			category: categoryByName(cat), street: fastRoad.name})
	}
	onFast(1, r.between(0.3, 0.6), r.sign(), "fuel")
	svc, svcSide := l.exitAt/2, r.sign()
	for m, cat := range []string{"fuel", "café", "restaurant"} {
		onFast(svc, 0.44+0.06*float64(m), svcSide, cat)
	}
	// The slip road leaves to the right when slipSg = +1, so the inn stands on the left (+1), and the
	// other way round.
	onFast(l.exitAt-1, r.between(0.35, 0.55), l.slipSg, "hotel")

	// Along the lane: the hamlet.
	for m, cat := range shuffled(r, []string{"farm shop", "fuel", "café", "garage"})[:3] {
		a, b := l.lane[m], l.lane[m+1]
		n := b.sub(a).unit().left().mul(r.sign())
		ps = append(ps, placed{at: a.lerp(b, r.between(0.4, 0.7)).add(n.mul(r.between(laneSetbackMinM, laneSetbackMaxM))),
			category: categoryByName(cat), street: laneRoad.name})
	}

	// Ids in order, names drawn until unique, priorities from the category ± 1.
	out := make([]Business, len(ps))
	used := map[string]bool{}
	for i, p := range ps {
		prio := min(10, max(0, p.category.priority+r.intn(3)-1))
		out[i] = Business{
			Marker:   timeline.Marker{ID: fmt.Sprintf("pw-%03d", i+1), Point: lonLat(p.at), Priority: float64(prio)},
			Name:     uniqueName(r, p.category, p.street, used),
			Category: p.category.name,
			Street:   p.street,
		}
	}
	return out
}

// weightedCategory draws a town-centre category by its townShare.
func weightedCategory(r *rng, total int) *category {
	x := r.intn(total)
	for i := range categories {
		if x < categories[i].townShare {
			return &categories[i]
		}
		x -= categories[i].townShare
	}
	panic("demo: category weights do not add up")
}

// uniqueName draws a name for a business of category c until it is one no other business has:
// "<place> <noun>" or, where the category allows, "<family>'s <noun>". After 50 draws that all clash
// it takes the last one with ", <street>" added, and a number after that if even this clashes.
func uniqueName(r *rng, c *category, street string, used map[string]bool) string {
	var name string
	for try := 0; try < 50; try++ {
		if c.family && r.intn(2) == 0 {
			name = r.pick(familyNames) + "'s " + r.pick(c.nouns)
		} else {
			name = r.pick(placeWords) + " " + r.pick(c.nouns)
		}
		if !used[name] {
			used[name] = true
			return name
		}
	}
	base := name + ", " + street
	name = base
	for k := 2; used[name]; k++ {
		name = fmt.Sprintf("%s %d", base, k)
	}
	used[name] = true
	return name
}

// roadOf returns the first road of kind k.
func roadOf(rs []road, k StreetKind) road {
	for _, rd := range rs {
		if rd.kind == k {
			return rd
		}
	}
	panic("demo: no road of kind " + string(k))
}
