// Package reference is the reference evaluator: it answers every op of
// SPEC §6 with the geometry packages (viewport, routes, rules, timeline),
// one file per op, and adds each discrete answer's decision margin (how far
// the decision is from going the other way: margin_px, side_margin_m,
// bucket_margin_s, first_shown_margin_px). Evaluate answers one decoded
// request, Serve a stream, Answer an answer with its margins apart as a
// corpus case keeps them.
package reference
