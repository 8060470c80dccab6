package fleet

import (
	"bytes"
	"compress/gzip"
	"context"
	"encoding/json"
	"flag"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/runners/prism"
	"github.com/parquet-go/parquet-go"

	"github.com/viewspec/viewspec/audit"
	"github.com/viewspec/viewspec/demo"
)

// Shared helpers of the package's tests.

// writeRules writes the demo town's rule sets into a folder, as `viewspec
// demo` writes viewspec-demo/fleet/rules/.
func writeRules(t testing.TB, s *demo.Scenario) string {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "rules")
	os.MkdirAll(dir, 0o755)
	for _, r := range s.RuleSets {
		if err := os.WriteFile(filepath.Join(dir, r.File), r.YAML, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

// writeLog writes lines as one drive log, gzipped when name ends in .gz.
func writeLog(t testing.TB, name string, lines [][]byte) {
	t.Helper()
	var buf bytes.Buffer
	var w io.Writer = &buf
	var zw *gzip.Writer
	if strings.HasSuffix(name, ".gz") {
		zw, _ = gzip.NewWriterLevel(&buf, gzip.BestSpeed)
		w = zw
	}
	for _, l := range lines {
		w.Write(l)
		w.Write([]byte{'\n'})
	}
	if zw != nil {
		zw.Close()
	}
	if err := os.WriteFile(name, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// fleetLines returns records [from, to) of the demo fleet (demo.FleetRecord,
// the records `viewspec demo` writes to viewspec-demo/fleet/).
func fleetLines(t testing.TB, s *demo.Scenario, from, to int) [][]byte {
	t.Helper()
	var ls [][]byte
	for i := from; i < to; i++ {
		l, err := s.FleetRecord(i)
		if err != nil {
			t.Fatal(err)
		}
		ls = append(ls, l)
	}
	return ls
}

// runPipeline runs the audit of cfg on Prism in this process.
func runPipeline(t testing.TB, cfg Config) {
	t.Helper()
	p, s := beam.NewPipelineWithRoot()
	Build(s, cfg)
	if _, err := prism.Execute(context.Background(), p); err != nil {
		t.Fatalf("prism: %v", err)
	}
}

// mainModule returns the root of the main module (the parent folder).
func mainModule(t testing.TB) string {
	t.Helper()
	root, err := filepath.Abs("..")
	if err != nil {
		t.Fatal(err)
	}
	return root
}

// buildTool builds a command of a module into a temporary folder.
func buildTool(t testing.TB, dir, pkg, name string) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), name)
	cmd := exec.Command("go", "build", "-o", bin, pkg)
	cmd.Dir = dir
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("go build %s: %v\n%s", pkg, err, out)
	}
	return bin
}

// readRows reads the labels-and-features rows of Parquet files, each row as
// its JSON, sorted.
func readRows(t testing.TB, files []string) []string {
	t.Helper()
	var out []string
	for _, f := range files {
		rows, err := parquet.ReadFile[audit.Row](f)
		if err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		for _, r := range rows {
			b, _ := json.Marshal(r)
			out = append(out, string(b))
		}
	}
	sort.Strings(out)
	return out
}

// readLines reads the lines of files.
func readLines(t testing.TB, files []string) []string {
	t.Helper()
	var out []string
	for _, f := range files {
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		for _, l := range strings.Split(strings.TrimSuffix(string(b), "\n"), "\n") {
			if l != "" {
				out = append(out, l)
			}
		}
	}
	return out
}

// glob returns the files matching pattern.
func glob(t testing.TB, pattern string) []string {
	t.Helper()
	m, err := filepath.Glob(pattern)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// TestMain initialises Beam, as every Beam program does before it builds a
// pipeline.
func TestMain(m *testing.M) {
	flag.Parse()
	beam.Init()
	os.Exit(m.Run())
}
