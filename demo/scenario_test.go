package demo_test

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"testing"

	"github.com/viewspec/viewspec/demo"
)

// exports returns every file the scenario writes, concatenated, in WriteFiles' order.
func exports(t *testing.T, s *demo.Scenario) []byte {
	t.Helper()
	var all bytes.Buffer
	for _, f := range []func() ([]byte, error){s.StreetsGeoJSON, s.BusinessesGeoJSON,
		func() ([]byte, error) { return s.MarkersCSV(), nil }} {
		b, err := f()
		if err != nil {
			t.Fatal(err)
		}
		all.Write(b)
	}
	for _, d := range s.Drives {
		b, err := d.GeoJSON()
		if err != nil {
			t.Fatalf("drive %s: %v", d.Name, err)
		}
		all.Write(b)
	}
	return all.Bytes()
}

// testSeeds are the seeds the invariants are checked on: the default and a spread of others.
var testSeeds = []uint64{demo.DefaultSeed, 0, 1, 2, 3, 7, 42, 1 << 63, 0xffffffffffffffff, 0x9e3779b97f4a7c15}

func TestSameSeedSameBytes(t *testing.T) {
	for _, seed := range testSeeds {
		a, b := exports(t, demo.New(seed)), exports(t, demo.New(seed))
		if !bytes.Equal(a, b) {
			t.Errorf("New(%#x) twice: exports differ", seed)
		}
	}
	if !bytes.Equal(exports(t, demo.Default()), exports(t, demo.New(demo.DefaultSeed))) {
		t.Error("Default() differs from New(DefaultSeed)")
	}
}

func TestSeedsMakeDifferentTowns(t *testing.T) {
	seen := map[string]uint64{}
	for _, seed := range testSeeds {
		s := demo.New(seed)
		b, err := s.StreetsGeoJSON()
		if err != nil {
			t.Fatal(err)
		}
		k := string(b)
		if other, dup := seen[k]; dup {
			t.Errorf("seeds %#x and %#x make the same streets", other, seed)
		}
		seen[k] = seed
	}
}

// The default town's exports (streets, businesses, markers CSV, drives, in WriteFiles' order), pinned
// so that a change to the generator's output cannot pass unnoticed. The value is what this test
// printed when the generator was written; when the output changes on purpose, take the new value from
// the failure message and say why in the commit.
const defaultExportsSHA256 = "3ff143a627a2f2b4ef6ff109aaff37fa11e18506142dd80d7f9608caddc51d5f"

func TestDefaultTownPinned(t *testing.T) {
	sum := sha256.Sum256(exports(t, demo.Default()))
	if got := hex.EncodeToString(sum[:]); got != defaultExportsSHA256 {
		t.Errorf("SHA-256 of the default town's exports = %s, want %s (the generator's output changed)", got, defaultExportsSHA256)
	}
}

func TestCounts(t *testing.T) {
	for _, seed := range testSeeds {
		s := demo.New(seed)
		if n := len(s.Businesses); n < 50 || n > 200 {
			t.Errorf("New(%#x): %d businesses, want 50–200", seed, n)
		}
		if n := len(s.Drives); n < 3 {
			t.Errorf("New(%#x): %d drives, want ≥ 3", seed, n)
		}
		if n := len(s.Devices); n != 3 {
			t.Errorf("New(%#x): %d devices, want 3", seed, n)
		}
		if n := len(s.RuleSets); n != 2 {
			t.Errorf("New(%#x): %d rule sets, want 2", seed, n)
		}
		kinds := map[demo.StreetKind]int{}
		for _, st := range s.Streets {
			kinds[st.Kind]++
		}
		for k, want := range map[demo.StreetKind]int{demo.KindRing: 1, demo.KindExpressway: 1, demo.KindSlip: 1, demo.KindLane: 1} {
			if kinds[k] != want {
				t.Errorf("New(%#x): %d streets of kind %s, want %d", seed, kinds[k], k, want)
			}
		}
		if kinds[demo.KindAvenue] < 5 || kinds[demo.KindStreet] < 8 {
			t.Errorf("New(%#x): %d avenues and %d cross streets, want ≥ 5 and ≥ 8", seed, kinds[demo.KindAvenue], kinds[demo.KindStreet])
		}
	}
}

func TestLookups(t *testing.T) {
	s := demo.Default()
	for _, name := range []string{demo.DriveTown, demo.DriveRing, demo.DriveExpressway} {
		if d, ok := s.Drive(name); !ok || d.Name != name {
			t.Errorf("Drive(%q) = %q, %v", name, d.Name, ok)
		}
	}
	for _, name := range []string{demo.DevicePhonePortrait, demo.DevicePhoneLandscape, demo.DeviceInCar} {
		if d, ok := s.Device(name); !ok || d.Name != name {
			t.Errorf("Device(%q) = %q, %v", name, d.Name, ok)
		}
	}
	for _, name := range []string{demo.RulesPhone, demo.RulesInCar} {
		if r, ok := s.RuleSet(name); !ok || r.Name != name || r.Set == nil {
			t.Errorf("RuleSet(%q) = %q, %v", name, r.Name, ok)
		}
	}
	if _, ok := s.Drive("nowhere"); ok {
		t.Error(`Drive("nowhere") found`)
	}
	if _, ok := s.Device("nowhere"); ok {
		t.Error(`Device("nowhere") found`)
	}
	if _, ok := s.RuleSet("nowhere"); ok {
		t.Error(`RuleSet("nowhere") found`)
	}
}

// Default hands out a fresh town: changing one does not change the next.
func TestDefaultIsACopy(t *testing.T) {
	a := demo.Default()
	a.Businesses[0].Name = "changed"
	a.Drives[0].SpeedsMps[0] = 99
	a.RuleSets[0].Set.MaxZoom = 1
	b := demo.Default()
	if b.Businesses[0].Name == "changed" || b.Drives[0].SpeedsMps[0] == 99 || b.RuleSets[0].Set.MaxZoom == 1 {
		t.Error("a change to one Default() shows in the next")
	}
}

func BenchmarkNew(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		demo.New(demo.DefaultSeed)
	}
}
