// Package analysis turns a data table into the numbers an audit of a
// principal component analysis needs: given a table read by package intake, it
// preprocesses it (transform, centring, scaling), decomposes it, decides how
// many components to keep, and computes the per-sample and resampling
// statistics that the checks judge.
//
// The package knows nothing about checks, reports or the command line: data
// tables go in, numbers come out. Every statistic names its formula and its
// reference in its doc comment, and states its numerical caveats.
package analysis
