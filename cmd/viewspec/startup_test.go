package main

import (
	"bufio"
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// initLine is one line of the Go runtime's GODEBUG=inittrace=1 report:
// "init PKG @T ms, C ms clock, B bytes, A allocs".
var initLine = regexp.MustCompile(`^init (\S+) @\S+ ms, (\S+) ms clock, (\d+) bytes, (\d+) allocs$`)

// initBytes runs the program at path with args under GODEBUG=inittrace=1
// and returns the bytes each package's initialisation allocated.
func initBytes(t testing.TB, path string, args ...string) map[string]int {
	t.Helper()
	cmd := exec.Command(path, args...)
	cmd.Env = append(os.Environ(), "GODEBUG=inittrace=1")
	var stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = nil, &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("%s %s: %v\n%s", path, strings.Join(args, " "), err, stderr.String())
	}
	out := map[string]int{}
	sc := bufio.NewScanner(&stderr)
	for sc.Scan() {
		if m := initLine.FindStringSubmatch(sc.Text()); m != nil {
			n, _ := strconv.Atoi(m[3])
			out[m[1]] += n
		}
	}
	if len(out) == 0 {
		t.Fatalf("no inittrace lines from %s:\n%s", path, stderr.String())
	}
	return out
}

// Starting the program does no work it may not need: every start of
// `viewspec eval` (which `run` starts once per implementation) or of a
// one-line command pays for the package initialisation of everything
// linked in. The JSON Schema library compiled five drafts' metaschemas at
// init (1.7 MB allocated, 2-3 ms of a 9-10 ms start), and the property
// testing library (linked for the prober's shrinking) expanded every
// Unicode category into its rune generators (1.2 MB, 3.6-4.0 ms);
// third_party/README.md says how each is changed. Our own schemas are
// compiled on first use.
// Allocation is counted, not time, so the test does not depend on the
// machine's load. The test binary links every package the command does.
func TestStartupInitialisesLittle(t *testing.T) {
	self, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	bytesBy := initBytes(t, self, "-test.run=^$")
	const limit = 64 << 10
	checked := 0
	for pkg, n := range bytesBy {
		ours := strings.HasPrefix(pkg, "github.com/viewspec/")
		if !ours && pkg != "github.com/santhosh-tekuri/jsonschema/v6" && pkg != "pgregory.net/rapid" {
			continue
		}
		checked++
		if n > limit {
			t.Errorf("init of %s allocates %d bytes at every start (at most %d)", pkg, n, limit)
		}
	}
	if checked == 0 {
		t.Fatalf("the report names none of the packages checked: %v", bytesBy)
	}
}

// The start of the command itself, --version: the whole of it, the
// runtime's start included (compare with `perf stat -r 50 viewspec
// --version`).
func BenchmarkStartup(b *testing.B) {
	bin := filepath.Join(b.TempDir(), "viewspec")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		b.Fatalf("go build: %v\n%s", err, out)
	}
	for b.Loop() {
		if err := exec.Command(bin, "--version").Run(); err != nil {
			b.Fatal(err)
		}
	}
}
