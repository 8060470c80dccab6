package main

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/reference"
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
--point LAT,LON (repeatable) or --points FILE (one "lat,lon" a line, # for
comments); without either, the user's own position is projected.`,
		Example: `  viewspec project --point 44.9330,-31.1690 --point 44.9300,-31.1720
  viewspec project --camera cam.json --points shops.csv --json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			v, err := cf.view(cmd)
			if err != nil {
				return err
			}
			pts, err := readPoints(cmd, pointArgs, pointsFile)
			if err != nil {
				return &exitError{2, err}
			}
			if len(pts) == 0 {
				pts = []orb.Point{v.Camera().User()}
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
	cmd.Flags().StringVar(&pointsFile, "points", "", "read points from `FILE`, one \"lat,lon\" a line")
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

func readPoints(cmd *cobra.Command, args []string, file string) ([]orb.Point, error) {
	var pts []orb.Point
	for _, a := range args {
		p, err := parseLatLon(a)
		if err != nil {
			return nil, fmt.Errorf("--point %v", err)
		}
		pts = append(pts, p)
	}
	if file == "" {
		return pts, nil
	}
	var r io.Reader
	if file == "-" {
		r = cmd.InOrStdin()
	} else {
		f, err := os.Open(file)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		r = f
	}
	sc := bufio.NewScanner(r)
	for n := 1; sc.Scan(); n++ {
		line := strings.TrimSpace(sc.Text())
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		p, err := parseLatLon(line)
		if err != nil {
			return nil, fmt.Errorf("%s:%d: %v", file, n, err)
		}
		pts = append(pts, p)
	}
	return pts, sc.Err()
}

func projectRequest(v *viewport.View, pts []orb.Point) *wire.Request {
	req := &wire.Request{Op: "project", Camera: wire.CameraOf(v.Camera())}
	for _, p := range pts {
		lat, lon := p[1], p[0]
		req.Points = append(req.Points, &wire.Point{Lat: &lat, Lon: &lon})
	}
	return req
}

func projectJSON(v *viewport.View, pts []orb.Point) any {
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

func projectGeoJSON(v *viewport.View, pts []orb.Point) *geojson.FeatureCollection {
	fc := geojson.NewFeatureCollection()
	for i, p := range pts {
		f := geojson.NewFeature(p)
		f.Properties["index"] = i
		sp := v.Project(p)
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

func printProject(w io.Writer, v *viewport.View, pts []orb.Point) error {
	printCamera(w, v)
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  #\tlat\tlon\tx px\ty px\tdepth px\tin view\tmargin px")
	for i, p := range pts {
		sp := v.Project(p)
		if !sp.HasPixel() {
			fmt.Fprintf(tw, "  %d\t%.6f\t%.6f\t—\t—\t—\tno\tbehind the camera\n", i+1, p[1], p[0])
			continue
		}
		in := "no"
		if sp.InView() {
			in = "yes"
		}
		fmt.Fprintf(tw, "  %d\t%.6f\t%.6f\t%.2f\t%.2f\t%.1f\t%s\t%+.2f\n", i+1, p[1], p[0], sp.X, sp.Y, sp.DepthPx, in, sp.MarginPx)
	}
	return tw.Flush()
}
