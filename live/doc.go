// Package live drives an implementation under test: a child process (a
// shell command) that speaks the wire of SPEC §6 on its stdin and stdout.
// It is the one driver `run` and `probe` share, in steps: Start the
// process, ask Hello which ops it speaks, then either Answer one request
// at a time (the prober) or Send a stream of requests while Next collects
// the answers (the corpus run); Close ends it.
//
// Every wait has a limit: an answer that does not come within the timeout
// is a hang, a line longer than MaxLineBytes is cut off and reported, and
// the process is reaped without waiting for helpers it left behind (they
// are killed with its process group).
package live
