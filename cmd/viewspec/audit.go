package main

import (
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/audit"
	"github.com/viewspec/viewspec/gate"
	"github.com/viewspec/viewspec/internal/atomicfile"
	"github.com/viewspec/viewspec/render"
)

// auditMeasures are the summary's figures --fail-if may name.
var auditMeasures = []string{"agree", "bad_records", "borderline", "candidates", "disagree", "disagree_pct",
	"displayed_never_visible", "displayed_over_cap", "findings", "records"}

// auditMeasure returns a measure of s by name.
func auditMeasure(s *audit.Summary, name string) float64 {
	switch name {
	case "agree":
		return float64(s.Agree)
	case "bad_records":
		return float64(s.BadRecords)
	case "borderline":
		return float64(s.Borderline)
	case "candidates":
		return float64(s.Candidates)
	case "disagree":
		return float64(s.Disagree)
	case "disagree_pct":
		return s.DisagreePct
	case "displayed_never_visible":
		return float64(s.DisplayedNeverVisible)
	case "displayed_over_cap":
		return float64(s.DisplayedOverCap)
	case "findings":
		return float64(len(s.Findings))
	case "records":
		return float64(s.Records)
	}
	return 0
}

// auditCmd is `audit`: its flags.
type auditCmd struct {
	rulesDir, out   string
	by, failIf      []string
	asJSON          bool
	maxBad, workers int
	worst           int
	streetsFile     string
	namesFile       string
	conds           []gate.Condition
	// bar, when set, draws progress (a terminal's bar).
	bar func(file string, n int64)
}

func newAuditCmd() *cobra.Command {
	a := &auditCmd{}
	cmd := &cobra.Command{
		Use:   "audit LOG... [--rules DIR] [--out DIR] [--by TAG]...",
		Short: "Replay logged drives and judge what the phones displayed against the reference",
		Long: `audit reads drive logs (JSON Lines, plain or gzip; SPEC §9): one record per
server request, with the positions the phone recorded, the candidates sent,
the phone's display log and, optionally, the server's predictions. It
replays each drive through the reference timeline along the recorded
positions and judges each candidate: agree, disagree (displayed or not,
first shown more than a tick apart, another bucket) or borderline (the
reference's decision lies within the field tolerances). It prints counts
and disagreement rates with Wilson 95% intervals, per group of each --by
tag, and findings that name likely causes, each with an example record
replayable as one timeline request.

With --out DIR it writes summary.json, the labels-and-features table
(labels.parquet, labels.csv; one row per candidate), bad-records.jsonl and
report.html (findings, groups, offsets, reliability diagrams and the worst
records' screens). A bad record is reported with file, line and field and
skipped; --max-bad N exits 2 when more than N are bad. --fail-if gates on
the summary, as rules diff does, and exits 1 naming each condition that
holds.

Rule sets named by a record's rules_ref are read from --rules DIR: each
*.yaml file is a rule set named by its base name (phone.yaml is "phone").

Measures: ` + strings.Join(auditMeasures, ", ") + `.`,
		Example: `  viewspec audit logs/*.jsonl.gz --rules rules/ --by client --out audit/
  viewspec audit day.jsonl --rules rules/ --json --fail-if 'disagree_pct > 0.5'`,
		Args: cobra.MinimumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			computeHeavyGC()
			a.bar = auditBar(cmd, args)
			_, err := a.run(cmd.OutOrStdout(), cmd.ErrOrStderr(), args)
			return err
		},
	}
	cmd.Flags().StringVar(&a.rulesDir, "rules", "", "folder `DIR` of rule sets (*.yaml) that records name by rules_ref")
	cmd.Flags().StringVar(&a.out, "out", "", "write the summary, tables and report into `DIR`")
	cmd.Flags().StringArrayVar(&a.by, "by", nil, "group by the record tag `TAG` (repeatable)")
	cmd.Flags().BoolVar(&a.asJSON, "json", false, "print the summary as one JSON object")
	cmd.Flags().StringArrayVar(&a.failIf, "fail-if", nil, "gate condition `EXPR` on the summary, e.g. 'disagree_pct > 0.5' (repeatable)")
	cmd.Flags().IntVar(&a.maxBad, "max-bad", -1, "exit 2 when more than `N` records are bad (default: no limit)")
	cmd.Flags().IntVar(&a.workers, "workers", 0, "records audited at once (default: one per core)")
	cmd.Flags().IntVar(&a.worst, "worst", 5, "pictures of the `N` records with the most disagreements in the report")
	cmd.Flags().StringVar(&a.streetsFile, "streets", "", "streets `FILE` (GeoJSON lines named by properties.name) drawn in the report's pictures")
	cmd.Flags().StringVar(&a.namesFile, "names", "", "markers `FILE` (GeoJSON points with properties.id and .name) naming candidates in the pictures")
	return cmd
}

// run audits logs, prints the summary to stdout and bad records to stderr,
// writes --out, and returns the summary; the error carries the exit code.
func (a *auditCmd) run(stdout, stderr io.Writer, logs []string) (*audit.Summary, error) {
	sum, err := a.audit(stdout, stderr, logs)
	if err != nil {
		return sum, err
	}
	return sum, a.gate(sum)
}

func (a *auditCmd) audit(stdout, stderr io.Writer, logs []string) (*audit.Summary, error) {
	var conds []gate.Condition
	for _, s := range a.failIf {
		c, err := gate.ParseConditionAmong(s, auditMeasures)
		if err != nil {
			return nil, &exitError{2, fmt.Errorf("--fail-if %v", err)}
		}
		conds = append(conds, c)
	}
	for _, l := range logs {
		if _, err := os.Stat(l); err != nil {
			return nil, &exitError{2, err}
		}
	}
	sets, _, err := audit.ReadRuleDir(a.rulesDir)
	if err != nil {
		return nil, &exitError{2, err}
	}
	var streets []render.Street
	if a.streetsFile != "" {
		if streets, err = readStreets(a.streetsFile); err != nil {
			return nil, err
		}
	}
	var names map[string]string
	if a.namesFile != "" {
		if _, err := os.Stat(a.namesFile); err != nil {
			return nil, &exitError{2, err}
		}
		names = readMarkerNames(a.namesFile)
	}
	if a.out != "" {
		if err := os.MkdirAll(a.out, 0o755); err != nil {
			return nil, &exitError{2, err}
		}
	}

	var bads []*audit.BadRecord
	worst := &audit.Worst{K: a.worst}
	if len(a.by) > 0 {
		worst.ByTag = a.by[0]
	}
	opt := audit.Options{Sets: sets, By: a.by, Workers: a.workers,
		OnBad: func(b *audit.BadRecord) {
			if len(bads) < 20 {
				fmt.Fprintln(stderr, "bad record:", b)
			} else if len(bads) == 20 {
				fmt.Fprintln(stderr, "more bad records: see bad-records.jsonl (with --out)")
			}
			bads = append(bads, b)
		}}
	opt.OnBytes = a.bar
	var tot *audit.Totals
	runAudit := func(table *audit.TableWriter) error {
		opt.OnResult = func(r *audit.Result) error {
			worst.Add(r)
			if table != nil {
				return table.Write(audit.Rows(r))
			}
			return nil
		}
		tot, err = audit.Run(logs, opt)
		if err != nil {
			return err
		}
		if table != nil {
			return table.Close()
		}
		return nil
	}
	if a.out == "" {
		err = runAudit(nil)
	} else {
		// Both tables are committed together when the run succeeds.
		err = atomicfile.Write(filepath.Join(a.out, "labels.csv"), func(cw io.Writer) error {
			return atomicfile.Write(filepath.Join(a.out, "labels.parquet"), func(pw io.Writer) error {
				t, err := audit.NewTableWriter(cw, pw)
				if err != nil {
					return err
				}
				return runAudit(t)
			})
		})
	}
	if err != nil {
		return nil, &exitError{2, err}
	}
	sum := tot.Summary()
	if a.out != "" {
		if err := a.writeOut(&sum, bads, worst, streets, names); err != nil {
			return nil, err
		}
	}
	if a.asJSON {
		b, err := json.Marshal(sum)
		if err != nil {
			return nil, err
		}
		fmt.Fprintf(stdout, "%s\n", b)
	} else {
		printAuditSummary(stdout, &sum)
		if a.out != "" {
			fmt.Fprintf(stdout, "report: %s\n", filepath.Join(a.out, "report.html"))
		}
	}
	if a.maxBad >= 0 && sum.BadRecords > int64(a.maxBad) {
		return &sum, &exitError{2, fmt.Errorf("%d bad records, more than --max-bad %d", sum.BadRecords, a.maxBad)}
	}
	a.conds = conds
	return &sum, nil
}

// gate returns an exit-1 error naming each --fail-if condition that holds.
func (a *auditCmd) gate(sum *audit.Summary) error {
	var held []string
	for _, c := range a.conds {
		if v := auditMeasure(sum, c.Measure); c.Compare(v) {
			held = append(held, fmt.Sprintf("%s (%s is %g)", c, c.Measure, v))
		}
	}
	if len(held) > 0 {
		return &exitError{1, fmt.Errorf("gate failed: %s", strings.Join(held, "; "))}
	}
	return nil
}

// writeOut writes summary.json, bad-records.jsonl and report.html.
func (a *auditCmd) writeOut(sum *audit.Summary, bads []*audit.BadRecord, worst *audit.Worst, streets []render.Street, names map[string]string) error {
	b, err := audit.SummaryJSON(sum)
	if err != nil {
		return err
	}
	if err := atomicfile.WriteBytes(filepath.Join(a.out, "summary.json"), b); err != nil {
		return err
	}
	var bl []byte
	for _, bad := range bads {
		line, _ := json.Marshal(bad)
		bl = append(append(bl, line...), '\n')
	}
	if err := atomicfile.WriteBytes(filepath.Join(a.out, "bad-records.jsonl"), bl); err != nil {
		return err
	}
	var moments []*audit.Moment
	for _, r := range worst.Keep {
		m, err := audit.MomentOf(r, names, streets)
		if err != nil {
			return err
		}
		if m != nil {
			moments = append(moments, m)
		}
	}
	return atomicfile.WriteBytes(filepath.Join(a.out, "report.html"), audit.ReportHTML(sum, moments))
}

// printAuditSummary prints the summary for a reader.
func printAuditSummary(w io.Writer, s *audit.Summary) {
	fmt.Fprintf(w, "%d records (%d bad), %d candidates: %d agree, %d disagree (%.2f%%, 95%% interval %.2f–%.2f%%), %d borderline\n",
		s.Records, s.BadRecords, s.Candidates, s.Agree, s.Disagree, s.DisagreePct, s.DisagreePctCI95[0], s.DisagreePctCI95[1], s.Borderline)
	if len(s.Groups) > 0 {
		fmt.Fprintf(w, "\n%-24s %8s %10s %9s %9s %10s %16s\n", "group", "records", "candidates", "disagree", "border", "disagree%", "95% interval")
		for _, g := range s.Groups {
			fmt.Fprintf(w, "%-24s %8d %10d %9d %9d %10.2f %7.2f–%-7.2f\n", g.Tag+"="+g.Value, g.Records, g.Candidates, g.Disagree, g.Borderline,
				g.DisagreePct, g.DisagreePctCI95[0], g.DisagreePctCI95[1])
		}
	}
	fmt.Fprintln(w)
	if len(s.Findings) == 0 {
		fmt.Fprintln(w, "findings: none")
		return
	}
	fmt.Fprintln(w, "findings:")
	for _, f := range s.Findings {
		fmt.Fprintf(w, "  - %s\n", f.Text)
		if f.Example != nil {
			fmt.Fprintf(w, "    example: %s\n", f.Example.RequestID)
		}
	}
}

// auditBar returns a progress callback drawing the bytes read of all logs
// on a terminal, nil elsewhere.
func auditBar(cmd *cobra.Command, logs []string) func(file string, n int64) {
	f := terminal(cmd)
	if f == nil {
		return nil
	}
	sizes := map[string]int64{}
	var total int64
	for _, l := range logs {
		if st, err := os.Stat(l); err == nil {
			sizes[l] = st.Size()
			total += st.Size()
		}
	}
	names := append([]string(nil), logs...)
	sort.Strings(names)
	done := map[string]int64{}
	bar := progressbar.NewOptions64(total, progressbar.OptionSetWriter(f), progressbar.OptionSetDescription("auditing"),
		progressbar.OptionShowBytes(true), progressbar.OptionClearOnFinish())
	var sum int64
	return func(file string, n int64) {
		sum += n - done[file]
		done[file] = n
		bar.Set64(sum)
	}
}
