package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"text/tabwriter"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

// outputFlags selects how data is printed: a readable table by default.
type outputFlags struct {
	json, geojson bool
}

func newFootprintCmd() *cobra.Command {
	var cf cameraFlags
	var of outputFlags
	cmd := &cobra.Command{
		Use:   "footprint",
		Short: "Print the ground trapezoid a camera shows",
		Long: `footprint prints the ground region in view of a camera: the trapezoid's four
vertices (near-left, near-right, far-right, far-left), its edges, area and
visible radius. Without flags it shows the embedded default camera, a phone
on the main street of Port Wren (an invented town).`,
		Example: `  viewspec footprint
  viewspec footprint --pitch 0 --zoom 17 --json
  viewspec footprint --camera cam.json --geojson > footprint.geojson`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			v, err := cf.view(cmd)
			if err != nil {
				return err
			}
			out := cmd.OutOrStdout()
			switch {
			case of.json:
				return writeJSON(out, footprintJSON(&v))
			case of.geojson:
				return writeJSON(out, footprintGeoJSON(&v))
			}
			return printFootprint(out, &v)
		},
	}
	cf.register(cmd)
	cmd.Flags().BoolVar(&of.json, "json", false, "print the wire answer (SPEC §6) with the camera, as JSON")
	cmd.Flags().BoolVar(&of.geojson, "geojson", false, "print an RFC 7946 FeatureCollection: the footprint polygon and the user point")
	cmd.MarkFlagsMutuallyExclusive("json", "geojson")
	return cmd
}

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// footprintJSON is the footprint op's answer beside the camera it answers.
func footprintJSON(v *viewport.View) any {
	req := &wire.Request{Op: "footprint", Camera: wire.CameraOf(v.Camera())}
	ans, _ := reference.Evaluate(req)
	return struct {
		Camera    *wire.Camera `json:"camera"`
		Footprint any          `json:"footprint"`
	}{req.Camera, ans}
}

// footprintGeoJSON returns the footprint and the user as GeoJSON features.
// The ring is closed and counter-clockwise (RFC 7946 §3.1.6); where it
// crosses the antimeridian its longitudes run on past ±180 instead of being
// cut, which GIS tools draw as one piece.
func footprintGeoJSON(v *viewport.View) *geojson.FeatureCollection {
	c := v.Camera()
	fc := geojson.NewFeatureCollection()
	fp := v.Footprint()
	var poly *geojson.Feature
	if fp.Empty {
		poly = &geojson.Feature{Type: "Feature", Properties: geojson.Properties{}}
	} else {
		ring := make(orb.Ring, 0, 5)
		for _, m := range fp.Mercator {
			p := m.LatLon()
			// Keep longitudes continuous with the user's.
			lon := p[0]
			for lon-c.LonDeg > 180 {
				lon -= 360
			}
			for lon-c.LonDeg < -180 {
				lon += 360
			}
			ring = append(ring, orb.Point{lon, p[1]})
		}
		ring = append(ring, ring[0])
		poly = geojson.NewFeature(orb.Polygon{ring})
		poly.Properties["area_m2"] = fp.AreaM2
		poly.Properties["visible_radius_m"] = fp.VisibleRadiusM
	}
	poly.Properties["name"] = "footprint"
	poly.Properties["vertices"] = "near-left, near-right, far-right, far-left"
	poly.Properties["empty"] = fp.Empty
	user := geojson.NewFeature(c.User())
	user.Properties["name"] = "user"
	user.Properties["heading_deg"] = c.HeadingDeg
	user.Properties["pitch_deg"] = c.PitchDeg
	user.Properties["zoom"] = c.Zoom
	fc.Append(poly)
	fc.Append(user)
	return fc
}

func printFootprint(w io.Writer, v *viewport.View) error {
	c := v.Camera()
	printCamera(w, v)
	fp := v.Footprint()
	if fp.Empty {
		fmt.Fprintf(w, "\nfootprint: empty — the far limit (row %.1f px) lies at or below the clear area's bottom row\n", v.FarRowPx())
		return nil
	}
	fmt.Fprintln(w, "\nfootprint (ground trapezoid, counter-clockwise):")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  vertex\tlat\tlon\tx px\ty px\tfrom user")
	names := [4]string{"near-left", "near-right", "far-right", "far-left"}
	l, _, r, _ := v.ClearArea()
	xs := [4]float64{l, r, r, l}
	ys := [4]float64{fp.NearRowPx, fp.NearRowPx, fp.FarRowPx, fp.FarRowPx}
	u := v.UserMercator()
	g := viewport.GroundScale(c.LatDeg)
	for i, p := range fp.Vertices {
		m := fp.Mercator[i]
		fmt.Fprintf(tw, "  %s\t%.6f\t%.6f\t%.1f\t%.1f\t%s\n", names[i], p[1], p[0], xs[i], ys[i],
			meters(math.Hypot(m.X-u.X, m.Y-u.Y)*g))
	}
	tw.Flush()
	side := func(a, b viewport.Mercator) float64 { return math.Hypot(a.X-b.X, a.Y-b.Y) * g }
	m := fp.Mercator
	depth := math.Abs((m[3].X-m[0].X)*math.Sin(c.HeadingDeg*math.Pi/180)+(m[3].Y-m[0].Y)*math.Cos(c.HeadingDeg*math.Pi/180)) * g
	fmt.Fprintf(w, "\nnear edge %s, far edge %s, depth %s\n", meters(side(m[0], m[1])), meters(side(m[3], m[2])), meters(depth))
	fmt.Fprintf(w, "area %s, visible radius %s\n", area(fp.AreaM2), meters(fp.VisibleRadiusM))
	if fp.Wrapped {
		fmt.Fprintln(w, "note: the view spans half the world or more; some ground appears more than once")
	}
	return nil
}

func printCamera(w io.Writer, v *viewport.View) {
	c := v.Camera()
	d := c.Device
	l, t, r, b := v.ClearArea()
	fmt.Fprintf(w, "camera  %.6f, %.6f  heading %g°  pitch %g°  zoom %g  (%d-px tiles, %.3g m/px at the user)\n",
		c.LatDeg, c.LonDeg, c.HeadingDeg, c.PitchDeg, c.Zoom, d.TilePx, viewport.GroundMPerPx(c.LatDeg, c.Zoom, d.TilePx))
	fmt.Fprintf(w, "device  %g × %g px, fov_y %g°, user at (%g, %g) px, clear area x %g–%g y %g–%g px, far ratio %g\n",
		d.WidthPx, d.HeightPx, d.FovYDeg, d.AnchorX*d.WidthPx, d.AnchorY*d.HeightPx, l, r, t, b, d.FarRatio)
}

// meters prints a distance for people: metres below 10 km, else km.
func meters(m float64) string {
	if m < 10000 {
		return fmt.Sprintf("%.1f m", m)
	}
	return fmt.Sprintf("%.2f km", m/1000)
}

func area(m2 float64) string {
	if m2 < 1e5 {
		return fmt.Sprintf("%.0f m²", m2)
	}
	return fmt.Sprintf("%.3f km²", m2/1e6)
}
