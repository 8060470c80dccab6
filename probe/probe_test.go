package probe_test

import (
	"encoding/json"
	"os/exec"
	"path/filepath"
	"runtime"
	"testing"
	"time"

	"github.com/viewspec/viewspec/internal/testtool"
	"github.com/viewspec/viewspec/probe"
	"github.com/viewspec/viewspec/wire"
)

// The reference agrees with itself through the wire on every op: 10,000
// cases per op (1,000 with -short).
func TestProbeFindsNothingAgainstReference(t *testing.T) {
	checks := 10000
	if testing.Short() {
		checks = 1000
	}
	f, err := probe.Find(probe.Reference{}, probe.Options{Checks: checks, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	if f != nil {
		t.Fatalf("the reference disagrees with itself: %+v", f)
	}
}

func pythonImpl(t *testing.T, mistake string) *probe.Command {
	python := testtool.Need(t, "python3", "python3")
	_, file, _, _ := runtime.Caller(0)
	script := filepath.Join(filepath.Dir(file), "..", "fixtures", "examples", "python", "viewspec_py.py")
	cmd := python + " " + script
	if mistake != "" {
		cmd += " --mistake " + mistake
	}
	return probe.NewCommand(cmd, 5*time.Second)
}

// The prober finds each planted mistake of the Python example within 1,000
// cases, and shrinks it; the clean example passes.
func TestProbeFindsPlantedMistakes(t *testing.T) {
	ops := []string{"project", "unproject", "footprint"}
	clean := pythonImpl(t, "")
	defer clean.Close()
	if f, err := probe.Find(clean, probe.Options{Ops: ops, Checks: 300, Seed: 1}); err != nil || f != nil {
		t.Fatalf("the clean example: finding %+v, error %v", f, err)
	}
	for _, m := range []string{"degrees-as-metres", "tiles-512", "heading-ccw", "pitch-from-horizon",
		"anchor-ignored", "insets-ignored", "y-up", "fov-horizontal"} {
		p := pythonImpl(t, m)
		f, err := probe.Find(p, probe.Options{Ops: ops, Checks: 1000, Seed: 1, ShrinkTime: 20 * time.Second})
		p.Close()
		if err != nil {
			t.Fatalf("%s: %v", m, err)
		}
		if f == nil {
			t.Errorf("%s: not found in 1,000 cases per op", m)
			continue
		}
		if f.Checks > 1000 {
			t.Errorf("%s: found only after %d cases", m, f.Checks)
		}
		t.Logf("%s: found in op %s after %d cases", m, f.Op, f.Checks)
	}
}

// The shrunk case for a heading taken counter-clockwise has zero pitch and
// a single point: nothing else is needed to show the mistake.
func TestProbeShrinksHeadingMistake(t *testing.T) {
	p := pythonImpl(t, "heading-ccw")
	defer p.Close()
	f, err := probe.Find(p, probe.Options{Ops: []string{"project"}, Checks: 1000, Seed: 1})
	if err != nil || f == nil {
		t.Fatalf("finding %+v, error %v", f, err)
	}
	var req wire.Request
	if err := json.Unmarshal(f.Case.Request, &req); err != nil {
		t.Fatal(err)
	}
	if *req.Camera.PitchDeg != 0 || len(req.Points) != 1 {
		t.Fatalf("shrunk to pitch %v with %d points, want pitch 0 and 1 point: %s", *req.Camera.PitchDeg, len(req.Points), f.Case.Request)
	}
	if z := *req.Camera.Zoom; z != float64(int(z)) {
		t.Errorf("shrunk zoom %v is not a whole zoom level", z)
	}
}

// An implementation that crashes on some requests is a finding too, shrunk
// like a disagreement.
func TestProbeCrashIsAFinding(t *testing.T) {
	sh := testtool.Need(t, "sh", "dash")
	_ = sh
	eval := buildEval(t)
	// Answers hello, then dies on the first request that has a tilt.
	script := `while read -r line; do
  case "$line" in
    *'"pitch_deg":0,'*|*hello*) printf '%s\n' "$line" | ` + eval + ` ;;
    *) echo "tilted camera, giving up" >&2; exit 7 ;;
  esac
done`
	p := probe.NewCommand(script, 5*time.Second)
	defer p.Close()
	f, err := probe.Find(p, probe.Options{Ops: []string{"footprint"}, Checks: 200, Seed: 1})
	if err != nil || f == nil {
		t.Fatalf("finding %+v, error %v", f, err)
	}
	if f.Err == "" {
		t.Fatalf("finding without the crash: %+v", f)
	}
	t.Logf("crash finding: %s: %s", f.Err, f.Case.Request)
}

// buildEval builds the command line once for tests that need a wire
// implementation in a child process.
func buildEval(t testing.TB) string {
	t.Helper()
	dir := t.TempDir()
	exe := filepath.Join(dir, "viewspec")
	cmd := exec.Command("go", "build", "-o", exe, "github.com/viewspec/viewspec/cmd/viewspec")
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return exe + " eval"
}

// BenchmarkProbeEval probes the reference through `viewspec eval` in a
// child process; the reported checks/s is per op.
func BenchmarkProbeEval(b *testing.B) {
	eval := buildEval(b)
	for _, op := range []string{"project", "unproject", "footprint", "metrics", "zoom", "timeline"} {
		b.Run(op, func(b *testing.B) {
			p := probe.NewCommand(eval, 5*time.Second)
			defer p.Close()
			b.ResetTimer()
			f, err := probe.Find(p, probe.Options{Ops: []string{op}, Checks: b.N, Seed: 1})
			if err != nil || f != nil {
				b.Fatalf("finding %+v, error %v", f, err)
			}
			b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "checks/s")
		})
	}
}
