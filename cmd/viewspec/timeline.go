package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"strconv"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

// readDevice reads a device JSON object (SPEC §2) from a file, or returns
// the default camera's phone when name is empty (390×844 px, fov_y 45°,
// SPEC §2's defaults for the rest, as for a camera).
func readDevice(name string) (viewport.Device, error) {
	if name == "" {
		return defaultCamera().Device, nil
	}
	data, err := os.ReadFile(name)
	if err != nil {
		return viewport.Device{}, &exitError{2, err}
	}
	var w wire.Device
	if err := wire.Unmarshal(data, &w); err != nil {
		return viewport.Device{}, &exitError{2, fmt.Errorf("%s: %s", name, describeJSONError(data, err))}
	}
	d, err := w.Value("device")
	if err != nil {
		return viewport.Device{}, &exitError{2, fmt.Errorf("%s: %v", name, err)}
	}
	return d, nil
}

// driveFlags are a drive's inputs on the command line (SPEC §5): the route,
// markers, rules and device files, where to start, and the timeline's
// horizon, tick, cap and bucket edges.
type driveFlags struct {
	rf                                          routeFlags
	markersFile, rulesFile, deviceFile, userArg string
	startAlongM, horizonS, tickS                float64
	capN                                        int
	edges                                       []float64
}

func (df *driveFlags) register(cmd *cobra.Command) {
	df.rf.register(cmd)
	f := cmd.Flags()
	f.StringVar(&df.markersFile, "markers", "", "markers `FILE`: CSV id,lat,lon[,priority] or GeoJSON points")
	f.StringVar(&df.rulesFile, "rules", "", "rule `FILE` (YAML or JSON)")
	f.StringVar(&df.deviceFile, "device", "", "device `FILE` (JSON object, SPEC §2); default: a phone, 390×844 px, fov_y 45°, user at the centre, no insets")
	f.StringVar(&df.userArg, "user", "", "start where `LAT,LON` snaps to the route")
	f.Float64Var(&df.startAlongM, "start-along-m", 0, "start this many metres along the route")
	f.Float64Var(&df.horizonS, "horizon-s", 120, "how long to drive, seconds")
	f.Float64Var(&df.tickS, "tick-s", 0.25, "time step, seconds (must divide the horizon)")
	f.IntVar(&df.capN, "cap", 4, "markers shown at once")
	f.Float64SliceVar(&df.edges, "bucket-edges-s", []float64{5, 35}, "bucket edges early|mid and mid|late, seconds")
}

// load reads the files and returns the drive and its markers; input errors
// exit with code 2.
func (df *driveFlags) load(cmd *cobra.Command) (timeline.Drive, []timeline.Marker, error) {
	var d timeline.Drive
	r, _, err := df.rf.load(cmd)
	if err != nil {
		return d, nil, err
	}
	ms, err := readMarkersFile(df.markersFile)
	if err != nil {
		return d, nil, err
	}
	rs, err := readRules(df.rulesFile)
	if err != nil {
		return d, nil, err
	}
	dev, err := readDevice(df.deviceFile)
	if err != nil {
		return d, nil, err
	}
	start := df.startAlongM
	if df.userArg != "" {
		if cmd.Flags().Changed("start-along-m") {
			return d, nil, &exitError{2, fmt.Errorf("give --user or --start-along-m, not both")}
		}
		u, err := parseLatLon(df.userArg)
		if err != nil {
			return d, nil, &exitError{2, fmt.Errorf("--user %v", err)}
		}
		start = r.Snap(u).AlongM
	}
	if len(df.edges) != 2 {
		return d, nil, &exitError{2, fmt.Errorf("--bucket-edges-s wants 2 values, got %d", len(df.edges))}
	}
	d = timeline.NewDrive(r, start, dev, rs)
	d.HorizonS, d.TickS, d.Cap = df.horizonS, df.tickS, df.capN
	d.BucketEdgesS = [2]float64{df.edges[0], df.edges[1]}
	return d, ms, nil
}

func newTimelineCmd() *cobra.Command {
	var df driveFlags
	var asJSON, asCSV bool
	var traceFile string
	cmd := &cobra.Command{
		Use:   "timeline",
		Short: "Drive a route and print when each marker is first shown, for how long, and its bucket",
		Long: `timeline drives the route from its start (or from --user, snapped, or
--start-along-m) for the horizon, moving exactly in time at the route's
speeds, with the camera's zoom and pitch from the rule set and the heading
turning toward each segment's bearing at the rules' rate. At every tick it
tests every marker against the view, gives the on-screen slots (--cap) to
visible markers by priority, then id, and reports per marker when it was first
visible and first shown, how many seconds it was shown, and its bucket:
early, mid or late (by --bucket-edges-s) or never (SPEC §5).`,
		Example: `  viewspec timeline --route drive.geojson --markers shops.csv --rules fixtures/rules/phone.yaml
  viewspec timeline --route drive.gpx --speed-mps 14 --markers shops.geojson --rules incar.yaml --device car.json --csv`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			d, ms, err := df.load(cmd)
			if err != nil {
				return err
			}
			var got []timeline.Result
			if traceFile != "" {
				if err := corpus.CheckTarget(traceFile); err != nil {
					return &exitError{2, fmt.Errorf("--trace: %v", err)}
				}
				var ticks []timeline.Tick
				if got, ticks, err = timeline.ComputeTraced(&d, ms); err != nil {
					return &exitError{2, err}
				}
				if err := corpus.WriteFileAtomic(traceFile, func(w io.Writer) error {
					enc := json.NewEncoder(w)
					for i := range ticks {
						if err := enc.Encode(&ticks[i]); err != nil {
							return err
						}
					}
					return nil
				}); err != nil {
					return &exitError{2, err}
				}
			} else if got, err = timeline.Compute(&d, ms); err != nil {
				return &exitError{2, err}
			}
			lines := wire.TimelineOf(ms, got)
			out := cmd.OutOrStdout()
			switch {
			case asJSON:
				return writeJSON(out, wire.TimelineAnswer{Markers: lines})
			case asCSV:
				return writeTimelineCSV(out, lines)
			}
			return printTimeline(out, &d, lines)
		},
	}
	df.register(cmd)
	cmd.Flags().BoolVar(&asJSON, "json", false, "print the wire answer (SPEC §6) as JSON")
	cmd.Flags().BoolVar(&asCSV, "csv", false, "print CSV with a header line")
	cmd.Flags().StringVar(&traceFile, "trace", "", "also write the reference's state at every tick to `FILE`, one JSON object a line: camera, footprint, markers in view with their margins, markers shown")
	cmd.MarkFlagsMutuallyExclusive("json", "csv")
	return cmd
}

func writeTimelineCSV(w io.Writer, lines []wire.MarkerTimeline) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"id", "first_visible_s", "first_shown_s", "shown_s", "bucket", "bucket_margin_s"})
	for _, l := range lines {
		cw.Write([]string{l.ID, optNum(l.FirstVisibleS), optNum(l.FirstShownS), fnum(l.ShownS), l.Bucket, optNum(l.BucketMarginS)})
	}
	cw.Flush()
	return cw.Error()
}

func printTimeline(w io.Writer, d *timeline.Drive, lines []wire.MarkerTimeline) error {
	fmt.Fprintf(w, "drive  %s of route from %s, %g s at %g s ticks, %d shown at once, buckets at %g and %g s\n\n",
		meters(d.Route.LengthM()), meters(d.StartAlongM), d.HorizonS, d.TickS, d.Cap, d.BucketEdgesS[0], d.BucketEdgesS[1])
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "marker\tfirst visible s\tfirst shown s\tshown s\tbucket")
	counts := map[string]int{}
	for _, l := range lines {
		vis, shown := "—", "—"
		if l.FirstVisibleS != nil {
			vis = strconv.FormatFloat(*l.FirstVisibleS, 'f', 2, 64)
		}
		if l.FirstShownS != nil {
			shown = strconv.FormatFloat(*l.FirstShownS, 'f', 2, 64)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%.2f\t%s\n", l.ID, vis, shown, l.ShownS, l.Bucket)
		counts[l.Bucket]++
	}
	tw.Flush()
	fmt.Fprintf(w, "\nearly %d, mid %d, late %d, never %d\n", counts["early"], counts["mid"], counts["late"], counts["never"])
	return nil
}
