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
