package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"time"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/check"
	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/demo"
	"github.com/viewspec/viewspec/fixtures"
	"github.com/viewspec/viewspec/internal/atomicfile"
	"github.com/viewspec/viewspec/probe"
	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

func newDemoCmd() *cobra.Command {
	var out string
	var python string
	cmd := &cobra.Command{
		Use:   "demo",
		Short: "Run the whole job on Port Wren, an invented town, and write every result to ./viewspec-demo/",
		Long: `demo runs viewspec's whole job on its embedded invented scenario, with nothing
to download: it writes a fixture corpus, checks the reference against it, runs
the independent Python implementation through the corpus clean and with a
planted mistake, probes that mistake and shows its minimal case, computes the
timelines of the town's drives, and writes everything (corpus, reports, JUnit
XML, GeoJSON of streets, routes, footprints and businesses, an interactive
page of a drive) to the output folder. Where python3 is missing it says so
and skips the steps that need it.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			return runDemo(cmd.OutOrStdout(), out, python)
		},
	}
	cmd.Flags().StringVarP(&out, "output", "o", "viewspec-demo", "folder to write into")
	cmd.Flags().StringVar(&python, "python", "python3", "the Python 3 interpreter for the second implementation")
	return cmd
}

// demoRun keeps the demo's steps tidy: where files go, what was found.
type demoRun struct {
	w       io.Writer
	dir     string
	files   []string
	summary []string
	start   time.Time
}

func (d *demoRun) step(format string, args ...any) {
	fmt.Fprintf(d.w, "\n[%4.1fs] "+format+"\n", append([]any{time.Since(d.start).Seconds()}, args...)...)
}

func (d *demoRun) write(name string, data []byte) error {
	p := filepath.Join(d.dir, name)
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		return err
	}
	if err := atomicfile.WriteBytes(p, data); err != nil {
		return err
	}
	d.files = append(d.files, p)
	return nil
}

func (d *demoRun) writeWith(name string, fn func(w io.Writer) error) ([]byte, error) {
	var b bytes.Buffer
	if err := fn(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), d.write(name, b.Bytes())
}

func runDemo(w io.Writer, dir, python string) error {
	d := &demoRun{w: w, dir: dir, start: time.Now()}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return &exitError{2, err}
	}
	self, err := os.Executable()
	if err != nil {
		return err
	}
	town := demo.Default()
	fmt.Fprintf(w, "viewspec demo: Port Wren, an invented island town (%d streets, %d businesses, %d drives)\n",
		len(town.Streets), len(town.Businesses), len(town.Drives))
	if err := d.writeTown(town); err != nil {
		return err
	}
	cases, err := d.checkReference(shellQuote(self) + " eval")
	if err != nil {
		return err
	}
	if err := d.python(cases, python); err != nil {
		return err
	}
	if err := d.drives(town); err != nil {
		return err
	}
	if err := d.fleet(town); err != nil {
		return err
	}
	d.printSummary()
	return nil
}

// writeTown writes the scenario's files: streets, businesses, drives, rule
// sets.
func (d *demoRun) writeTown(town *demo.Scenario) error {
	d.step("writing the town: streets, businesses, drives, rule sets")
	written, err := town.WriteFiles(d.dir)
	if err != nil {
		return err
	}
	d.files = append(d.files, written...)
	return nil
}

// checkReference makes a corpus and checks the reference against it
// through the wire (eval is the command that runs `viewspec eval`).
func (d *demoRun) checkReference(eval string) ([]corpus.Case, error) {
	d.step("making a fixture corpus (seed 1, about 1,500 cases) and checking the reference through `viewspec eval`")
	corpusFile := filepath.Join(d.dir, "corpus.jsonl")
	if err := corpus.WriteFileAtomic(corpusFile, func(w io.Writer) error {
		_, err := corpus.Generate(w, 1, 1500, nil)
		return err
	}); err != nil {
		return nil, err
	}
	d.files = append(d.files, corpusFile)
	cases, err := readCorpusFile(corpusFile)
	if err != nil {
		return nil, err
	}
	ref, err := d.run(cases, eval, "reference")
	if err != nil {
		return nil, err
	}
	d.summary = append(d.summary, fmt.Sprintf("the reference passes its own corpus: %d of %d cases (strict)", ref.Counts.Pass, len(cases)))
	return cases, nil
}

// python runs the independent Python implementation through the corpus,
// clean and with a planted mistake, and probes the mistake; without
// python3 it says so and skips.
func (d *demoRun) python(cases []corpus.Case, python string) error {
	py, err := exec.LookPath(python)
	if err != nil {
		d.step("python3 not found: skipping the second implementation, its planted mistake and the probe")
		d.summary = append(d.summary, "python3 is missing: the Python steps were skipped (install Debian's python3 to see them)")
		return nil
	}
	script := filepath.Join(d.dir, "python", "viewspec_py.py")
	if err := d.write(filepath.Join("python", "viewspec_py.py"), fixtures.PythonExample); err != nil {
		return err
	}
	impl := shellQuote(py) + " " + shellQuote(script)
	d.step("running the independent Python implementation through the corpus")
	clean, err := d.run(cases, impl, "python-clean")
	if err != nil {
		return err
	}
	verdict := "passes"
	if clean.Failed() {
		verdict = "FAILS"
	}
	d.summary = append(d.summary, fmt.Sprintf("the Python implementation %s the corpus: %d pass, %d borderline, %d fail, %d skipped (ops it does not speak)",
		verdict, clean.Counts.Pass, clean.Counts.Borderline, clean.Counts.Fail, clean.Counts.Skipped))

	const mistake = "heading-ccw"
	d.step("running it again with a planted mistake: %s (the heading taken counter-clockwise)", mistake)
	bad, err := d.run(cases, impl+" --mistake "+mistake, "python-"+mistake)
	if err != nil {
		return err
	}
	d.summary = append(d.summary, fmt.Sprintf("with the planted mistake %s it fails %d cases — caught", mistake, bad.Counts.Fail))
	return d.probe(impl + " --mistake " + mistake)
}

// probe probes an implementation with a planted mistake and writes the
// shrunk finding as a one-line corpus.
func (d *demoRun) probe(impl string) error {
	d.step("probing the planted mistake and shrinking what it finds")
	proc := probe.NewCommand(impl, 5*time.Second)
	f, err := probe.Find(proc, probe.Options{Ops: []string{"project"}, Checks: 1000, Seed: 1, ShrinkTime: 10 * time.Second})
	proc.Close()
	if err != nil {
		return err
	}
	if f == nil {
		d.summary = append(d.summary, "the prober did not find the planted mistake (unexpected)")
		return nil
	}
	printFinding(d.w, f)
	line, err := corpus.CaseLine(f.Case)
	if err != nil {
		return err
	}
	if err := d.write("probe-finding.jsonl", line); err != nil {
		return err
	}
	d.summary = append(d.summary, fmt.Sprintf("the prober found it after %d case(s) and shrank it to %s: probe-finding.jsonl", f.Checks, describeCase(f.Case)))
	return nil
}

// printSummary prints the summary and the files worth opening.
func (d *demoRun) printSummary() {
	fmt.Fprintf(d.w, "\nsummary (%.1f s):\n", time.Since(d.start).Seconds())
	for _, s := range d.summary {
		fmt.Fprintf(d.w, "  - %s\n", s)
	}
	fmt.Fprintf(d.w, "\n%d files in %s/, among them:\n", len(d.files), d.dir)
	for _, f := range d.files {
		keep := strings.HasSuffix(f, ".html") || strings.HasSuffix(f, "report.txt") || strings.HasSuffix(f, "timelines.txt") ||
			strings.HasSuffix(f, "reference-junit.xml")
		if keep {
			fmt.Fprintf(d.w, "  %s\n", f)
		}
	}
}

// run feeds the corpus to an implementation and writes its text report and
// JUnit XML.
func (d *demoRun) run(cases []corpus.Case, impl, name string) (*check.Report, error) {
	ck := check.NewChecker(check.Profiles["strict"])
	res, err := check.Run(cases, check.RunOptions{Command: impl}, ck)
	if err != nil {
		return nil, err
	}
	r := ck.Report()
	text, err := d.writeWith(name+"-report.txt", func(w io.Writer) error {
		for _, t := range res.Trouble {
			fmt.Fprintf(w, "trouble: %s\n", t)
		}
		return r.WriteText(w)
	})
	if err != nil {
		return nil, err
	}
	if _, err := d.writeWith(name+"-junit.xml", r.WriteJUnit); err != nil {
		return nil, err
	}
	first, _, _ := bytes.Cut(text, []byte("\n"))
	fmt.Fprintf(d.w, "  %s  (%s-report.txt)\n", first, name)
	return r, nil
}

// drives computes each drive's timeline on the phone, and writes the
// timelines, the footprints at a few moments as GeoJSON, and an
// interactive page of the town drive.
func (d *demoRun) drives(town *demo.Scenario) error {
	dev, ok := town.Device(demo.DevicePhonePortrait)
	if !ok {
		return fmt.Errorf("demo: no phone device")
	}
	d.step("driving the town's drives on a phone with the phone rules (120 s, 0.25 s ticks, 4 markers at once)")
	markers := town.Markers()
	var table bytes.Buffer
	fc := geojson.NewFeatureCollection()
	for _, dr := range town.Drives {
		td, err := town.TimelineDrive(dr, dev)
		if err != nil {
			return err
		}
		every := int(10 / td.TickS) // a footprint every 10 s
		td.OnTick = func(k int, v *viewport.View, shown []int) {
			if k%every != 0 {
				return
			}
			fp := v.Footprint()
			if fp.Empty {
				return
			}
			ring := orb.Ring{}
			for _, p := range fp.Vertices {
				ring = append(ring, p)
			}
			ring = append(ring, ring[0])
			f := geojson.NewFeature(orb.Polygon{ring})
			f.Properties["drive"] = dr.Name
			f.Properties["t_s"] = float64(k) * td.TickS
			f.Properties["zoom"] = v.Camera().Zoom
			f.Properties["pitch_deg"] = v.Camera().PitchDeg
			f.Properties["shown"] = len(shown)
			fc.Append(f)
		}
		got, err := timeline.Compute(&td, markers)
		if err != nil {
			return err
		}
		lines := wire.TimelineOf(markers, got)
		counts := map[string]int{}
		for _, l := range lines {
			counts[l.Bucket]++
		}
		line := fmt.Sprintf("drive %-11s %6.0f m: early %3d, mid %3d, late %3d, never %3d", dr.Name, mustLength(dr), counts["early"], counts["mid"], counts["late"], counts["never"])
		fmt.Fprintf(d.w, "  %s\n", line)
		fmt.Fprintf(&table, "%s\n", line)
		if _, err := d.writeWith("timeline-"+dr.Name+".csv", func(w io.Writer) error { return writeTimelineCSV(w, lines) }); err != nil {
			return err
		}
	}
	if err := d.write("timelines.txt", table.Bytes()); err != nil {
		return err
	}
	fpJSON, err := fc.MarshalJSON()
	if err != nil {
		return err
	}
	if err := d.write("footprints.geojson", fpJSON); err != nil {
		return err
	}
	d.summary = append(d.summary, "timelines of the three drives: timelines.txt and timeline-*.csv; footprints every 10 s: footprints.geojson")

	town1, _ := town.Drive(demo.DriveTown)
	td, err := town.TimelineDrive(town1, dev)
	if err != nil {
		return err
	}
	streets := make([]render.Street, len(town.Streets))
	for i, st := range town.Streets {
		streets[i] = render.Street{Name: st.Name, Points: st.Points}
	}
	names := make(map[string]string, len(town.Businesses))
	for _, b := range town.Businesses {
		names[b.ID] = b.Name
	}
	page, err := render.DriveHTML(&td, markers, render.WithTitle("Port Wren, the town drive, on a phone"), render.WithRulesName("phone"),
		render.WithStreets(streets), render.WithNames(names))
	if err != nil {
		return err
	}
	if err := d.write("drive-town.html", page); err != nil {
		return err
	}
	d.summary = append(d.summary, "an interactive page of the town drive (open it in a browser, move the slider): drive-town.html")
	return nil
}

// describeCase says in a few words what a camera case holds.
func describeCase(c corpus.Case) string {
	var req wire.Request
	if err := json.Unmarshal(c.Request, &req); err != nil || req.Camera == nil || req.Camera.PitchDeg == nil {
		return "a minimal case"
	}
	return fmt.Sprintf("a camera with heading %s°, pitch %s°, zoom %s and %d point(s)",
		spec.FormatNumber(*req.Camera.HeadingDeg), spec.FormatNumber(*req.Camera.PitchDeg),
		spec.FormatNumber(*req.Camera.Zoom), len(req.Points)+len(req.Pixels))
}

func mustLength(dr demo.Tour) float64 {
	r, err := dr.Route()
	if err != nil {
		return 0
	}
	return r.LengthM()
}

// shellQuote quotes s for sh -c.
func shellQuote(s string) string {
	if s != "" && !strings.ContainsAny(s, " \t\n'\"\\$`!*?[]{}()<>|&;#~") {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}
