// Package corpus is the fixture corpus: a case is one JSON line holding a
// request, the reference's answer to it (expect) and the reference's
// decision margins. It reads corpora and answer files as streams, writes
// cases, generates a corpus deterministically from a seed (every edge
// family of props.Plans, the same bytes for the same seed, count and
// GenVersion), counts one (Stats), and holds the published JSON Schemas of
// case and answer lines (embedded in package fixtures).
package corpus
