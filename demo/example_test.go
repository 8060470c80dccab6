package demo_test

import (
	"fmt"
	"slices"

	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/timeline"
)

// The default town: its counts, and each drive's length (WGS84 geodesic), duration at its speeds and
// speed range.
func ExampleDefault() {
	s := demo.Default()
	fmt.Printf("Port Wren: %d streets, %d businesses, %d drives, %d devices, %d rule sets\n",
		len(s.Streets), len(s.Businesses), len(s.Drives), len(s.Devices), len(s.RuleSets))
	for _, d := range s.Drives {
		r, err := d.Route()
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("%-10s %4.0f m %3.0f s %5.1f–%5.1f km/h, turns of 60° or more: %d\n", d.Name, r.LengthM(),
			r.DurationS(), slices.Min(d.SpeedsMps)*3.6, slices.Max(d.SpeedsMps)*3.6, len(r.Turns(60)))
	}
	// Output:
	// Port Wren: 18 streets, 101 businesses, 3 drives, 3 devices, 2 rule sets
	// town       1699 m 182 s  20.9– 49.0 km/h, turns of 60° or more: 6
	// ring       3835 m 226 s  50.8– 69.8 km/h, turns of 60° or more: 0
	// expressway 3136 m 115 s  34.2–119.2 km/h, turns of 60° or more: 1
}

// The drive timeline (SPEC §5) of the town drive on the portrait phone with the phone rules: how many
// businesses are first shown within 5 s, within 35 s, by the 120 s horizon, or never.
func ExampleScenario_TimelineDrive() {
	s := demo.Default()
	d, _ := s.Drive(demo.DriveTown)
	dev, _ := s.Device(demo.DevicePhonePortrait)
	vd, err := s.TimelineDrive(d, dev)
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := timeline.Compute(&vd, s.Markers())
	if err != nil {
		fmt.Println(err)
		return
	}
	n := map[timeline.Bucket]int{}
	for _, m := range res {
		n[m.Bucket]++
	}
	fmt.Printf("early %d, mid %d, late %d, never %d\n", n[timeline.Early], n[timeline.Mid], n[timeline.Late], n[timeline.Never])
	// Output:
	// early 6, mid 7, late 18, never 70
}
