// Package probe is viewspec's differential prober: it draws wire requests
// biased toward the edge families (package props), asks an implementation
// under test and the reference, compares the answers under a tolerance
// profile (package check), and shrinks the first disagreement, or failure
// to answer, to a minimal case that replays as a one-line corpus.
//
// The implementation is an Impl: the reference in process, or a child
// process (Process, over package live) restarted after a crash so that a
// crash shrinks like any other disagreement. Shrinking is rapid's, run
// outside `go test` through a stand-in for testing.TB; rapid's settings
// are process-wide flags, so probes run one at a time.
package probe
