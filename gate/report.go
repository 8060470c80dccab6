package gate

import (
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"
	"unicode"
)

// How many moved markers the reports list before "and N more": per drive
// in the text report, in all in the markdown report. The JSON report lists
// them all.
const (
	textMovesPerDrive = 10
	markdownMoves     = 50
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

// unsignedPct writes a percentage that is ≥ 0 by its definition (gained, lost).
func unsignedPct(v float64) string { return fmt.Sprintf("%.1f %%", v) }

// signedPct writes a change that may go either way (area).
func signedPct(v float64) string { return fmt.Sprintf("%+.1f %%", v) }

// count says "1 drive" or "3 drives".
func count(n int, what string) string {
	if n == 1 {
		return "1 " + what
	}
	return strconv.Itoa(n) + " " + what + "s"
}

// shownAt writes a first-shown time, or says it was never shown.
func shownAt(t *float64) string {
	if t == nil {
		return "never shown"
	}
	return fmt.Sprintf("%.2f s", *t)
}

// oneLine keeps a name from a file on one line of a report.
func oneLine(s string) string {
	return strings.Map(func(r rune) rune {
		if !unicode.IsGraphic(r) {
			return ' '
		}
		return r
	}, s)
}

// marker names a moved marker: its id, and its name in parentheses when
// the marker file gives one.
func (mv *MarkerMove) marker() string {
	if mv.Name == "" {
		return oneLine(mv.ID)
	}
	return oneLine(mv.ID) + " (" + oneLine(mv.Name) + ")"
}

// String says what the drives ran with, in words.
func (p TimelineParams) String() string {
	return fmt.Sprintf("%g s horizon, %g s ticks, at most %d shown at once, buckets early < %g s ≤ mid < %g s ≤ late",
		p.HorizonS, p.TickS, p.Cap, p.BucketEdgesS[0], p.BucketEdgesS[1])
}

// WriteText writes the report for a terminal.
func (r *Comparison) WriteText(w io.Writer, baseName, newName string, gates []Verdict) error {
	fmt.Fprintf(w, "rules diff: %s → %s on %s, %s\n", baseName, newName, count(len(r.Drives), "drive"), count(r.perDriveMarkers(), "marker"))
	fmt.Fprintf(w, "timeline: %s\n", r.Timeline)
	fmt.Fprintln(w, "shown time gained and lost: the markers' increases and decreases of shown seconds, summed, and in % of the base rules' shown seconds")
	for k, dd := range append(append([]TripDiff(nil), r.Drives...), r.Total) {
		m := &dd.Measures
		fmt.Fprintf(w, "\n%s\n", oneLine(dd.Name))
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "  base ↓ new →\tearly\tmid\tlate\tnever\t")
		for i, row := range dd.Moves {
			fmt.Fprintf(tw, "  %s\t%d\t%d\t%d\t%d\t\n", bucketNames[i], row[0], row[1], row[2], row[3])
		}
		tw.Flush()
		fmt.Fprintf(w, "  moved %d: %d to never, %d out of never, %d no longer early, %d newly early\n",
			m.Moved, m.NeverAdded, m.NeverRemoved, m.EarlyLost, m.EarlyAdded)
		fmt.Fprintf(w, "  shown %s → %s: gained %s (%s), lost %s (%s)\n", sec(m.ShownSBase), sec(m.ShownSNew),
			sec(m.GainedShownS), unsignedPct(m.GainedShownPct), sec(m.LostShownS), unsignedPct(m.LostShownPct))
		fmt.Fprintf(w, "  footprint area-seconds %.4g → %.4g km²·s (%s)\n", m.AreaSBase/1e6, m.AreaSNew/1e6, signedPct(m.AreaChangePct))
		fmt.Fprintf(w, "  zoom %.2f–%.2f → %.2f–%.2f, pitch %.1f–%.1f° → %.1f–%.1f°, band changes %d → %d\n",
			m.ZoomMinBase, m.ZoomMaxBase, m.ZoomMinNew, m.ZoomMaxNew, m.PitchMinBase, m.PitchMaxBase, m.PitchMinNew, m.PitchMaxNew,
			m.BandChangesBase, m.BandChangesNew)
		if k < len(r.Drives) {
			r.writeTextMoves(w, k)
		}
	}
	writeGates(w, gates, "")
	return nil
}

// writeTextMoves lists the markers that moved on drive k, at most
// textMovesPerDrive of them.
func (r *Comparison) writeTextMoves(w io.Writer, k int) {
	var moves []*MarkerMove
	for i := range r.MovedMarkers {
		if r.MovedMarkers[i].drive == k {
			moves = append(moves, &r.MovedMarkers[i])
		}
	}
	if len(moves) == 0 {
		return
	}
	fmt.Fprintln(w, "  markers that moved (bucket, and first shown, under the base rules → the new):")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	for _, mv := range moves[:min(len(moves), textMovesPerDrive)] {
		fmt.Fprintf(tw, "    %s\t%s → %s\t%s → %s\n", mv.marker(), mv.From, mv.To, shownAt(mv.FirstShownSBase), shownAt(mv.FirstShownSNew))
	}
	tw.Flush()
	if n := len(moves) - textMovesPerDrive; n > 0 {
		fmt.Fprintf(w, "    and %d more (--json lists them all)\n", n)
	}
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
	fmt.Fprintf(w, "%s, %s each; timeline: %s.\n\n", count(len(r.Drives), "drive"), count(r.perDriveMarkers(), "marker"), r.Timeline)
	if len(r.Skipped) > 0 {
		fmt.Fprintf(w, "Skipped files (not drives, or named twice):\n\n")
		for _, s := range r.Skipped {
			fmt.Fprintf(w, "- `%s`: %s\n", oneLine(s.File), mdEscape(s.Reason))
		}
		fmt.Fprintln(w)
	}
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
	for k, dd := range append(append([]TripDiff(nil), r.Drives...), r.Total) {
		m := &dd.Measures
		name := mdEscape(dd.Name)
		if k == len(r.Drives) {
			name = "**total**"
		}
		fmt.Fprintf(w, "| %s | %d | %d | %d | %s (%s) | %s (%s) | %s | %d → %d | %.2f–%.2f → %.2f–%.2f | %.1f–%.1f° → %.1f–%.1f° |\n",
			name, m.Moved, m.NeverAdded, m.NeverRemoved, sec(m.GainedShownS), unsignedPct(m.GainedShownPct),
			sec(m.LostShownS), unsignedPct(m.LostShownPct), signedPct(m.AreaChangePct), m.BandChangesBase, m.BandChangesNew,
			m.ZoomMinBase, m.ZoomMaxBase, m.ZoomMinNew, m.ZoomMaxNew, m.PitchMinBase, m.PitchMaxBase, m.PitchMinNew, m.PitchMaxNew)
	}
	fmt.Fprintf(w, "\nShown gained and lost: the markers' increases and decreases of shown seconds, summed, "+
		"with their percentage of the base rules' shown seconds; both are ≥ 0, so `lost_shown_pct` 10 means 10 %% of the shown time lost.\n")
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
	r.writeMarkdownMoves(w)
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

// writeMarkdownMoves lists the markers that moved, at most markdownMoves
// of them.
func (r *Comparison) writeMarkdownMoves(w io.Writer) {
	if len(r.MovedMarkers) == 0 {
		return
	}
	fmt.Fprintf(w, "\n### Markers that moved\n\n")
	fmt.Fprintln(w, "| drive | marker | bucket, base → new | first shown, base | first shown, new |")
	fmt.Fprintln(w, "|---|---|---|---:|---:|")
	for _, mv := range r.MovedMarkers[:min(len(r.MovedMarkers), markdownMoves)] {
		fmt.Fprintf(w, "| %s | %s | %s → %s | %s | %s |\n", mdEscape(mv.Drive), mdEscape(mv.marker()), mv.From, mv.To,
			shownAt(mv.FirstShownSBase), shownAt(mv.FirstShownSNew))
	}
	if n := len(r.MovedMarkers) - markdownMoves; n > 0 {
		fmt.Fprintf(w, "\nand %d more (the JSON report lists them all).\n", n)
	}
}

// mdEscape keeps a name from a file from being read as markdown or HTML,
// or from breaking a table row.
func mdEscape(s string) string {
	var b strings.Builder
	for _, r := range oneLine(s) {
		if strings.ContainsRune("\\`*[]<>|", r) {
			b.WriteByte('\\')
		}
		b.WriteRune(r)
	}
	return b.String()
}
