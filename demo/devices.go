package demo

import "github.com/viewspec/viewspec/viewport"

// DeviceProfile is a screen the scenario runs on: a name, the rule set meant for it (a RuleSet's Name) and
// the viewport device (logical pixels, y down; the user's arrow in the lower part of the screen, below
// the centre, so that most of the screen shows the road ahead).
type DeviceProfile struct {
	Name  string
	Rules string
	viewport.Device
}

// The devices' names.
const (
	DevicePhonePortrait  = "phone-portrait"
	DevicePhoneLandscape = "phone-landscape"
	DeviceInCar          = "incar-wide"
)

// newDevices returns the three devices.
//
//   - phone-portrait: 390 × 844 px, 45° vertical field of view, the user at 3/4 of the height; a
//     60 px status and instruction bar at the top, 120 px of controls at the bottom (the project's
//     default camera's device).
//   - phone-landscape: 844 × 390 px, 45°, the user at 3/4 of the height; 40 px at the top, 56 px at
//     the bottom.
//   - incar-wide: 1280 × 480 px, 40°; a 280 px turn-by-turn panel on the left and a 96 px bar of
//     controls at the bottom; the user at the middle of the clear area's width (39/64 of the screen)
//     and at 7/10 of the height, 48 px above the bar.
func newDevices() []DeviceProfile {
	portrait := viewport.NewDevice(390, 844, 45)
	portrait.AnchorY = 0.75
	portrait.InsetTopPx, portrait.InsetBottomPx = 60, 120

	landscape := viewport.NewDevice(844, 390, 45)
	landscape.AnchorY = 0.75
	landscape.InsetTopPx, landscape.InsetBottomPx = 40, 56

	car := viewport.NewDevice(1280, 480, 40)
	car.InsetLeftPx, car.InsetBottomPx = 280, 96
	car.AnchorX = (280 + (1280-280)/2.0) / 1280 // 0.609375, exactly 39/64
	car.AnchorY = 0.7

	return []DeviceProfile{
		{Name: DevicePhonePortrait, Rules: RulesPhone, Device: portrait},
		{Name: DevicePhoneLandscape, Rules: RulesPhone, Device: landscape},
		{Name: DeviceInCar, Rules: RulesInCar, Device: car},
	}
}
