package main

import (
	"bytes"
	"encoding/xml"
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// renderFiles are the inputs of the render tests: a drive north-east
// through Port Wren at 15 m/s, markers along it, a two-band rule set, a
// second one and a car screen.
var renderFiles = map[string]string{
	"route.geojson": `{"type":"Feature","properties":{"speed_mps":15},"geometry":{"type":"LineString",
"coordinates":[[-31.1720,44.9300],[-31.1650,44.9350],[-31.1550,44.9355]]}}`,
	"route-nospeed.geojson": `{"type":"LineString","coordinates":[[-31.1720,44.9300],[-31.1650,44.9350]]}`,
	"markers.csv": `id,lat,lon,priority
dock,44.9312,-31.1702,2
kiosk,44.9330,-31.1680,1
mill,44.9352,-31.1600,3
tower,44.9500,-31.2000,0
`,
	"rules.yaml": `bands:
  - {below_kmh: 30, zoom: 17.5, pitch_deg: 45}
  - {zoom: 16, pitch_deg: 55}
hysteresis_kmh: 4
max_zoom_rate_per_s: 0.5
max_pitch_rate_deg_per_s: 10
turn: {within_m: 150, min_angle_deg: 30, zoom: 17.5}
min_zoom: 12
max_zoom: 19
max_turn_rate_deg_per_s: 45
`,
	"rules2.yaml": `bands:
  - {zoom: 15, pitch_deg: 60}
hysteresis_kmh: 0
max_zoom_rate_per_s: 1
max_pitch_rate_deg_per_s: 20
turn: {within_m: 0, min_angle_deg: 30, zoom: 15}
min_zoom: 12
max_zoom: 19
max_turn_rate_deg_per_s: 90
`,
	"car.json": `{"width_px": 1280, "height_px": 480, "fov_y_deg": 40, "anchor_y": 0.8}`,
}

// renderDir writes renderFiles to a temporary folder.
func renderDir(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	for name, body := range renderFiles {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

// runRender runs the render command with args and returns its output.
func runRender(t *testing.T, args ...string) (string, error) {
	t.Helper()
	cmd := newRenderCmd()
	var out bytes.Buffer
	cmd.SetArgs(args)
	cmd.SetOut(&out)
	cmd.SetErr(io.Discard)
	cmd.SetIn(strings.NewReader(""))
	err := cmd.Execute()
	return out.String(), err
}

// wellFormed reports whether b parses as XML (the pictures and pages are
// written to).
func wellFormed(b []byte) error {
	dec := xml.NewDecoder(bytes.NewReader(b))
	for {
		_, err := dec.Token()
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return err
		}
	}
}

func TestRenderCameraCommand(t *testing.T) {
	dir := renderDir(t)
	out := filepath.Join(dir, "camera.svg")
	stdout, err := runRender(t, "camera", "--route", filepath.Join(dir, "route-nospeed.geojson"),
		"--markers", filepath.Join(dir, "markers.csv"), "--pitch", "55", "-o", out)
	if err != nil {
		t.Fatal(err)
	}
	if stdout != "" {
		t.Errorf("with -o, stdout got %q", stdout)
	}
	svg, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if err := wellFormed(svg); err != nil {
		t.Fatalf("camera.svg: %v", err)
	}
	for _, want := range []string{`id="footprint"`, `id="legend"`, `id="scale-bar"`, `data-id="dock"`, "pitch 55°"} {
		if !bytes.Contains(svg, []byte(want)) {
			t.Errorf("camera.svg lacks %s", want)
		}
	}
	// No temporary files are left beside the output.
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasSuffix(e.Name(), ".tmp") {
			t.Errorf("left behind %s", e.Name())
		}
	}

	// Without -o the picture goes to stdout; the default camera needs no
	// flags.
	stdout, err = runRender(t, "camera")
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(stdout, "<?xml") || wellFormed([]byte(stdout)) != nil {
		t.Errorf("stdout is not an SVG picture: %.80q", stdout)
	}
}

func TestRenderDriveCommand(t *testing.T) {
	dir := renderDir(t)
	in := func(name string) string { return filepath.Join(dir, name) }
	out := in("drive.html")
	_, err := runRender(t, "drive", "--route", in("route.geojson"), "--markers", in("markers.csv"),
		"--rules", in("rules.yaml"), "--rules2", in("rules2.yaml"), "--device", in("car.json"),
		"--start-along-m", "50", "--horizon-s", "60", "-o", out)
	if err != nil {
		t.Fatal(err)
	}
	page, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if err := wellFormed(page); err != nil {
		t.Fatalf("drive.html: %v", err)
	}
	for _, want := range []string{`<input type="range" id="time"`, `id="shown-count"`, `id="time-s"`, `id="recording"`,
		`data-name="rules.yaml"`, `data-name="rules2.yaml"`, `id="buckets-chart"`, `data-id="mill"`} {
		if !bytes.Contains(page, []byte(want)) {
			t.Errorf("drive.html lacks %s", want)
		}
	}
	if bytes.Contains(page, []byte("http://")) || bytes.Contains(page, []byte("https://")) {
		t.Error("drive.html refers to the network")
	}
	if !bytes.Contains(page, []byte(`max="240"`)) {
		t.Error("a 60 s drive at 0.25 s ticks should give the slider 240 steps")
	}
}

func TestRenderCommandErrors(t *testing.T) {
	dir := renderDir(t)
	in := func(name string) string { return filepath.Join(dir, name) }
	for _, c := range []struct {
		name string
		args []string
		want string
	}{
		{"drive without --route", []string{"drive", "--markers", in("markers.csv"), "--rules", in("rules.yaml")}, "--route"},
		{"drive without --markers", []string{"drive", "--route", in("route.geojson"), "--rules", in("rules.yaml")}, "--markers"},
		{"drive without --rules", []string{"drive", "--route", in("route.geojson"), "--markers", in("markers.csv")}, "--rules"},
		{"drive, bad second rules", []string{"drive", "--route", in("route.geojson"), "--markers", in("markers.csv"),
			"--rules", in("rules.yaml"), "--rules2", in("nofile.yaml")}, "nofile.yaml"},
		{"drive, tick not dividing", []string{"drive", "--route", in("route.geojson"), "--markers", in("markers.csv"),
			"--rules", in("rules.yaml"), "--tick-s", "0.7"}, "tick_s"},
		{"drive, user and start", []string{"drive", "--route", in("route.geojson"), "--markers", in("markers.csv"),
			"--rules", in("rules.yaml"), "--user", "44.93,-31.17", "--start-along-m", "3"}, "not both"},
		{"camera, bad pitch", []string{"camera", "--pitch", "95"}, "pitch_deg"},
		{"camera, missing markers file", []string{"camera", "--markers", in("none.csv")}, "none.csv"},
		{"camera, wrapped", []string{"camera", "--zoom", "0.5", "--width", "2000"}, "wraps"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := runRender(t, c.args...)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want one naming %q", err, c.want)
			}
			var ee *exitError
			if !errors.As(err, &ee) || ee.code != 2 {
				t.Errorf("error %v: want exit code 2 for unusable input", err)
			}
		})
	}
}
