package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
)

func newFixturesCmd() *cobra.Command {
	cmd := &cobra.Command{
		Use:   "fixtures",
		Short: "Make, check and count fixture corpora",
	}
	cmd.AddCommand(newGenCmd(), newValidateCmd(), newStatsCmd())
	return cmd
}

// maxComparedBytes is the largest corpus gen compares its output with.
const maxComparedBytes = 64 << 20

func newGenCmd() *cobra.Command {
	var seed uint64
	var count int
	var opsList, out string
	cmd := &cobra.Command{
		Use:   "gen",
		Short: "Make a deterministic fixture corpus (same seed → same bytes)",
		Long: `gen draws about --count cases from --seed across every op's named edge-case
families (equator, high latitude, antimeridian, cardinal headings, pitch 0,
the far cut, tiny and huge screens, 512-px tiles, big insets, off-centre
anchors, invalid cameras; straight, zig-zag, loop, U-turn, repeated-vertex
and antimeridian routes, markers behind the user and past the route's end;
hysteresis edges and turn overrides; cap contention and bucket edges), and
writes one case a line: id, family, op, request, the reference's answer
(expect) and its decision margins. The same seed, count and ops give the
same bytes.

When -o names a corpus that exists (up to 64 MB), gen then says, on
stderr, which cases changed against it, case by case (the first 200): a decision that flipped (in view, side,
bucket, null or not, an error code), numbers moved beyond the strict
profile's tolerance or within it (rounding), another request under the
same id, cases added or removed, margins alone; with the values that
changed and by how much, so that a reviewer looks at each before the
corpus is committed.`,
		Example: `  viewspec fixtures gen --seed 1 --count 3000 -o corpus.jsonl
  viewspec fixtures gen --seed 7 --count 500 --ops project,footprint -o camera.jsonl`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			computeHeavyGC()
			only, err := corpus.OpsIn(opsList)
			if err != nil {
				return &exitError{2, fmt.Errorf("--ops: %v", err)}
			}
			if count < 1 {
				return &exitError{2, fmt.Errorf("--count = %d: at least 1", count)}
			}
			n := 0
			gen := func(w io.Writer) (err error) {
				n, err = corpus.Generate(w, seed, count, only)
				return err
			}
			if out == "" || out == "-" {
				return gen(cmd.OutOrStdout())
			}
			if err := corpus.CheckTarget(out); err != nil {
				return &exitError{2, err}
			}
			// The corpus being replaced, if any, to tell the reviewer
			// what the regeneration changed.
			var before []corpus.Case
			compared := true
			if st, err := os.Stat(out); err == nil {
				// A corpus for review is small; a bulk one is only
				// replaced, not read whole into memory.
				if compared = st.Size() <= maxComparedBytes; compared {
					if before, err = readCorpusFile(out); err != nil {
						return err
					}
				}
			}
			if err := corpus.WriteFileAtomic(out, gen); err != nil {
				return &exitError{2, err}
			}
			stderr := cmd.ErrOrStderr()
			fmt.Fprintf(stderr, "%d cases written to %s (seed %d, %s)\n", n, out, seed, corpus.GenVersion)
			if !compared {
				fmt.Fprintf(stderr, "not compared with the corpus it replaced: larger than %d MB\n", maxComparedBytes>>20)
			}
			if before != nil {
				after, err := readCorpusFile(out)
				if err != nil {
					return err
				}
				strict := check.Profiles["strict"]
				fmt.Fprintf(stderr, "against the %s it replaced: ", out)
				check.WriteCorpusChanges(stderr, check.CorpusChanges(before, after, &strict), len(after), &strict)
			}
			return nil
		},
	}
	cmd.Flags().Uint64Var(&seed, "seed", 1, "random seed")
	cmd.Flags().IntVar(&count, "count", 3000, "about how many cases")
	cmd.Flags().StringVar(&opsList, "ops", "", "only these ops, comma-separated (default: all)")
	cmd.Flags().StringVarP(&out, "output", "o", "", "write to `FILE` (atomically; default stdout)")
	return cmd
}

func newValidateCmd() *cobra.Command {
	return &cobra.Command{
		Use:   "validate CORPUS",
		Short: "Check a corpus: schema, ids, and that the reference still gives its expectations",
		Args:  cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			f, err := os.Open(args[0])
			if err != nil {
				return &exitError{2, err}
			}
			defer f.Close()
			problems, n, err := check.ValidateCorpus(readingBar(cmd, f, "validating"))
			if err != nil {
				return &exitError{2, fmt.Errorf("%s: %v", args[0], err)}
			}
			out := cmd.OutOrStdout()
			for _, p := range problems {
				where := args[0]
				if p.Line > 0 {
					where += ":" + strconv.Itoa(p.Line)
				}
				if p.ID != "" {
					where += ": " + p.ID
				}
				fmt.Fprintf(out, "%s: %s\n", where, p.Msg)
			}
			if len(problems) > 0 {
				return &exitError{1, fmt.Errorf("%d problem(s) in %d cases", len(problems), n)}
			}
			fmt.Fprintf(out, "%s: %d cases valid\n", args[0], n)
			return nil
		},
	}
}

func readCorpusFile(name string) ([]corpus.Case, error) {
	f, err := os.Open(name)
	if err != nil {
		return nil, &exitError{2, err}
	}
	defer f.Close()
	cases, err := corpus.ReadCorpus(name, f)
	if err != nil {
		return nil, &exitError{2, err}
	}
	return cases, nil
}

func newStatsCmd() *cobra.Command {
	var asJSON bool
	cmd := &cobra.Command{
		Use:   "stats CORPUS",
		Short: "Count a corpus's cases per op and family",
		Args:  cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			cases, err := readCorpusFile(args[0])
			if err != nil {
				return err
			}
			s := corpus.StatsOf(cases)
			out := cmd.OutOrStdout()
			if asJSON {
				return writeJSON(out, s)
			}
			fmt.Fprintf(out, "%s: %d cases\n\n", args[0], s.Cases)
			tw := tabwriter.NewWriter(out, 0, 0, 2, ' ', 0)
			for _, op := range sortedStrings(s.ByOp) {
				fmt.Fprintf(tw, "%s\t%d\t\n", op, s.ByOp[op])
				for _, fam := range sortedStrings(s.ByFamily) {
					if strings.HasPrefix(fam, op+"/") {
						fmt.Fprintf(tw, "  %s\t%d\t\n", strings.TrimPrefix(fam, op+"/"), s.ByFamily[fam])
					}
				}
			}
			return tw.Flush()
		},
	}
	cmd.Flags().BoolVar(&asJSON, "json", false, "print the counts as JSON")
	return cmd
}

func sortedStrings(m map[string]int) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	for i := 1; i < len(keys); i++ {
		for j := i; j > 0 && keys[j] < keys[j-1]; j-- {
			keys[j], keys[j-1] = keys[j-1], keys[j]
		}
	}
	return keys
}

// reportFlags are the checker's output and tolerance options.
type reportFlags struct {
	profile, tolerances, junit string
	asJSON                     bool
}

func (rf *reportFlags) register(cmd *cobra.Command) {
	cmd.Flags().StringVar(&rf.profile, "profile", "strict", "tolerance profile: strict or field")
	cmd.Flags().StringVar(&rf.tolerances, "tolerances", "", "YAML `FILE` overriding the profile's tolerances (base: strict|field; pixel_px: {abs, rel}; …)")
	cmd.Flags().StringVar(&rf.junit, "junit", "", "also write JUnit XML to `FILE` (one test case per fixture)")
	cmd.Flags().BoolVar(&rf.asJSON, "json", false, "print the report as JSON")
}

func (rf *reportFlags) load() (check.Profile, error) {
	if rf.junit != "" {
		if err := corpus.CheckTarget(rf.junit); err != nil {
			return check.Profile{}, &exitError{2, fmt.Errorf("--junit: %v", err)}
		}
	}
	p, err := check.LoadProfile(rf.profile, rf.tolerances)
	if err != nil {
		return p, &exitError{2, err}
	}
	return p, nil
}

// emit prints the report and writes the JUnit file; a failed check exits 1.
func (rf *reportFlags) emit(cmd *cobra.Command, r *check.Report) error {
	if rf.junit != "" {
		if err := corpus.WriteFileAtomic(rf.junit, r.WriteJUnit); err != nil {
			return &exitError{2, err}
		}
	}
	out := cmd.OutOrStdout()
	var err error
	if rf.asJSON {
		err = writeJSON(out, r)
	} else {
		err = r.WriteText(out)
	}
	if err != nil {
		return err
	}
	if r.Failed() {
		return &exitError{1, errors.New(r.Verdict())}
	}
	return nil
}

func newCheckCmd() *cobra.Command {
	var rf reportFlags
	cmd := &cobra.Command{
		Use:   "check CORPUS ANSWERS",
		Short: "Compare another implementation's answers with a corpus",
		Long: `check matches answers to cases by id and compares every quantity under a
tolerance profile: pixels in pixels, positions by their ground distance in
metres, times in seconds. A discrete answer (in view, side, bucket, behind the
camera) that disagrees is borderline, not failed, when the reference's
decision margin is within the tolerance (SPEC §7). It prints a summary per op
and family and the worst differences. Exit 0 pass, 1 failures or missing
answers, 2 unusable input.`,
		Example: `  viewspec check corpus.jsonl answers.jsonl
  viewspec check corpus.jsonl answers.jsonl --profile field --junit report.xml`,
		Args: cobra.ExactArgs(2),
		RunE: func(cmd *cobra.Command, args []string) error {
			p, err := rf.load()
			if err != nil {
				return err
			}
			cf, err := os.Open(args[0])
			if err != nil {
				return &exitError{2, err}
			}
			defer cf.Close()
			af, err := os.Open(args[1])
			if err != nil {
				return &exitError{2, err}
			}
			defer af.Close()
			ck := check.NewChecker(p)
			ck.KeepCases = rf.junit != ""
			if err := check.CheckStreams(args[0], readingBar(cmd, cf, "checking"), args[1], af, ck); err != nil {
				return &exitError{2, err}
			}
			return rf.emit(cmd, ck.Report())
		},
	}
	rf.register(cmd)
	return cmd
}

func newRunCmd() *cobra.Command {
	var rf reportFlags
	var impl, opsList, picturesDir string
	var timeout time.Duration
	cmd := &cobra.Command{
		Use:   "run CORPUS --impl 'CMD'",
		Short: "Feed a corpus to a live implementation and check its answers in one go",
		Long: `run starts the implementation (sh -c CMD) as a child process speaking the wire
on stdin/stdout, asks hello which ops it speaks, sends every case of those ops
(others are reported as skipped, not failed) and checks each answer as it
comes. A hang (no answer within --timeout), a crash, garbage on stdout, a
missing or out-of-order answer each end in a clear note naming the case.
--pictures DIR draws the worst failed project cases (at most 5) as pictures
of the screen with both answers' pixels and the edge that decides in view,
one SVG per case named after its id.`,
		Example: `  viewspec run corpus.jsonl --impl 'python3 fixtures/examples/python/viewspec_py.py'
  viewspec run corpus.jsonl --impl './my-server --wire' --ops project,footprint --junit run.xml`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if impl == "" {
				return &exitError{2, fmt.Errorf("--impl 'CMD' is required")}
			}
			only, err := corpus.OpsIn(opsList)
			if err != nil {
				return &exitError{2, fmt.Errorf("--ops: %v", err)}
			}
			p, err := rf.load()
			if err != nil {
				return err
			}
			if timeout <= 0 {
				return &exitError{2, fmt.Errorf("--timeout = %v: must be positive", timeout)}
			}
			cf, err := os.Open(args[0])
			if err != nil {
				return &exitError{2, err}
			}
			defer cf.Close()
			ck := check.NewChecker(p)
			ck.KeepCases = rf.junit != ""
			opt := check.RunOptions{Command: impl, Timeout: timeout, Ops: only}
			var worst worstCases
			if picturesDir != "" {
				opt.OnChecked = worst.add
			}
			res, err := check.RunStream(args[0], readingBar(cmd, cf, "checking"), opt, ck)
			if err != nil {
				return &exitError{2, err}
			}
			if picturesDir != "" {
				if err := worst.write(cmd, picturesDir); err != nil {
					return &exitError{2, err}
				}
			}
			r := ck.Report()
			if !rf.asJSON {
				fmt.Fprintf(cmd.OutOrStdout(), "implementation %q speaks %s; %d requests sent, %d answered\n",
					impl, strings.Join(res.Ops, ", "), res.Sent, res.Answered)
				for _, t := range res.Trouble {
					fmt.Fprintf(cmd.OutOrStdout(), "trouble: %s\n", t)
				}
			}
			if len(res.Trouble) > 0 && !r.Failed() {
				return firstErr(rf.emit(cmd, r), &exitError{1, fmt.Errorf("%s", res.Trouble[0])})
			}
			return rf.emit(cmd, r)
		},
	}
	rf.register(cmd)
	cmd.Flags().StringVar(&impl, "impl", "", "the implementation's command line, run with sh -c")
	cmd.Flags().StringVar(&opsList, "ops", "", "only these ops, comma-separated")
	cmd.Flags().DurationVar(&timeout, "timeout", 5*time.Second, "how long to wait for each answer")
	cmd.Flags().StringVar(&picturesDir, "pictures", "", "write pictures of the worst failed project cases to `DIR` (one SVG per case)")
	return cmd
}

func firstErr(errs ...error) error {
	for _, e := range errs {
		if e != nil {
			return e
		}
	}
	return nil
}
