package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/geofile"
	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

func newProjectCmd() *cobra.Command {
	var cf cameraFlags
	var of outputFlags
	var pointArgs []string
	var pointsFile string
	cmd := &cobra.Command{
		Use:   "project",
		Short: "Print where ground points land on the screen, and whether they are in view",
		Long: `project prints each point's pixel (origin top-left, y down), its depth and
whether it is in view, with the decision margin: the signed distance in pixels
to the nearest clear-area edge or far row, positive inside. Points come from
--point LAT,LON (repeatable) and --points FILE, a markers file as metrics
and timeline read it: CSV id,lat,lon[,priority] with an optional header
line (# for comments), or GeoJSON points with properties.id; the table and
GeoJSON carry the ids. Without either, the user's own position is projected.`,
		Example: `  viewspec project --point 44.9330,-31.1690 --point 44.9300,-31.1720
  viewspec project --camera cam.json --points shops.csv --json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if cf.file == "-" && pointsFile == "-" {
				return &exitError{2, errors.New("--camera and --points cannot both read stdin")}
			}
			v, err := cf.view(cmd)
			if err != nil {
				return err
			}
			pts, err := readPoints(cmd, pointArgs, pointsFile)
			if err != nil {
				return &exitError{2, err}
			}
			if len(pts) == 0 {
				pts = []timeline.Marker{{Point: v.Camera().User()}}
			}
			out := cmd.OutOrStdout()
			switch {
			case of.json:
				return writeJSON(out, projectJSON(&v, pts))
			case of.geojson:
				return writeJSON(out, projectGeoJSON(&v, pts))
			}
			return printProject(out, &v, pts)
		},
	}
	cf.register(cmd)
	cmd.Flags().StringArrayVar(&pointArgs, "point", nil, "a ground point `LAT,LON` in WGS84 degrees (repeatable)")
	cmd.Flags().StringVar(&pointsFile, "points", "", "read points from a markers `FILE` (- for stdin): CSV id,lat,lon[,priority] or GeoJSON points")
	cmd.Flags().BoolVar(&of.json, "json", false, "print the wire answer (SPEC §6) with the request, as JSON")
	cmd.Flags().BoolVar(&of.geojson, "geojson", false, "print the points as RFC 7946 features with their screen answers")
	cmd.MarkFlagsMutuallyExclusive("json", "geojson")
	return cmd
}

// parseLatLon reads "LAT,LON" in degrees, checking ranges.
func parseLatLon(s string) (orb.Point, error) {
	a, b, ok := strings.Cut(s, ",")
	if !ok {
		return orb.Point{}, fmt.Errorf("%q: want LAT,LON", s)
	}
	lat, err := strconv.ParseFloat(strings.TrimSpace(a), 64)
	if err != nil {
		return orb.Point{}, fmt.Errorf("%q: latitude: %v", s, err)
	}
	lon, err := strconv.ParseFloat(strings.TrimSpace(b), 64)
	if err != nil {
		return orb.Point{}, fmt.Errorf("%q: longitude: %v", s, err)
	}
	if !(lat >= -90 && lat <= 90) {
		return orb.Point{}, fmt.Errorf("%q: lat = %v: latitude must be within [-90, 90]", s, lat)
	}
	if !(lon >= -180 && lon <= 180) {
		return orb.Point{}, fmt.Errorf("%q: lon = %v: longitude must be within [-180, 180]", s, lon)
	}
	return orb.Point{lon, lat}, nil
}

// readPoints returns the points of --point (no id) and then those of the
// markers file --points (with their ids).
func readPoints(cmd *cobra.Command, args []string, file string) ([]timeline.Marker, error) {
	var pts []timeline.Marker
	for _, a := range args {
		p, err := parseLatLon(a)
		if err != nil {
			return nil, fmt.Errorf("--point %v", err)
		}
		pts = append(pts, timeline.Marker{Point: p})
	}
	if file == "" {
		return pts, nil
	}
	var data []byte
	var err error
	name := file
	if file == "-" {
		data, err = io.ReadAll(cmd.InOrStdin())
		name = "stdin"
	} else {
		data, err = os.ReadFile(file)
	}
	if err != nil {
		return nil, err
	}
	ms, err := geofile.ReadMarkers(name, data)
	if err != nil {
		return nil, err
	}
	return append(pts, ms...), nil
}

func projectRequest(v *viewport.View, pts []timeline.Marker) *wire.Request {
	req := &wire.Request{Op: "project", Camera: wire.CameraOf(v.Camera())}
	for _, m := range pts {
		lat, lon := m.Point[1], m.Point[0]
		req.Points = append(req.Points, &wire.Point{Lat: &lat, Lon: &lon})
	}
	return req
}

func projectJSON(v *viewport.View, pts []timeline.Marker) any {
	req := projectRequest(v, pts)
	ans, err := reference.Evaluate(req)
	if err != nil {
		return err
	}
	return struct {
		Request *wire.Request `json:"request"`
		Answer  any           `json:"answer"`
	}{req, ans}
}

func projectGeoJSON(v *viewport.View, pts []timeline.Marker) *geojson.FeatureCollection {
	fc := geojson.NewFeatureCollection()
	for i, m := range pts {
		f := geojson.NewFeature(m.Point)
		f.Properties["index"] = i
		if m.ID != "" {
			f.Properties["id"] = m.ID
		}
		sp := v.Project(m.Point)
		f.Properties["in_view"] = sp.InView()
		if sp.HasPixel() {
			f.Properties["x"], f.Properties["y"] = sp.X, sp.Y
			f.Properties["depth"] = sp.DepthPx
			f.Properties["margin_px"] = sp.MarginPx
		}
		fc.Append(f)
	}
	return fc
}

// printProject prints one row a point: its number, its id when any point
// has one, and its screen answer.
func printProject(w io.Writer, v *viewport.View, pts []timeline.Marker) error {
	printCamera(w, v)
	fmt.Fprintln(w)
	ids := slices.ContainsFunc(pts, func(m timeline.Marker) bool { return m.ID != "" })
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	head := "  #\t"
	if ids {
		head += "id\t"
	}
	fmt.Fprintln(tw, head+"lat\tlon\tx px\ty px\tdepth px\tin view\tmargin px")
	for i, m := range pts {
		p := m.Point
		fmt.Fprintf(tw, "  %d\t", i+1)
		if ids {
			fmt.Fprintf(tw, "%s\t", m.ID)
		}
		sp := v.Project(p)
		if !sp.HasPixel() {
			fmt.Fprintf(tw, "%.6f\t%.6f\t—\t—\t—\tno\tbehind the camera\n", p[1], p[0])
			continue
		}
		in := "no"
		if sp.InView() {
			in = "yes"
		}
		fmt.Fprintf(tw, "%.6f\t%.6f\t%.2f\t%.2f\t%.1f\t%s\t%+.2f\n", p[1], p[0], sp.X, sp.Y, sp.DepthPx, in, sp.MarginPx)
	}
	return tw.Flush()
}
