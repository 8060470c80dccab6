package demo_test

import (
	"testing"

	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/timeline"
)

// buckets runs the drive timeline (SPEC §5, defaults of timeline.NewDrive) of drive on dev and counts
// the markers per bucket, indexed by timeline.Bucket (Never, Early, Mid, Late).
func buckets(t *testing.T, s *demo.Scenario, drive, dev string) [4]int {
	t.Helper()
	d, _ := s.Drive(drive)
	dv, _ := s.Device(dev)
	vd, err := s.TimelineDrive(d, dv)
	if err != nil {
		t.Fatal(err)
	}
	res, err := timeline.Compute(&vd, s.Markers())
	if err != nil {
		t.Fatalf("%s on %s: Timeline: %v", drive, dev, err)
	}
	var n [4]int
	for _, m := range res {
		n[m.Bucket]++
	}
	return n
}

// With the phone rules on the portrait phone, every drive has something to see: markers shown within
// 5 s, markers first shown later, and markers never shown in the 120 s horizon.
func TestTimelineHasSomethingToSee(t *testing.T) {
	for _, seed := range testSeeds {
		s := demo.New(seed)
		for _, d := range s.Drives {
			n := buckets(t, s, d.Name, demo.DevicePhonePortrait)
			if n[timeline.Early] == 0 || n[timeline.Mid]+n[timeline.Late] == 0 || n[timeline.Never] == 0 {
				t.Errorf("New(%#x) %s on the portrait phone: early %d, mid %d, late %d, never %d; want some early, some later, some never",
					seed, d.Name, n[timeline.Early], n[timeline.Mid], n[timeline.Late], n[timeline.Never])
			}
		}
	}
}

// Every drive runs on every device with its own rule set.
func TestTimelineEveryDevice(t *testing.T) {
	s := demo.Default()
	for _, d := range s.Drives {
		for _, dv := range s.Devices {
			n := buckets(t, s, d.Name, dv.Name)
			if n[timeline.Never] == len(s.Businesses) {
				t.Errorf("%s on %s: no marker ever shown", d.Name, dv.Name)
			}
		}
	}
}

func TestTimelineDriveErrors(t *testing.T) {
	s := demo.Default()
	d, _ := s.Drive(demo.DriveTown)
	dv, _ := s.Device(demo.DevicePhonePortrait)
	dv.Rules = "nowhere"
	if _, err := s.TimelineDrive(d, dv); err == nil {
		t.Error("TimelineDrive with an unknown rule set: no error")
	}
	dv, _ = s.Device(demo.DevicePhonePortrait)
	d.SpeedsMps = d.SpeedsMps[1:]
	if _, err := s.TimelineDrive(d, dv); err == nil {
		t.Error("TimelineDrive with a speed missing: no error")
	}
}
