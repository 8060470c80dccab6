package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/gate"
	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/timeline"
)

// rulesDiff is `rules diff`: its flags, and the steps of a run.
type rulesDiff struct {
	drives, failIf          []string
	markersFile, deviceFile string
	markdown                string
	asJSON                  bool
	// The timeline's parameters (SPEC §5), defaults as there.
	horizonS, tickS float64
	capN            int
	edgesS          []float64
}

func newRulesDiffCmd() *cobra.Command {
	rd := &rulesDiff{}
	cmd := &cobra.Command{
		Use:   "diff BASE NEW --drives DIR|FILE...",
		Short: "Show what a zoom-rule change does to visibility on a set of drives, and gate on it",
		Long: `diff drives every drive under the base rule set and the new one (SPEC §5) and
reports, per drive and in total: the markers moving between buckets
(early/mid/late/never → early/mid/late/never), the shown seconds gained and
lost, the footprint's area-seconds, the zoom and pitch ranges and how often
the speed band changes. --fail-if gates on the total's measures and exits 1
naming each condition that holds. Every drive runs with the same timeline
(--horizon-s, --tick-s, --cap, --bucket-edges-s; SPEC §5 defaults).

A drive file is a route with its speed profile: GeoJSON with a LineString
feature with properties.speed_mps, or GPX 1.1 with a time on every point
(SPEC §4, §8); it is named by its file name. A file given to --drives must
be a drive. A folder stands for the drives among its *.geojson, *.json and
*.gpx files; the others (markers, streets, footprints) are skipped, each
named on stderr with the reason, and a folder without any drive is an
error.

The reports list the markers that moved between buckets, by id and (from
a GeoJSON marker file's properties.name) name, with when each was first
shown under each rule set. lost_shown_pct and gained_shown_pct are ≥ 0:
lost_shown_pct 10 means the new rules show markers for 10 % less of the
base rules' shown time.

Measures: ` + strings.Join(gate.MeasureNames(), ", ") + `.`,
		Example: `  viewspec rules diff phone.yaml phone-new.yaml --drives drives/ --markers shops.csv
  viewspec rules diff phone.yaml phone-new.yaml --drives drives/ --markers shops.csv \
      --fail-if 'lost_shown_pct > 5' --fail-if 'never_added > 0' --markdown review/rules.md`,
		Args: cobra.ExactArgs(2),
		RunE: func(cmd *cobra.Command, args []string) error {
			return rd.run(cmd.OutOrStdout(), cmd.ErrOrStderr(), args[0], args[1])
		},
	}
	cmd.Flags().StringArrayVar(&rd.drives, "drives", nil, "drive `FILE` or folder of drive files (repeatable)")
	cmd.Flags().StringVar(&rd.markersFile, "markers", "", "markers `FILE`: CSV id,lat,lon[,priority] or GeoJSON points")
	cmd.Flags().StringVar(&rd.deviceFile, "device", "", "device `FILE` (JSON object, SPEC §2); default: a phone, 390×844 px")
	cmd.Flags().StringArrayVar(&rd.failIf, "fail-if", nil, "gate condition `EXPR` on the total, e.g. 'lost_shown_pct > 5' (repeatable)")
	cmd.Flags().StringVar(&rd.markdown, "markdown", "", "also write a markdown report to `FILE`, with its plots beside it")
	cmd.Flags().BoolVar(&rd.asJSON, "json", false, "print the report as JSON")
	cmd.Flags().Float64Var(&rd.horizonS, "horizon-s", 120, "how long each drive runs, seconds")
	cmd.Flags().Float64Var(&rd.tickS, "tick-s", 0.25, "time step, seconds (must divide the horizon)")
	cmd.Flags().IntVar(&rd.capN, "cap", 4, "markers shown at once")
	cmd.Flags().Float64SliceVar(&rd.edgesS, "bucket-edges-s", []float64{5, 35}, "bucket edges `E1,E2`, seconds: early before E1, mid before E2, late to the horizon")
	return cmd
}

// run compares the rule files basePath and newPath on the drives, writes
// the report, and fails when a gate condition holds.
func (rd *rulesDiff) run(out, errOut io.Writer, basePath, newPath string) error {
	in, err := rd.load()
	if err != nil {
		return err
	}
	if len(in.trips) == 0 { // not expected: ReadTrips errs on a folder without drives
		return &exitError{2, fmt.Errorf("--drives %s: no drive", strings.Join(rd.drives, " "))}
	}
	for _, s := range in.skipped {
		fmt.Fprintf(errOut, "viewspec: skipped %s: %s\n", s.File, s.Reason)
	}
	base, err := readRules(basePath)
	if err != nil {
		return err
	}
	next, err := readRules(newPath)
	if err != nil {
		return err
	}
	if err := rd.checkTimeline(in.trips[0], in.setup, base); err != nil {
		return err
	}
	rep, err := gate.CompareRules(in.trips, base, next, in.setup)
	if err != nil {
		return &exitError{2, err}
	}
	rep.Skipped = append(rep.Skipped, in.skipped...)
	verdicts := rep.Check(in.conds)
	if err := rd.write(out, rep, filepath.Base(basePath), filepath.Base(newPath), verdicts); err != nil {
		return err
	}
	var held []string
	for _, v := range verdicts {
		if v.Holds {
			held = append(held, v.Condition)
		}
	}
	if len(held) > 0 {
		return &exitError{1, fmt.Errorf("gate failed: %s", strings.Join(held, "; "))}
	}
	return nil
}

// diffInputs are what a run reads before the rule files.
type diffInputs struct {
	trips   []gate.Trip
	skipped []gate.Skipped // files of drive folders that are not drives
	setup   gate.Setup
	conds   []gate.Condition
}

// load reads the drives (and which files of their folders are not
// drives), the markers and their names, the device, the timeline's flags
// and the gate conditions.
func (rd *rulesDiff) load() (*diffInputs, error) {
	in := &diffInputs{}
	if len(rd.drives) == 0 {
		return nil, &exitError{2, fmt.Errorf("--drives DIR|FILE is required")}
	}
	if len(rd.edgesS) != 2 {
		return nil, &exitError{2, fmt.Errorf("--bucket-edges-s wants 2 values, E1,E2, got %d", len(rd.edgesS))}
	}
	for _, s := range rd.failIf {
		c, err := gate.ParseCondition(s)
		if err != nil {
			return nil, &exitError{2, fmt.Errorf("--fail-if %v", err)}
		}
		in.conds = append(in.conds, c)
	}
	var err error
	if in.trips, in.skipped, err = gate.ReadTrips(rd.drives); err != nil {
		return nil, &exitError{2, err}
	}
	if rd.markersFile != "" {
		if in.setup.Markers, err = readMarkersFile(rd.markersFile); err != nil {
			return nil, err
		}
		data, err := os.ReadFile(rd.markersFile)
		if err != nil {
			return nil, &exitError{2, err}
		}
		in.setup.MarkerNames = gate.ReadMarkerNames(data)
	}
	if in.setup.Device, err = readDevice(rd.deviceFile); err != nil {
		return nil, err
	}
	horizon, tick, capN, edges := rd.horizonS, rd.tickS, rd.capN, [2]float64{rd.edgesS[0], rd.edgesS[1]}
	in.setup.Configure = func(d *timeline.Drive) {
		d.HorizonS, d.TickS, d.Cap, d.BucketEdgesS = horizon, tick, capN, edges
	}
	return in, nil
}

// timelineFlags names the flag of each timeline field.
var timelineFlags = map[string]string{
	"horizon_s": "--horizon-s", "tick_s": "--tick-s", "cap": "--cap",
	"bucket_edges_s[0]": "--bucket-edges-s", "bucket_edges_s[1]": "--bucket-edges-s",
}

// checkTimeline checks the timeline's flags as the timeline does (on the
// first drive, with the base rules), so that a bad value is told once,
// naming its flag, before any drive runs.
func (rd *rulesDiff) checkTimeline(first gate.Trip, setup gate.Setup, base *rules.Set) error {
	d := timeline.NewDrive(first.Route, first.StartAlongM, setup.Device, base)
	setup.Configure(&d)
	var fe *spec.FieldError
	if err := d.Validate(); errors.As(err, &fe) {
		if flag, ok := timelineFlags[fe.Field]; ok {
			value := fe.Value
			if flag == "--bucket-edges-s" {
				value = spec.FormatNumber(rd.edgesS[0]) + "," + spec.FormatNumber(rd.edgesS[1])
			}
			return &exitError{2, fmt.Errorf("%s %s: %s", flag, value, fe.Reason)}
		}
	}
	return nil // any other problem is the drive's, and CompareRules names it
}

// write prints the report (text or JSON) and writes the markdown report
// with its plots when asked.
func (rd *rulesDiff) write(out io.Writer, rep *gate.Comparison, baseName, newName string, verdicts []gate.Verdict) error {
	if rd.asJSON {
		if err := writeJSON(out, struct {
			*gate.Comparison
			Gates []gate.Verdict `json:"gates"`
		}{rep, verdicts}); err != nil {
			return err
		}
	} else if err := rep.WriteText(out, baseName, newName, verdicts); err != nil {
		return err
	}
	if rd.markdown == "" {
		return nil
	}
	plots, err := writeDiffPlots(rd.markdown, rep, baseName, newName)
	if err != nil {
		return &exitError{2, err}
	}
	if err := corpus.WriteFileAtomic(rd.markdown, func(w io.Writer) error {
		return rep.WriteMarkdown(w, baseName, newName, verdicts, plots)
	}); err != nil {
		return &exitError{2, err}
	}
	if !rd.asJSON {
		fmt.Fprintf(out, "\nmarkdown report: %s\n", rd.markdown)
	}
	return nil
}

// writeDiffPlots writes the report's plots beside the markdown file, as
// SVG, and returns them for the report to link: per drive, zoom and pitch
// over time under both rule sets; and the markers moving between buckets.
func writeDiffPlots(markdown string, rep *gate.Comparison, baseName, newName string) ([]gate.Plot, error) {
	dir := filepath.Dir(markdown)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	stem := strings.TrimSuffix(filepath.Base(markdown), filepath.Ext(markdown))
	var plots []gate.Plot
	fileNames := plotNames(rep.Drives)
	write := func(title, file string, svg []byte) error {
		if err := corpus.WriteFileAtomic(filepath.Join(dir, file), func(w io.Writer) error {
			_, err := w.Write(svg)
			return err
		}); err != nil {
			return err
		}
		plots = append(plots, gate.Plot{Title: title, File: file})
		return nil
	}
	for k, dd := range rep.Drives {
		for _, q := range []struct {
			name, unit string
			base, next []float64
		}{
			{"zoom", "zoom level", dd.Base.Trace.Zoom, dd.New.Trace.Zoom},
			{"pitch", "pitch, degrees", dd.Base.Trace.PitchDeg, dd.New.Trace.PitchDeg},
		} {
			title := fmt.Sprintf("%s: %s over time", dd.Name, q.name)
			svg, err := render.LinesSVG(title,
				render.Series{Name: baseName, XLabel: "time, s", YLabel: q.unit, X: dd.Base.Trace.TimesS, Y: q.base},
				render.Series{Name: newName, XLabel: "time, s", YLabel: q.unit, X: dd.New.Trace.TimesS, Y: q.next})
			if err != nil {
				return nil, err
			}
			if err := write(title, fmt.Sprintf("%s-%s-%s.svg", stem, fileNames[k], q.name), svg); err != nil {
				return nil, err
			}
		}
	}
	var bars []render.Bar
	names := []string{"early", "mid", "late", "never"}
	for i, from := range names {
		for j, to := range names {
			if i != j && rep.Total.Moves[i][j] > 0 {
				tone := render.ToneEarlier
				if j > i {
					tone = render.ToneLater
				}
				bars = append(bars, render.Bar{Label: from + " → " + to, Group: moveGroup(i, j), Value: float64(rep.Total.Moves[i][j]), Tone: tone})
			}
		}
	}
	if len(bars) == 0 {
		bars = append(bars, render.Bar{Label: "no marker moved", Group: "unchanged", Value: 0})
	}
	svg, err := render.BarsSVG("markers moving between buckets, all drives", "markers", bars...)
	if err != nil {
		return nil, err
	}
	if err := write("markers moving between buckets", stem+"-buckets.svg", svg); err != nil {
		return nil, err
	}
	return plots, nil
}

// moveGroup says whether a move is to a later bucket (worse) or an earlier
// one.
func moveGroup(from, to int) string {
	if to > from {
		return "later"
	}
	return "earlier"
}

// plotNames returns, for each drive, a name for its plot files: the
// drive's name with every character that is not a letter, a digit, '.',
// '-' or '_' turned into '-', and a number added when two come out alike.
func plotNames(drives []gate.TripDiff) []string {
	names := make([]string, len(drives))
	used := map[string]bool{}
	for i, dd := range drives {
		n := strings.Map(func(r rune) rune {
			if r == '.' || r == '-' || r == '_' || ('a' <= r && r <= 'z') || ('A' <= r && r <= 'Z') || ('0' <= r && r <= '9') {
				return r
			}
			return '-'
		}, dd.Name)
		n = strings.Trim(n, "-.")
		if n == "" {
			n = "drive"
		}
		for k, base := 2, n; used[n]; k++ {
			n = fmt.Sprintf("%s-%d", base, k)
		}
		used[n] = true
		names[i] = n
	}
	return names
}
