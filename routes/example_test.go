package routes_test

import (
	"fmt"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/routes"
)

// A drive of three streets at city speeds; the user has just started, and two markers: a café
// beside the second street, and a shop beyond the end of the route. (The lengths agree with
// GeographicLib's GeodSolve: 760.31 m, 523.00 m and 821.32 m; the shop is 272.42 m from the end.)
func ExampleRoute_Metrics() {
	r, err := routes.New([]orb.Point{
		{13.3777, 52.5163}, // [lon, lat]
		{13.3889, 52.5163},
		{13.3889, 52.5210},
		{13.4010, 52.5210},
	}, []float64{8.3, 13.9, 8.3}) // m/s, one per segment
	if err != nil {
		fmt.Println(err)
		return
	}
	user := r.Snap(orb.Point{13.3790, 52.51628})
	fmt.Printf("user: %.1f m along, %.1f m off the road\n", user.AlongM, user.DistM)
	for _, m := range []struct {
		name string
		at   orb.Point
	}{{"cafe", orb.Point{13.3893, 52.5185}}, {"shop", orb.Point{13.4050, 52.5212}}} {
		x := r.Metrics(user, m.at)
		if x.Ahead {
			fmt.Printf("%s: %.1f m from the route, %.1f m ahead, %.1f s, %v\n", m.name, x.RouteDistM, x.AlongM, x.EtaS, x.Side)
		} else {
			fmt.Printf("%s: %.1f m from the route's end, not ahead, %v\n", m.name, x.RouteDistM, x.Side)
		}
	}
	// Output:
	// user: 88.3 m along, 2.2 m off the road
	// cafe: 27.2 m from the route, 916.9 m ahead, 98.6 s, right
	// shop: 272.4 m from the route's end, not ahead, left
}

// Los Angeles to New York airports: GeodSolve -i gives 3982941.336 m.
func ExampleGeodesicDistM() {
	lax := orb.Point{-118.408, 33.9425}
	jfk := orb.Point{-73.7789, 40.6397}
	fmt.Printf("%.3f km\n", routes.GeodesicDistM(lax, jfk)/1000)
	// Output: 3982.941 km
}

// Motion is exact in time: a tick loop asks for the position after k·tick seconds.
func ExampleRoute_AlongAfterS() {
	r, _ := routes.New([]orb.Point{{0, 0}, {0.009, 0}, {0.018, 0}}, []float64{10, 20})
	for _, t := range []float64{0, 50, 100, 120, 1000} {
		fmt.Printf("t=%4.0f s: %.1f m\n", t, r.AlongAfterS(0, t))
	}
	// Output:
	// t=   0 s: 0.0 m
	// t=  50 s: 500.0 m
	// t= 100 s: 1000.0 m
	// t= 120 s: 1398.1 m
	// t=1000 s: 2003.8 m
}

// A walker steps a drive tick by tick without searching for its segment
// afresh, with the Route methods' answers.
func ExampleWalker() {
	r, _ := routes.New([]orb.Point{{0, 0}, {0.009, 0}, {0.009, 0.009}}, []float64{10, 20})
	turns := r.Turns(30)
	w := r.Walk(0)
	for k := 0; k <= 4; k++ {
		along := w.AlongAfterS(float64(k) * 40)
		toTurn, ok := w.NextTurnDistM(turns, along)
		fmt.Printf("t=%3d s: %6.1f m, segment %d, turn ahead %v %.1f m\n", k*40, along, w.SegmentAt(along), ok, toTurn)
	}
	// Output:
	// t=  0 s:    0.0 m, segment 0, turn ahead true 1001.9 m
	// t= 40 s:  400.0 m, segment 0, turn ahead true 601.9 m
	// t= 80 s:  800.0 m, segment 0, turn ahead true 201.9 m
	// t=120 s: 1398.1 m, segment 1, turn ahead false 0.0 m
	// t=160 s: 1997.0 m, segment 1, turn ahead false 0.0 m
}

func ExampleRoute_Turns() {
	r, _ := routes.New([]orb.Point{{0, 0}, {0.01, 0}, {0.01, 0.01}, {0.011, 0.02}}, []float64{10})
	turns := r.Turns(30)
	fmt.Printf("turns at %.1f m\n", turns)
	d, ok := routes.NextTurnDistM(turns, 500)
	fmt.Printf("next turn in %.1f m (%v)\n", d, ok)
	_, ok = routes.NextTurnDistM(turns, 1200)
	fmt.Println("after it:", ok)
	// Output:
	// turns at [1113.2] m
	// next turn in 613.2 m (true)
	// after it: false
}

func ExampleNew_invalid() {
	_, err := routes.New([]orb.Point{{13.4, 52.5}, {13.4, 91}}, []float64{10})
	fmt.Println(err)
	// Output: points[1].lat = 91: latitude must be finite and within [-90, 90]
}
