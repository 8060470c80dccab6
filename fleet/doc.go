// Package fleet runs the display audit of SPEC §9 on Apache Beam, for drive
// logs past one machine: a day of a fleet's requests in many files.
//
// The pipeline (Build) reads the logs named by a glob, audits every line with
// the very functions `viewspec audit` calls (audit.ReadLog, audit.AuditLine,
// audit.Totals.Add, audit.Rows, audit.NewTableWriter), and merges the exact
// partial tallies with Beam combiners, one key per group (the whole run, and
// each value of each --by tag). It writes into the output folder:
//
//   - summary.json, the bytes `viewspec audit --out` writes for the same
//     logs (audit.SummaryJSON of the merged totals);
//   - labels-SSSSS-of-NNNNN.parquet, the labels-and-features table in
//     shards (audit.Row's schema; together the rows of labels.parquet, in
//     another order);
//   - verdicts-SSSSS-of-NNNNN.jsonl, one line per audited record: where it
//     is, its id and tags, and each candidate's verdict (Verdict);
//   - bad-records-SSSSS-of-NNNNN.jsonl, the bad records with file, line,
//     request id and reason (audit.BadRecord), a side output: a bad record
//     never fails the job, and neither does a record that panics the audit
//     (it is a bad record naming the panic).
//
// How the work is split: one element per log file (a file is read by one
// worker, in order, so that bad records keep their line numbers), files
// spread over workers by a reshuffle; each bundle of files keeps one
// audit.Totals, the same accumulator Run keeps, and emits it per group when
// it ends; the combiners merge them with audit.Tally.Merge. The merge is
// exact and order-free (SPEC §9: integer counts, 128-bit fixed-point sums, the
// smallest request id as a finding's example), so the summary does not depend
// on how a runner splits, orders or retries the bundles. Output shards are
// written by each bundle under a temporary name and renamed by the last step
// (finish) once every bundle has succeeded; a retried bundle's leftovers are
// removed there.
//
// Out of scope: reading one file on several workers (a log file is the unit
// of parallelism); the report pictures and the CSV table of `viewspec audit
// --out` (the table is in Parquet only).
package fleet
