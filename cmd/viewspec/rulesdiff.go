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
	"github.com/viewspec/viewspec/timeline"
)

func newRulesDiffCmd() *cobra.Command {
	var drives, failIf []string
	var markersFile, deviceFile, markdown string
	var asJSON bool
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
		RunE: func(cmd *cobra.Command, args []string) error {
			base, err := readRules(args[0])
			if err != nil {
				return err
			}
			next, err := readRules(args[1])
			if err != nil {
				return err
			}
			if len(drives) == 0 {
				return &exitError{2, fmt.Errorf("--drives DIR|FILE is required")}
			}
			ds, err := gate.ReadTrips(drives)
			if err != nil {
				return &exitError{2, err}
			}
			var ms []timeline.Marker
			if markersFile != "" {
				if ms, err = readMarkersFile(markersFile); err != nil {
					return err
				}
			}
			dev, err := readDevice(deviceFile)
			if err != nil {
				return err
			}
			var conds []gate.Condition
			for _, s := range failIf {
				c, err := gate.ParseCondition(s)
				if err != nil {
					return &exitError{2, fmt.Errorf("--fail-if %v", err)}
				}
				conds = append(conds, c)
			}
			rep, err := gate.CompareRules(ds, base, next, gate.Setup{Device: dev, Markers: ms})
			if err != nil {
				return &exitError{2, err}
			}
			gates := rep.Check(conds)
			out := cmd.OutOrStdout()
			baseName, newName := filepath.Base(args[0]), filepath.Base(args[1])
			switch {
			case asJSON:
				if err := writeJSON(out, struct {
					*gate.Comparison
					Gates []gate.Verdict `json:"gates"`
				}{rep, gates}); err != nil {
					return err
				}
			default:
				if err := rep.WriteText(out, baseName, newName, gates); err != nil {
					return err
				}
			}
			if markdown != "" {
				plots, err := writeDiffPlots(markdown, rep, baseName, newName)
				if err != nil {
					return &exitError{2, err}
				}
				if err := corpus.WriteFileAtomic(markdown, func(w io.Writer) error {
					return rep.WriteMarkdown(w, baseName, newName, gates, plots)
				}); err != nil {
					return &exitError{2, err}
				}
				if !asJSON {
					fmt.Fprintf(out, "\nmarkdown report: %s\n", markdown)
				}
			}
			var held []string
			for _, g := range gates {
				if g.Holds {
					held = append(held, g.Condition)
				}
			}
			if len(held) > 0 {
				return &exitError{1, fmt.Errorf("gate failed: %s", strings.Join(held, "; "))}
			}
			return nil
		},
	}
	cmd.Flags().StringArrayVar(&drives, "drives", nil, "drive `FILE` or folder of drive files (repeatable)")
	cmd.Flags().StringVar(&markersFile, "markers", "", "markers `FILE`: CSV id,lat,lon[,priority] or GeoJSON points")
	cmd.Flags().StringVar(&deviceFile, "device", "", "device `FILE` (JSON object, SPEC §2); default: a phone, 390×844 px")
	cmd.Flags().StringArrayVar(&failIf, "fail-if", nil, "gate condition `EXPR` on the total, e.g. 'lost_shown_pct > 5' (repeatable)")
	cmd.Flags().StringVar(&markdown, "markdown", "", "also write a markdown report to `FILE`, with its plots beside it")
	cmd.Flags().BoolVar(&asJSON, "json", false, "print the report as JSON")
	return cmd
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
