package demo

import (
	"fmt"

	"github.com/viewspec/viewspec/timeline"
)

// DefaultSeed is the seed of the default town, Default(). Its bytes spell "PortWren".
const DefaultSeed uint64 = 0x506f72745772656e

// Scenario is the whole invented world the demo runs on: Port Wren's streets, its businesses, the
// drives through it, the devices and the rule sets. Everything in it follows from Seed.
type Scenario struct {
	Seed       uint64
	Streets    []Street        // avenues, cross streets, the ring, the expressway, its slip road, the lane
	Businesses []Business      // ids pw-001… in street order
	Drives     []Tour          // town, ring, expressway
	Devices    []DeviceProfile // phone-portrait, phone-landscape, incar-wide
	RuleSets   []RuleSet       // phone, incar
}

// Default returns the default town, New(DefaultSeed): a fresh copy on every call, so callers may
// change it freely.
func Default() *Scenario { return New(DefaultSeed) }

// New generates the town for seed. The same seed gives the same town, byte for byte in every export
// (see the package documentation, "Determinism"). Generation takes a couple of milliseconds, a third
// of it parsing the two rule files.
func New(seed uint64) *Scenario {
	l := newLayout(seed)
	rs := l.roads()
	return &Scenario{
		Seed:       seed,
		Streets:    streetsOf(rs),
		Businesses: newBusinesses(seed, l, rs),
		Drives:     newDrives(seed, l),
		Devices:    newDevices(),
		RuleSets:   newRuleSets(),
	}
}

// Markers returns the businesses' markers (id, [lon, lat] degrees, priority) in the order of
// Businesses.
func (s *Scenario) Markers() []timeline.Marker {
	out := make([]timeline.Marker, len(s.Businesses))
	for i, b := range s.Businesses {
		out[i] = b.Marker
	}
	return out
}

// Drive returns the drive called name, and false when there is none.
func (s *Scenario) Drive(name string) (Tour, bool) {
	for _, d := range s.Drives {
		if d.Name == name {
			return d, true
		}
	}
	return Tour{}, false
}

// Device returns the device called name, and false when there is none.
func (s *Scenario) Device(name string) (DeviceProfile, bool) {
	for _, d := range s.Devices {
		if d.Name == name {
			return d, true
		}
	}
	return DeviceProfile{}, false
}

// RuleSet returns the rule set called name, and false when there is none.
func (s *Scenario) RuleSet(name string) (RuleSet, bool) {
	for _, r := range s.RuleSets {
		if r.Name == name {
			return r, true
		}
	}
	return RuleSet{}, false
}

// TimelineDrive returns the timeline input (SPEC §5) for drive d on device dev with dev's rule set,
// from the drive's start and with the defaults of timeline.NewDrive: a 120 s horizon, 0.25 s ticks,
// 4 markers at once, buckets at 5 and 35 s. The error is the route's (routes.New) or an unknown rule
// set.
func (s *Scenario) TimelineDrive(d Tour, dev DeviceProfile) (timeline.Drive, error) {
	rt, err := d.Route()
	if err != nil {
		return timeline.Drive{}, fmt.Errorf("drive %s: %w", d.Name, err)
	}
	rs, ok := s.RuleSet(dev.Rules)
	if !ok {
		return timeline.Drive{}, fmt.Errorf("device %s: no rule set %q", dev.Name, dev.Rules)
	}
	return timeline.NewDrive(rt, 0, dev.Device, rs.Set), nil
}
