// Package testtool finds the outside reference tools that tests run live
// (PROJ, GeographicLib, Chromium from Debian's packages).
package testtool

import (
	"os"
	"os/exec"
	"testing"
)

// Need returns the path of the command name. When it is missing the test is
// skipped with a message naming the Debian package to install, or fails when
// the environment variable CI is "true" (CI must install every reference).
func Need(tb testing.TB, name, debianPackage string) string {
	tb.Helper()
	path, err := exec.LookPath(name)
	if err == nil {
		return path
	}
	if os.Getenv("CI") == "true" {
		tb.Fatalf("%s not found (CI=true): install the Debian package %s", name, debianPackage)
	}
	tb.Skipf("%s not found: install the Debian package %s (apt-get install -y %s) to run this check", name, debianPackage, debianPackage)
	return ""
}

// NeedPythonModule returns the path of a Debian python3 that imports module
// (Debian installs its python3-* packages for /usr/bin/python3, not for
// other Pythons on the PATH). It skips, or fails under CI=true, naming the
// package, as Need does.
func NeedPythonModule(tb testing.TB, module, debianPackage string) string {
	tb.Helper()
	for _, py := range []string{"/usr/bin/python3", "python3"} {
		path, err := exec.LookPath(py)
		if err != nil {
			continue
		}
		if exec.Command(path, "-c", "import "+module).Run() == nil {
			return path
		}
	}
	if os.Getenv("CI") == "true" {
		tb.Fatalf("python3 with %s not found (CI=true): install the Debian package %s", module, debianPackage)
	}
	tb.Skipf("python3 with %s not found: install the Debian package %s (apt-get install -y %s) to run this check", module, debianPackage, debianPackage)
	return ""
}

// NeedNodeModule returns the path of node when it can require module (found
// through NODE_PATH). It skips, or fails under CI=true, saying how to
// install it: Debian's nodejs and npm, then `npm install module@version`
// into a folder named by NODE_PATH.
func NeedNodeModule(tb testing.TB, module, version string) string {
	tb.Helper()
	node, err := exec.LookPath("node")
	if err == nil && exec.Command(node, "-e", "require.resolve('"+module+"')").Run() == nil {
		return node
	}
	how := "install Debian's nodejs and npm, then npm install --prefix DIR " + module + "@" + version + " and set NODE_PATH=DIR/node_modules"
	if os.Getenv("CI") == "true" {
		tb.Fatalf("node with %s not found (CI=true): %s", module, how)
	}
	tb.Skipf("node with %s not found: %s, to run this check", module, how)
	return ""
}
