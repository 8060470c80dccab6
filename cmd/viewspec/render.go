package main

import (
	"io"
	"os"
	"path/filepath"

	"github.com/paulmach/orb"
	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/geofile"
	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/timeline"
)

func newRenderCmd() *cobra.Command {
	cmd := &cobra.Command{
		Use:   "render",
		Short: "Draw what the screen shows (render screen), a camera from above (render camera), a drive as an HTML page",
		Long: `render draws pictures for people: the phone's heading-up screen as the
reference computes it, with the insets, the clear area, the horizon and the
far limit, the streets and the route in perspective and the markers at
their pixels (render screen); a plan view, north up, in metres around the
user, of a camera's footprint with the route, the markers and a scale bar
(render camera); or a whole drive with the screen beside the map on one
time slider, zoom and pitch over time with the speed and the rule bands,
and each marker's intervals in view and shown (render drive). The pictures
need nothing from the network, and the same input gives the same bytes.`,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	cmd.AddCommand(newRenderScreenCmd(), newRenderCameraCmd(), newRenderDriveCmd())
	return cmd
}

// writeOutput writes data to the file name atomically, or to the command's
// output when name is empty.
func writeOutput(cmd *cobra.Command, name string, data []byte) error {
	if name == "" {
		_, err := cmd.OutOrStdout().Write(data)
		return err
	}
	return corpus.WriteFileAtomic(name, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// writeFileAtomic writes data to the file name atomically.
func writeFileAtomic(name string, data []byte) error {
	return corpus.WriteFileAtomic(name, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// readRoutePoints reads a route file's vertices ([lon, lat] degrees) for a
// picture; speeds are not needed.
func readRoutePoints(name string) ([]orb.Point, error) {
	data, err := os.ReadFile(name)
	if err != nil {
		return nil, &exitError{2, err}
	}
	f, err := geofile.ReadRoute(name, data)
	if err != nil {
		return nil, &exitError{2, err}
	}
	return f.Points, nil
}

func newRenderCameraCmd() *cobra.Command {
	var cf cameraFlags
	var routeFile, markersFile, outFile string
	var spanM float64
	cmd := &cobra.Command{
		Use:   "camera",
		Short: "Draw one camera seen from above as SVG: footprint, route, markers, scale bar",
		Long: `camera draws the camera (flags, or --camera FILE with flags overriding it)
seen from above, north up, in metres around the user: the footprint, the
route (--route, speeds not needed), the markers (--markers) filled when the
camera has them in view and hollow when not, the user's arrow on the
heading, a north arrow, a scale bar of a round length and a legend. The
picture fits the footprint unless --span-m fixes the scale.`,
		Example: `  viewspec render camera -o camera.svg
  viewspec render camera --camera cam.json --route drive.geojson --markers shops.csv --pitch 60 -o camera.svg`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			v, err := cf.view(cmd)
			if err != nil {
				return err
			}
			var route []orb.Point
			if routeFile != "" {
				if route, err = readRoutePoints(routeFile); err != nil {
					return err
				}
			}
			var ms []timeline.Marker
			if markersFile != "" {
				if ms, err = readMarkersFile(markersFile); err != nil {
					return err
				}
			}
			svg, err := render.CameraSVG(&v, route, ms, nil, render.WithSpanM(spanM))
			if err != nil {
				return &exitError{2, err}
			}
			return writeOutput(cmd, outFile, svg)
		},
	}
	cf.register(cmd)
	cmd.Flags().StringVar(&routeFile, "route", "", "route `FILE` to draw: GeoJSON LineString or Feature, or GPX 1.1")
	cmd.Flags().StringVar(&markersFile, "markers", "", "markers `FILE` to draw: CSV id,lat,lon[,priority] or GeoJSON points")
	cmd.Flags().Float64Var(&spanM, "span-m", 0, "ground metres across the map's shorter side, centred on the user (default: fit the footprint)")
	cmd.Flags().StringVarP(&outFile, "output", "o", "", "write the SVG to `FILE` (default: stdout)")
	return cmd
}

func newRenderDriveCmd() *cobra.Command {
	var df driveFlags
	var rules2File, outFile, title, streetsFile string
	var spanM float64
	cmd := &cobra.Command{
		Use:   "drive",
		Short: "Draw a drive as a self-contained HTML page with a time slider",
		Long: `drive runs the drive timeline (as viewspec timeline does) and writes an HTML
page that needs no network: a map of the route, the streets (--streets) and
the markers coloured by bucket (named when the markers file is GeoJSON with
properties.name), and beside it the phone's screen; one slider (and a play
button) moves the user, the footprint and the screen tick by tick and
highlights the markers shown; zoom, the speed with the rules' band edges and
hysteresis, and pitch over time; each marker's intervals in view and shown,
with the ticks where more are in view than the cap; and a table of each
marker's first visible and first shown times, shown seconds and bucket.
--rules2 adds a second rule set on the same route and markers: its zoom and
pitch are plotted beside the first's and its buckets listed beside them.`,
		Example: `  viewspec render drive --route drive.geojson --markers shops.csv --rules fixtures/rules/phone.yaml -o drive.html
  viewspec render drive --route drive.gpx --speed-mps 14 --markers shops.csv --rules phone.yaml --rules2 incar.yaml --device car.json -o compare.html`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			d, ms, err := df.load(cmd)
			if err != nil {
				return err
			}
			opts := []render.Option{render.WithRulesName(filepath.Base(df.rulesFile)), render.WithSpanM(spanM),
				render.WithNames(readMarkerNames(df.markersFile))}
			if streetsFile != "" {
				sts, err := readStreets(streetsFile)
				if err != nil {
					return err
				}
				opts = append(opts, render.WithStreets(sts))
			}
			if title != "" {
				opts = append(opts, render.WithTitle(title))
			}
			if rules2File != "" {
				rs2, err := readRules(rules2File)
				if err != nil {
					return err
				}
				d2 := d
				d2.Rules = rs2
				opts = append(opts, render.WithCompare(filepath.Base(rules2File), &d2))
			}
			page, err := render.DriveHTML(&d, ms, opts...)
			if err != nil {
				return &exitError{2, err}
			}
			return writeOutput(cmd, outFile, page)
		},
	}
	df.register(cmd)
	cmd.Flags().StringVar(&rules2File, "rules2", "", "a second rule `FILE` to compare with the first")
	cmd.Flags().StringVar(&streetsFile, "streets", "", "streets `FILE` to draw: a GeoJSON FeatureCollection of LineStrings named by properties.name")
	cmd.Flags().Float64Var(&spanM, "span-m", 0, "ground metres across the map's shorter side, centred on the start (default: fit the drive)")
	cmd.Flags().StringVar(&title, "title", "", "the page's title (default: made from the drive)")
	cmd.Flags().StringVarP(&outFile, "output", "o", "", "write the page to `FILE` (default: stdout)")
	return cmd
}

// readStreets reads a street file (GeoJSON LineStrings, named by
// properties.name) for a picture.
func readStreets(name string) ([]render.Street, error) {
	data, err := os.ReadFile(name)
	if err != nil {
		return nil, &exitError{2, err}
	}
	lines, err := geofile.ReadLines(name, data)
	if err != nil {
		return nil, &exitError{2, err}
	}
	out := make([]render.Street, len(lines))
	for i, l := range lines {
		out[i] = render.Street{Name: l.Name, Points: l.Points}
	}
	return out, nil
}

// readMarkerNames returns the names a GeoJSON markers file gives its
// markers (properties.name), by id.
func readMarkerNames(name string) map[string]string {
	data, err := os.ReadFile(name)
	if err != nil {
		return nil
	}
	return geofile.MarkerNames(data)
}

func newRenderScreenCmd() *cobra.Command {
	var cf cameraFlags
	var routeFile, markersFile, streetsFile, outFile, title string
	var shown []string
	cmd := &cobra.Command{
		Use:   "screen",
		Short: "Draw what the phone's screen shows for one camera, as SVG",
		Long: `screen draws the heading-up screen of the camera (flags, or --camera FILE
with flags overriding it) at its pixel size: the insets hatched, the clear
area outlined, the sky above the horizon and the ground beyond the far limit
shaded, the footprint, the streets (--streets, GeoJSON lines named by
properties.name) and the route (--route) in perspective, clipped on the
ground at the near and far limits, and the markers (--markers) at the
pixels the reference gives them: filled in view, hollow outside the clear
area, dashed beyond the far limit, pinned to the margin when off the
screen, listed when behind the camera. Markers named in a GeoJSON file
(properties.name) are labelled with their names; --shown haloes the markers
that hold a slot. Also the anchor and the user's arrow, a north arrow
turned with the heading, a scale bar on the user's row and a legend.`,
		Example: `  viewspec render screen -o screen.svg
  viewspec render screen --camera cam.json --route drive.geojson --markers shops.geojson --streets streets.geojson -o screen.svg`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			v, err := cf.view(cmd)
			if err != nil {
				return err
			}
			var sc render.Scene
			if routeFile != "" {
				if sc.Route, err = readRoutePoints(routeFile); err != nil {
					return err
				}
			}
			if markersFile != "" {
				if sc.Markers, err = readMarkersFile(markersFile); err != nil {
					return err
				}
				sc.Names = readMarkerNames(markersFile)
			}
			if streetsFile != "" {
				if sc.Streets, err = readStreets(streetsFile); err != nil {
					return err
				}
			}
			sc.Shown = shown
			var opts []render.Option
			if title != "" {
				opts = append(opts, render.WithTitle(title))
			}
			svg, err := render.ScreenSVG(&v, sc, opts...)
			if err != nil {
				return &exitError{2, err}
			}
			return writeOutput(cmd, outFile, svg)
		},
	}
	cf.register(cmd)
	cmd.Flags().StringVar(&routeFile, "route", "", "route `FILE` to draw: GeoJSON LineString or Feature, or GPX 1.1")
	cmd.Flags().StringVar(&markersFile, "markers", "", "markers `FILE` to draw: CSV id,lat,lon[,priority] or GeoJSON points (properties.name labels them)")
	cmd.Flags().StringVar(&streetsFile, "streets", "", "streets `FILE` to draw: a GeoJSON FeatureCollection of LineStrings named by properties.name")
	cmd.Flags().StringSliceVar(&shown, "shown", nil, "`IDS` of markers shown (holding a slot), comma-separated: drawn with a halo")
	cmd.Flags().StringVar(&title, "title", "", "the picture's title (default: made from the camera)")
	cmd.Flags().StringVarP(&outFile, "output", "o", "", "write the SVG to `FILE` (default: stdout)")
	return cmd
}
