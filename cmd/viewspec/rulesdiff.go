package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/gate"
	"github.com/viewspec/viewspec/render"
)

// rulesDiff is `rules diff`: its flags, and the steps of a run.
type rulesDiff struct {
	drives, failIf          []string
	markersFile, deviceFile string
	markdown                string
	asJSON                  bool
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
naming each condition that holds. A drive file is a route with its speed
profile: GeoJSON with properties.speed_mps, or GPX 1.1 with times (SPEC §4);
a folder stands for its drive files.

Measures: ` + strings.Join(gate.MeasureNames(), ", ") + `.`,
		Example: `  viewspec rules diff phone.yaml phone-new.yaml --drives drives/ --markers shops.csv
  viewspec rules diff phone.yaml phone-new.yaml --drives drives/ --markers shops.csv \
      --fail-if 'lost_shown_pct > 5' --fail-if 'never_added > 0' --markdown review/rules.md`,
		Args: cobra.ExactArgs(2),
		RunE: func(cmd *cobra.Command, args []string) error { return rd.run(cmd.OutOrStdout(), args[0], args[1]) },
	}
	cmd.Flags().StringArrayVar(&rd.drives, "drives", nil, "drive `FILE` or folder of drive files (repeatable)")
	cmd.Flags().StringVar(&rd.markersFile, "markers", "", "markers `FILE`: CSV id,lat,lon[,priority] or GeoJSON points")
	cmd.Flags().StringVar(&rd.deviceFile, "device", "", "device `FILE` (JSON object, SPEC §2); default: a phone, 390×844 px")
	cmd.Flags().StringArrayVar(&rd.failIf, "fail-if", nil, "gate condition `EXPR` on the total, e.g. 'lost_shown_pct > 5' (repeatable)")
	cmd.Flags().StringVar(&rd.markdown, "markdown", "", "also write a markdown report to `FILE`, with its plots beside it")
	cmd.Flags().BoolVar(&rd.asJSON, "json", false, "print the report as JSON")
	return cmd
}

// run compares the rule files basePath and newPath on the drives, writes
// the report, and fails when a gate condition holds.
func (rd *rulesDiff) run(out io.Writer, basePath, newPath string) error {
	trips, setup, conds, err := rd.load()
	if err != nil {
		return err
	}
	base, err := readRules(basePath)
	if err != nil {
		return err
	}
	next, err := readRules(newPath)
	if err != nil {
		return err
	}
	rep, err := gate.CompareRules(trips, base, next, setup)
	if err != nil {
		return &exitError{2, err}
	}
	verdicts := rep.Check(conds)
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

// load reads the drives, the markers, the device and the gate conditions.
func (rd *rulesDiff) load() ([]gate.Trip, gate.Setup, []gate.Condition, error) {
	var setup gate.Setup
	if len(rd.drives) == 0 {
		return nil, setup, nil, &exitError{2, fmt.Errorf("--drives DIR|FILE is required")}
	}
	trips, err := gate.ReadTrips(rd.drives)
	if err != nil {
		return nil, setup, nil, &exitError{2, err}
	}
	if rd.markersFile != "" {
		if setup.Markers, err = readMarkersFile(rd.markersFile); err != nil {
			return nil, setup, nil, err
		}
	}
	if setup.Device, err = readDevice(rd.deviceFile); err != nil {
		return nil, setup, nil, err
	}
	var conds []gate.Condition
	for _, s := range rd.failIf {
		c, err := gate.ParseCondition(s)
		if err != nil {
			return nil, setup, nil, &exitError{2, fmt.Errorf("--fail-if %v", err)}
		}
		conds = append(conds, c)
	}
	return trips, setup, conds, nil
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
	for _, dd := range rep.Drives {
		for _, q := range []struct {
			name, unit string
			base, next []float64
		}{
			{"zoom", "zoom level", dd.Base.Trace.Zoom, dd.New.Trace.Zoom},
			{"pitch", "pitch, degrees", dd.Base.Trace.PitchDeg, dd.New.Trace.PitchDeg},
		} {
			svg, err := render.LinesSVG(fmt.Sprintf("%s over time, drive %s", q.name, dd.Name),
				render.Series{Name: baseName, XLabel: "time, s", YLabel: q.unit, X: dd.Base.Trace.TimesS, Y: q.base},
				render.Series{Name: newName, XLabel: "time, s", YLabel: q.unit, X: dd.New.Trace.TimesS, Y: q.next})
			if err != nil {
				return nil, err
			}
			if err := write(fmt.Sprintf("%s over time, drive %s", q.name, dd.Name), fmt.Sprintf("%s-%s-%s.svg", stem, dd.Name, q.name), svg); err != nil {
				return nil, err
			}
		}
	}
	var bars []render.Bar
	names := []string{"early", "mid", "late", "never"}
	for i, from := range names {
		for j, to := range names {
			if i != j && rep.Total.Moves[i][j] > 0 {
				bars = append(bars, render.Bar{Label: from + " → " + to, Group: moveGroup(i, j), Value: float64(rep.Total.Moves[i][j])})
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
