package main

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/rules"
	"github.com/viewspec/viewspec/wire"
)

func newZoomCmd() *cobra.Command {
	var rulesFile, speedsFile string
	var asJSON, asCSV bool
	cmd := &cobra.Command{
		Use:   "zoom",
		Short: "Print the zoom and pitch a rule set gives over a trace of speeds",
		Long: `zoom evaluates a rule set (SPEC §3) over samples read from a CSV file with
the columns t_s,speed_mps[,turn_dist_m] (a header line is optional; an
empty turn_dist_m means no turn ahead, # starts a comment).

For each sample it prints the time, the speed, the distance to the turn
ahead, the speed band the rules are in (its index in the file's bands, from
0, after hysteresis), and the map's zoom and pitch: as a table (speed in
km/h, "—" for no turn ahead), or with --csv as t_s, speed_mps, turn_dist_m,
zoom, pitch_deg, band (speed in m/s, empty for no turn ahead). --json
prints the wire answer instead (SPEC §6): the zoom and pitch_deg arrays,
one entry a sample, without the band.`,
		Example: `  viewspec zoom --rules fixtures/rules/phone.yaml --speeds trace.csv`,
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			rs, err := readRules(rulesFile)
			if err != nil {
				return err
			}
			samples, err := readSamples(speedsFile)
			if err != nil {
				return &exitError{2, err}
			}
			zoom, pitch, err := rs.Evaluate(samples)
			if err != nil {
				return &exitError{2, fmt.Errorf("%s: %v", speedsFile, err)}
			}
			out := cmd.OutOrStdout()
			if asJSON {
				return writeJSON(out, wire.ZoomAnswer{Zoom: zoom, PitchDeg: pitch})
			}
			bands := sampleBands(rs, samples)
			if asCSV {
				w := csv.NewWriter(out)
				w.Write([]string{"t_s", "speed_mps", "turn_dist_m", "zoom", "pitch_deg", "band"})
				for i, s := range samples {
					w.Write([]string{fnum(s.TS), fnum(s.SpeedMps), optNum(s.TurnDistM), fnum(zoom[i]), fnum(pitch[i]), strconv.Itoa(bands[i])})
				}
				w.Flush()
				return w.Error()
			}
			tw := tabwriter.NewWriter(out, 0, 0, 2, ' ', tabwriter.AlignRight)
			fmt.Fprintln(tw, "t s\tspeed km/h\tturn ahead m\tband\tzoom\tpitch°\t")
			for i, s := range samples {
				turn := "—"
				if s.TurnDistM != nil {
					turn = strconv.FormatFloat(*s.TurnDistM, 'f', 0, 64)
				}
				fmt.Fprintf(tw, "%g\t%.1f\t%s\t%d\t%.3f\t%.2f\t\n", s.TS, s.SpeedMps*3.6, turn, bands[i], zoom[i], pitch[i])
			}
			return tw.Flush()
		},
	}
	cmd.Flags().StringVar(&rulesFile, "rules", "", "rule `FILE` (YAML or JSON)")
	cmd.Flags().StringVar(&speedsFile, "speeds", "", "samples `CSV`: t_s,speed_mps[,turn_dist_m]")
	cmd.Flags().BoolVar(&asJSON, "json", false, "print the wire answer (SPEC §6): the zoom and pitch_deg arrays")
	cmd.Flags().BoolVar(&asCSV, "csv", false, "print CSV with a header line: t_s,speed_mps,turn_dist_m,zoom,pitch_deg,band")
	cmd.MarkFlagsMutuallyExclusive("json", "csv")
	return cmd
}

// sampleBands returns the band the rules are in at each sample, stepping
// the same State that Evaluate steps; samples must have passed Evaluate.
func sampleBands(rs *rules.Set, samples []rules.Sample) []int {
	bands := make([]int, len(samples))
	var st rules.State
	for i, s := range samples {
		turn, hasTurn := 0.0, s.TurnDistM != nil
		if hasTurn {
			turn = *s.TurnDistM
		}
		if i == 0 {
			st, _ = rs.Start(s.SpeedMps, turn, hasTurn)
		} else {
			// A gap too wide for a float64 is as good as any long one: the
			// band does not depend on it.
			st.Step(min(s.TS-samples[i-1].TS, math.MaxFloat64), s.SpeedMps, turn, hasTurn)
		}
		bands[i] = st.Band()
	}
	return bands
}

func fnum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func optNum(p *float64) string {
	if p == nil {
		return ""
	}
	return fnum(*p)
}

// readSamples reads t_s,speed_mps[,turn_dist_m] lines.
func readSamples(name string) ([]rules.Sample, error) {
	if name == "" {
		return nil, errors.New("--speeds CSV is required")
	}
	f, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	cr := csv.NewReader(f)
	cr.FieldsPerRecord = -1
	cr.Comment = '#'
	cr.TrimLeadingSpace = true
	var out []rules.Sample
	for first := true; ; first = false {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %v", name, err)
		}
		line, _ := cr.FieldPos(0)
		if first && strings.EqualFold(strings.TrimSpace(rec[0]), "t_s") {
			continue
		}
		if len(rec) < 2 || len(rec) > 3 {
			return nil, fmt.Errorf("%s:%d: %d fields: want t_s,speed_mps[,turn_dist_m]", name, line, len(rec))
		}
		var s rules.Sample
		for j, dst := range []*float64{&s.TS, &s.SpeedMps} {
			v, err := strconv.ParseFloat(strings.TrimSpace(rec[j]), 64)
			if err != nil {
				return nil, fmt.Errorf("%s:%d: %s: %q is not a number", name, line, []string{"t_s", "speed_mps"}[j], rec[j])
			}
			*dst = v
		}
		if len(rec) == 3 && strings.TrimSpace(rec[2]) != "" {
			v, err := strconv.ParseFloat(strings.TrimSpace(rec[2]), 64)
			if err != nil {
				return nil, fmt.Errorf("%s:%d: turn_dist_m: %q is not a number", name, line, rec[2])
			}
			s.TurnDistM = &v
		}
		out = append(out, s)
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%s: no samples", name)
	}
	return out, nil
}
