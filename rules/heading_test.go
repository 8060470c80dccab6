package rules

import (
	"math"
	"strconv"
	"strings"
	"testing"
)

// A target within OppositeWithinDeg of exactly opposite turns clockwise, so
// that two implementations whose U-turn headings differ in the last bits
// turn the same way (SPEC §3). Before, a target 180° − 1 ulp away turned
// counter-clockwise, and the reference did so on A→B→A routes where an
// implementation of the text, computing exactly 180°, turned clockwise.
func TestTurnNearOppositeIsClockwise(t *testing.T) {
	below180 := math.Nextafter(180, 0)
	for _, c := range []struct {
		desc           string
		cur, tgt, step float64
		want           float64
	}{
		{"exactly opposite", 0, 180, 30, 30},
		{"one ulp short of opposite, counter-clockwise side", 180, math.Nextafter(360, 0), 30, 210},
		{"one ulp short of opposite, clockwise side", 0, below180, 30, 30},
		{"1e-12° short of opposite, the other way", 10, 190 + 1e-12, 30, 40},
		{"1e-8° past opposite: within the band, clockwise", 10, 190 + 1e-8 - 360, 30, 40},
		{"1e-5° short of opposite: the short way (counter-clockwise)", 10, 190 + 1e-5, 30, 340},
	} {
		if got := TurnHeadingDeg(c.cur, c.tgt, c.step); math.Abs(got-c.want) > 1e-9 {
			t.Errorf("%s: TurnHeadingDeg(%v, %v, %v) = %v, want %v", c.desc, c.cur, c.tgt, c.step, got, c.want)
		}
	}
}

// TurnMarginDeg is how far the direction is from flipping: 0 on the knife
// edge 180° − OppositeWithinDeg, large for an ordinary turn, +Inf when the
// step reaches the target (hand-computed).
func TestTurnMarginDeg(t *testing.T) {
	for _, c := range []struct {
		cur, tgt, step, want float64
	}{
		{0, 90, 30, 90 - OppositeWithinDeg},
		{0, 180, 30, OppositeWithinDeg},
		{0, 180 - OppositeWithinDeg, 30, 0},
		{0, 20, 30, math.Inf(1)},
		{0, 20, 0, math.Inf(1)},
		// Hand-computed: d = target − current, the short way round.
		{90, 270, 10, OppositeWithinDeg},      // d = 180
		{270, 90, 10, OppositeWithinDeg},      // d = −180, read as 180
		{350, 10, 5, 160 - OppositeWithinDeg}, // d = 20 across north
		{0, 10, 10, math.Inf(1)},              // the step reaches the target exactly
		{100, 10, 30, 90 - OppositeWithinDeg}, // d = −90
	} {
		if got := TurnMarginDeg(c.cur, c.tgt, c.step); math.Abs(got-c.want) > 1e-12 && got != c.want {
			t.Errorf("TurnMarginDeg(%v, %v, %v) = %v, want %v", c.cur, c.tgt, c.step, got, c.want)
		}
	}
}

// A kind outside the named ones prints its number: 0 and one past the last.
func TestProblemKindOutOfRange(t *testing.T) {
	for _, k := range []ProblemKind{0, ProblemKind(len(kindNames))} {
		if got, want := k.String(), "kind("+strconv.Itoa(int(k))+")"; got != want {
			t.Errorf("ProblemKind(%d).String() = %q, want %q", int(k), got, want)
		}
	}
}

// A position writes the file, then the line and column only when known,
// then ": "; nothing when neither file nor line is known.
func TestWritePos(t *testing.T) {
	for _, c := range []struct {
		file      string
		line, col int
		want      string
	}{{"a.yaml", 0, 0, "a.yaml: "}, {"a.yaml", 3, 0, "a.yaml:3: "}, {"", 3, 4, "3:4: "}, {"", 0, 0, ""}} {
		var b strings.Builder
		writePos(&b, c.file, c.line, c.col)
		if got := b.String(); got != c.want {
			t.Errorf("writePos(%q, %d, %d) = %q, want %q", c.file, c.line, c.col, got, c.want)
		}
	}
}
