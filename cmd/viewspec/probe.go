package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/probe"
	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"
)

func newProbeCmd() *cobra.Command {
	var impl, opsList, profile, outDir string
	var checks int
	var seed uint64
	var timeout, shrink time.Duration
	cmd := &cobra.Command{
		Use:   "probe --impl 'CMD'",
		Short: "Hunt for a disagreement nobody wrote a fixture for, and shrink it to a minimal case",
		Long: `probe draws cases of every op the implementation speaks (cameras, routes,
markers and rule sets biased toward the edges), asks the implementation and
the reference, and compares them under the profile's tolerances and the
reference's decision margins. At the first failure it shrinks the case to a
minimal one (fewest points, markers and vertices; round numbers: pitch 0,
heading 0, an integral zoom where the bug allows), prints it with both answers
and what differs, writes it as a one-line corpus that 'viewspec run' replays,
and exits 1. A crash or a hang of the implementation is a finding too. The
same seed draws the same cases.`,
		Example: `  viewspec probe --impl 'python3 fixtures/examples/python/viewspec_py.py --mistake heading-ccw'
  viewspec probe --impl './server --wire' --ops project,footprint --checks 5000 --seed 42`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if impl == "" {
				return &exitError{2, fmt.Errorf("--impl 'CMD' is required")}
			}
			if checks < 1 {
				return &exitError{2, fmt.Errorf("--checks = %d: at least 1 case per op", checks)}
			}
			if timeout <= 0 {
				return &exitError{2, fmt.Errorf("--timeout = %v: must be positive", timeout)}
			}
			if shrink <= 0 {
				return &exitError{2, fmt.Errorf("--shrink-time = %v: must be positive", shrink)}
			}
			p, err := check.LoadProfile(profile, "")
			if err != nil {
				return &exitError{2, err}
			}
			var ops []string
			if opsList != "" {
				only, err := corpus.OpsIn(opsList)
				if err != nil {
					return &exitError{2, fmt.Errorf("--ops: %v", err)}
				}
				for _, op := range reference.Ops() {
					if only[op] {
						ops = append(ops, op)
					}
				}
			}
			proc := probe.NewCommand(impl, timeout)
			defer proc.Close()
			stderr := cmd.ErrOrStderr()
			f, err := probe.Find(proc, probe.Options{Ops: ops, Checks: checks, Seed: seed, Profile: p, ShrinkTime: shrink,
				Log:      func(format string, args ...any) { fmt.Fprintf(stderr, "probe: "+format+"\n", args...) },
				Progress: probeBar(cmd)})
			if err != nil {
				return &exitError{2, err}
			}
			w := cmd.OutOrStdout()
			if f == nil {
				fmt.Fprintf(w, "no disagreement in %d cases per op (seed %d, %s profile)\n", checks, seed, p.Name)
				return nil
			}
			printFinding(w, f)
			if err := os.MkdirAll(outDir, 0o755); err != nil {
				return &exitError{2, err}
			}
			out := filepath.Join(outDir, "probe-finding.jsonl")
			if err := corpus.WriteFileAtomic(out, func(w io.Writer) error {
				b, err := corpus.CaseLine(f.Case)
				if err != nil {
					return err
				}
				_, err = w.Write(b)
				return err
			}); err != nil {
				return &exitError{2, err}
			}
			fmt.Fprintf(w, "\nthe minimal case is in %s; replay it with:\n  viewspec run %s --impl %q\n", out, out, impl)
			if svg, ok, err := projectOverlay(&f.Case, f.Got, f.Diffs, "the implementation"); err != nil {
				return &exitError{2, err}
			} else if ok {
				pic := filepath.Join(outDir, "probe-finding.svg")
				if err := writeFileAtomic(pic, svg); err != nil {
					return &exitError{2, err}
				}
				fmt.Fprintf(w, "a picture of the screen with both answers and the edge that decides: %s\n", pic)
			}
			return &exitError{1, fmt.Errorf("%s: disagreement found", f.Op)}
		},
	}
	cmd.Flags().StringVar(&impl, "impl", "", "the implementation's command line, run with sh -c")
	cmd.Flags().StringVar(&opsList, "ops", "", "only these ops, comma-separated (default: every op it speaks)")
	cmd.Flags().IntVar(&checks, "checks", 1000, "cases to draw per op")
	cmd.Flags().Uint64Var(&seed, "seed", 1, "random seed (the same seed draws the same cases)")
	cmd.Flags().StringVar(&profile, "profile", "strict", "tolerance profile: strict or field")
	cmd.Flags().StringVarP(&outDir, "out", "o", "viewspec-probe", "`DIR` to write the minimal case to, as probe-finding.jsonl (a one-line corpus), with a picture of a project disagreement as probe-finding.svg")
	cmd.Flags().DurationVar(&timeout, "timeout", 5*time.Second, "how long to wait for each answer")
	cmd.Flags().DurationVar(&shrink, "shrink-time", 30*time.Second, "how long to spend shrinking at most")
	return cmd
}

// maxQuote is the most of a request or an answer a finding quotes.
const maxQuote = 4000

// printFinding shows a minimal case, both answers and what differs.
func printFinding(w io.Writer, f *probe.Disagreement) {
	how := "shrunk"
	if !f.Shrunk {
		how = "not shrunk (the shrinker did not meet it again)"
	}
	fmt.Fprintf(w, "DISAGREEMENT in op %s (family %s), found after %d case(s), %s:\n\n", f.Op, f.Family, f.Checks, how)
	fmt.Fprintf(w, "request:\n  %s\n", spec.Excerpt(f.Case.Request, maxQuote))
	if pts := latLons(f.Case.Request); pts != "" {
		fmt.Fprintf(w, "points (lat, lon):\n%s", pts)
	}
	fmt.Fprintf(w, "reference answers:\n  %s\n", spec.Excerpt(f.Case.Expect, maxQuote))
	if f.Err != "" {
		fmt.Fprintf(w, "implementation: %s\n", spec.Excerpt([]byte(f.Err), maxQuote))
		return
	}
	fmt.Fprintf(w, "implementation answers:\n  %s\n", spec.Excerpt(f.Got, maxQuote))
	fmt.Fprintln(w, "differences:")
	for _, d := range f.Diffs {
		line := fmt.Sprintf("  %s: got %s, want %s", d.Path, d.Got, d.Want)
		if d.Diff > 0 {
			line += fmt.Sprintf(" (off by %s, %s tolerance %s)", spec.FormatNumber(d.Diff), d.Quantity, spec.FormatNumber(d.Allowed))
		} else if d.Quantity != "shape" {
			line += fmt.Sprintf(" (%s decision)", d.Quantity)
		}
		if d.Note != "" {
			line += " — " + d.Note
		}
		fmt.Fprintln(w, strings.TrimRight(line, " "))
	}
	for _, e := range probe.Explain(f) {
		fmt.Fprintf(w, "  why the reference decides so: %s\n", e)
	}
}

// latLons lists the request's points and user as labelled (lat, lon)
// pairs, one a line, or "" when it has none.
func latLons(request []byte) string {
	var req wire.Request
	if wire.DecodeRequest(request, &req) != nil {
		return ""
	}
	var b strings.Builder
	add := func(label string, p *wire.Point) {
		if p != nil && p.Lat != nil && p.Lon != nil {
			fmt.Fprintf(&b, "  %s: lat %s, lon %s\n", label, spec.FormatNumber(*p.Lat), spec.FormatNumber(*p.Lon))
		}
	}
	if c := req.Camera; c != nil && c.Lat != nil && c.Lon != nil {
		add("camera", &wire.Point{Lat: c.Lat, Lon: c.Lon})
	}
	add("user", req.User)
	for i, p := range req.Points {
		if i == 20 {
			fmt.Fprintf(&b, "  … and %d more\n", len(req.Points)-20)
			break
		}
		add(fmt.Sprintf("points[%d]", i), p)
	}
	for i, m := range req.Markers {
		if i == 20 {
			fmt.Fprintf(&b, "  … and %d more\n", len(req.Markers)-20)
			break
		}
		if m != nil && m.ID != nil {
			add(fmt.Sprintf("markers[%d] %q", i, *m.ID), &wire.Point{Lat: m.Lat, Lon: m.Lon})
		}
	}
	return b.String()
}

// probeBar returns a progress callback drawing one bar per op on a
// terminal, or nil.
func probeBar(cmd *cobra.Command) func(op string, done, total int) {
	var last string
	var bar func(done, total int)
	return func(op string, done, total int) {
		if op != last {
			last, bar = op, countBar(cmd, "probing "+op)
		}
		if bar != nil {
			bar(done, total)
		}
	}
}
