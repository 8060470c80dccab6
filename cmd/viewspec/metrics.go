package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"os"
	"strconv"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/geofile"
	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

// routeFlags reads a route file with an optional speed override.
type routeFlags struct {
	file     string
	speedMps float64
}

func (rf *routeFlags) register(cmd *cobra.Command) {
	cmd.Flags().StringVar(&rf.file, "route", "", "route `FILE`: GeoJSON LineString or Feature (properties.speed_mps), or GPX 1.1")
	cmd.Flags().Float64Var(&rf.speedMps, "speed-mps", 0, "one speed in m/s for every segment (overrides the file's speeds)")
}

// load reads and prepares the route; input errors exit with code 2.
func (rf *routeFlags) load(cmd *cobra.Command) (*routes.Route, *geofile.RouteFile, error) {
	if rf.file == "" {
		return nil, nil, &exitError{2, fmt.Errorf("--route FILE is required")}
	}
	data, err := os.ReadFile(rf.file)
	if err != nil {
		return nil, nil, &exitError{2, err}
	}
	f, err := geofile.ReadRoute(rf.file, data)
	if err != nil {
		return nil, nil, &exitError{2, err}
	}
	if cmd.Flags().Changed("speed-mps") {
		f.SpeedsMps = []float64{rf.speedMps}
	}
	if f.SpeedsMps == nil {
		return nil, nil, &exitError{2, fmt.Errorf("%s: the route has no speeds; give --speed-mps", rf.file)}
	}
	r, err := routes.New(f.Points, f.SpeedsMps)
	if err != nil {
		return nil, nil, &exitError{2, fmt.Errorf("%s: %v", rf.file, err)}
	}
	return r, f, nil
}

func readMarkersFile(name string) ([]timeline.Marker, error) {
	if name == "" {
		return nil, &exitError{2, fmt.Errorf("--markers FILE is required")}
	}
	data, err := os.ReadFile(name)
	if err != nil {
		return nil, &exitError{2, err}
	}
	ms, err := geofile.ReadMarkers(name, data)
	if err != nil {
		return nil, &exitError{2, err}
	}
	return ms, nil
}

func newMetricsCmd() *cobra.Command {
	cf := cameraFlags{atUser: true}
	var rf routeFlags
	var userArg, markersFile string
	var asJSON, asCSV bool
	cmd := &cobra.Command{
		Use:   "metrics",
		Short: "Print each marker's distances, time to reach and side of the road for a user on a route",
		Long: `metrics places the user on the route and prints, for each marker: the
geodesic distance from the user, the distance to the route ahead, how far
along the route and how many seconds away its nearest point ahead is (none
when the route ends before it), and its side of the road.

With a camera (--camera FILE or any camera flag) it adds each marker's
ground distance to the camera's footprint (0 inside). The camera stands
where the user is and looks along the route unless a flag or the file says
otherwise (see below), and the table shows it.`,
		Example: `  viewspec metrics --route drive.geojson --user 44.9312,-31.1704 --markers shops.csv
  viewspec metrics --route drive.gpx --speed-mps 13.9 --user 44.9312,-31.1704 --markers shops.geojson --pitch 50 --csv`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			r, _, err := rf.load(cmd)
			if err != nil {
				return err
			}
			if userArg == "" {
				return &exitError{2, fmt.Errorf("--user LAT,LON is required")}
			}
			user, err := parseLatLon(userArg)
			if err != nil {
				return &exitError{2, fmt.Errorf("--user %v", err)}
			}
			ms, err := readMarkersFile(markersFile)
			if err != nil {
				return err
			}
			var view *viewport.View
			var fp viewport.Footprint
			if cf.given(cmd) {
				place := r.Snap(user)
				at := cameraPlace{LatDeg: user[1], LonDeg: user[0], HeadingDeg: r.HeadingDegAt(place.AlongM)}
				v, err := cf.viewAt(cmd, &at)
				if err != nil {
					return err
				}
				view, fp = &v, v.Footprint()
			}
			rows := make([]wire.MarkerMetrics, len(ms))
			reference.FillMetrics(r, user, ms, view, &fp, rows)
			out := cmd.OutOrStdout()
			switch {
			case asJSON:
				return writeJSON(out, wire.MetricsAnswer{Markers: rows})
			case asCSV:
				return writeMetricsCSV(out, rows, view != nil)
			}
			return printMetrics(out, r, user, rows, view)
		},
	}
	rf.register(cmd)
	cf.register(cmd)
	cmd.Flags().StringVar(&userArg, "user", "", "the user's position `LAT,LON`, WGS84 degrees (snapped to the route)")
	cmd.Flags().StringVar(&markersFile, "markers", "", "markers `FILE`: CSV id,lat,lon[,priority] or GeoJSON points")
	cmd.Flags().BoolVar(&asJSON, "json", false, "print the wire answer (SPEC §6) as JSON")
	cmd.Flags().BoolVar(&asCSV, "csv", false, "print CSV with a header line")
	cmd.MarkFlagsMutuallyExclusive("json", "csv")
	return cmd
}

// num prints an optional number for a table or CSV: empty when null.
func num(p *float64, prec int) string {
	if p == nil {
		return ""
	}
	return strconv.FormatFloat(*p, 'f', prec, 64)
}

func viewDist(raw []byte, prec int) string {
	v, err := strconv.ParseFloat(string(raw), 64)
	if err != nil {
		return ""
	}
	return strconv.FormatFloat(v, 'f', prec, 64)
}

func writeMetricsCSV(w io.Writer, rows []wire.MarkerMetrics, withView bool) error {
	cw := csv.NewWriter(w)
	head := []string{"id", "user_dist_m", "route_dist_m", "along_m", "eta_s", "side", "side_margin_m"}
	if withView {
		head = append(head, "view_dist_m")
	}
	cw.Write(head)
	for _, r := range rows {
		rec := []string{r.ID, strconv.FormatFloat(r.UserDistM, 'g', -1, 64), strconv.FormatFloat(r.RouteDistM, 'g', -1, 64),
			num(r.AlongM, -1), num(r.EtaS, -1), r.Side, num(r.SideMarginM, -1)}
		if withView {
			rec = append(rec, viewDist(r.ViewDistM, -1))
		}
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

func printMetrics(w io.Writer, r *routes.Route, user [2]float64, rows []wire.MarkerMetrics, view *viewport.View) error {
	withView := view != nil
	place := r.Snap(user)
	fmt.Fprintf(w, "route  %d segments, %s, %.0f s end to end\n", r.NumSegments(), meters(r.LengthM()), r.DurationS())
	fmt.Fprintf(w, "user   %.6f, %.6f → on the route %s from the start, %s off it\n", user[1], user[0], meters(place.AlongM), meters(place.DistM))
	if withView {
		printCamera(w, view)
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	head := "marker\tfrom user m\tto route m\talong m\teta s\tside\t"
	if withView {
		head += "to view m\t"
	}
	fmt.Fprintln(tw, head)
	for _, row := range rows {
		along, eta := num(row.AlongM, 1), num(row.EtaS, 1)
		if row.AlongM == nil {
			along, eta = "past end", "—"
		}
		line := fmt.Sprintf("%s\t%.1f\t%.1f\t%s\t%s\t%s\t", row.ID, row.UserDistM, row.RouteDistM, along, eta, row.Side)
		if withView {
			d := viewDist(row.ViewDistM, 1)
			if d == "" {
				d = "—"
			}
			line += d + "\t"
		}
		fmt.Fprintln(tw, line)
	}
	return tw.Flush()
}
