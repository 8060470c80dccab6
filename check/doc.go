// Package check compares another implementation's answers with a corpus:
// tolerance profiles (strict, field, or a YAML override), the comparison
// of one answer with its expectation (pass, borderline when the
// reference's decision margin says the case hangs on rounding, fail), the
// report as text or JUnit XML, the validation of a corpus against the
// reference (requests decoded as eval decodes them), Run, which feeds a
// corpus to a live implementation (package live) and checks it in one go,
// and CorpusChanges with WriteCorpusChanges, which say case by case what a
// regeneration of a corpus changed (decisions flipped, numbers moved beyond
// or within the tolerance, other requests) for a reviewer.
//
// Differences are measured in the units a map user feels: pixels, ground
// metres, seconds, zoom levels, degrees.
package check
