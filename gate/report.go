package gate

import (
	"fmt"
	"io"
	"strings"
	"text/tabwriter"
)

// Verdict is the outcome of the gate conditions on the total.
type Verdict struct {
	Condition string  `json:"condition"`
	Value     float64 `json:"value"`
	Holds     bool    `json:"holds"`
}

// Check evaluates the conditions on the report's total.
func (r *Comparison) Check(conds []Condition) []Verdict {
	out := make([]Verdict, len(conds))
	for i, c := range conds {
		holds, v := c.Holds(&r.Total.Measures)
		out[i] = Verdict{Condition: c.String(), Value: v, Holds: holds}
	}
	return out
}

var bucketNames = [4]string{"early", "mid", "late", "never"}

func sec(v float64) string { return fmt.Sprintf("%.1f s", v) }

func signedPct(v float64) string { return fmt.Sprintf("%+.1f %%", v) }

// WriteText writes the report for a terminal.
func (r *Comparison) WriteText(w io.Writer, baseName, newName string, gates []Verdict) error {
	fmt.Fprintf(w, "rules diff: %s → %s on %d drive(s), %d marker(s)\n", baseName, newName, len(r.Drives), r.perDriveMarkers())
	for _, dd := range append(append([]TripDiff(nil), r.Drives...), r.Total) {
		m := &dd.Measures
		fmt.Fprintf(w, "\n%s\n", dd.Name)
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "  base ↓ new →\tearly\tmid\tlate\tnever\t")
		for i, row := range dd.Moves {
			fmt.Fprintf(tw, "  %s\t%d\t%d\t%d\t%d\t\n", bucketNames[i], row[0], row[1], row[2], row[3])
		}
		tw.Flush()
		fmt.Fprintf(w, "  moved %d: %d to never, %d out of never, %d no longer early, %d newly early\n",
			m.Moved, m.NeverAdded, m.NeverRemoved, m.EarlyLost, m.EarlyAdded)
		fmt.Fprintf(w, "  shown %s → %s: gained %s (%s), lost %s (%s)\n", sec(m.ShownSBase), sec(m.ShownSNew),
			sec(m.GainedShownS), signedPct(m.GainedShownPct), sec(m.LostShownS), signedPct(-m.LostShownPct))
		fmt.Fprintf(w, "  footprint area-seconds %.4g → %.4g km²·s (%s)\n", m.AreaSBase/1e6, m.AreaSNew/1e6, signedPct(m.AreaChangePct))
		fmt.Fprintf(w, "  zoom %.2f–%.2f → %.2f–%.2f, pitch %.1f–%.1f° → %.1f–%.1f°, band changes %d → %d\n",
			m.ZoomMinBase, m.ZoomMaxBase, m.ZoomMinNew, m.ZoomMaxNew, m.PitchMinBase, m.PitchMaxBase, m.PitchMinNew, m.PitchMaxNew,
			m.BandChangesBase, m.BandChangesNew)
	}
	writeGates(w, gates, "")
	return nil
}

func writeGates(w io.Writer, gates []Verdict, bullet string) {
	if len(gates) == 0 {
		return
	}
	fmt.Fprintln(w)
	for _, g := range gates {
		verdict := "passes"
		if g.Holds {
			verdict = "FAILS"
		}
		fmt.Fprintf(w, "%sgate %s: %s (the total is %.4g)\n", bullet, g.Condition, verdict, g.Value)
	}
}

// perDriveMarkers is the number of markers each drive was run with.
func (r *Comparison) perDriveMarkers() int {
	if len(r.Drives) == 0 {
		return 0
	}
	return r.Drives[0].Markers
}

// Plot names a picture the markdown report links.
type Plot struct {
	Title string
	File  string // relative to the report
}

// WriteMarkdown writes the report ready to paste into a code review,
// linking the plots.
func (r *Comparison) WriteMarkdown(w io.Writer, baseName, newName string, gates []Verdict, plots []Plot) error {
	fmt.Fprintf(w, "## Zoom rules: `%s` → `%s`\n\n", baseName, newName)
	fmt.Fprintf(w, "%d drive(s), %d marker(s) each.\n\n", len(r.Drives), r.perDriveMarkers())
	if len(gates) > 0 {
		for _, g := range gates {
			mark := "✅ passes"
			if g.Holds {
				mark = "❌ fails"
			}
			fmt.Fprintf(w, "- gate `%s` %s (total %.4g)\n", g.Condition, mark, g.Value)
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintln(w, "| drive | moved | to never | out of never | shown gained | shown lost | area-seconds | band changes | zoom range | pitch range |")
	fmt.Fprintln(w, "|---|---:|---:|---:|---:|---:|---:|---:|---|---|")
	for _, dd := range append(append([]TripDiff(nil), r.Drives...), r.Total) {
		m := &dd.Measures
		name := dd.Name
		if name == "total" {
			name = "**total**"
		}
		fmt.Fprintf(w, "| %s | %d | %d | %d | %s (%s) | %s (%s) | %s | %d → %d | %.2f–%.2f → %.2f–%.2f | %.1f–%.1f° → %.1f–%.1f° |\n",
			name, m.Moved, m.NeverAdded, m.NeverRemoved, sec(m.GainedShownS), signedPct(m.GainedShownPct),
			sec(m.LostShownS), signedPct(-m.LostShownPct), signedPct(m.AreaChangePct), m.BandChangesBase, m.BandChangesNew,
			m.ZoomMinBase, m.ZoomMaxBase, m.ZoomMinNew, m.ZoomMaxNew, m.PitchMinBase, m.PitchMaxBase, m.PitchMinNew, m.PitchMaxNew)
	}
	fmt.Fprintf(w, "\n### Markers moving between buckets (all drives)\n\n")
	fmt.Fprintln(w, "| base ↓ new → | early | mid | late | never |")
	fmt.Fprintln(w, "|---|---:|---:|---:|---:|")
	for i, row := range r.Total.Moves {
		cells := make([]string, 4)
		for j, n := range row {
			cells[j] = fmt.Sprint(n)
			if i == j {
				cells[j] = "*" + cells[j] + "*"
			}
		}
		fmt.Fprintf(w, "| %s | %s |\n", bucketNames[i], strings.Join(cells, " | "))
	}
	if len(plots) > 0 {
		fmt.Fprintf(w, "\n### Plots\n\n")
		for _, p := range plots {
			fmt.Fprintf(w, "- [%s](%s)\n", p.Title, p.File)
		}
		fmt.Fprintln(w)
		for _, p := range plots {
			fmt.Fprintf(w, "![%s](%s)\n\n", p.Title, p.File)
		}
	}
	return nil
}
