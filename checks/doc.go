// Package checks judges an analysis: each check compares one measured
// quantity with a limit and says pass, warn, fail, or skip (with the reason),
// in words a user can act on, naming the published source of its threshold.
//
// Checks read analysis results; they never compute a PCA themselves. Every
// check lives in its own file; Registry fixes their order, which is also the
// order of the report. Every threshold is defined once, in thresholds.go,
// beside its source.
package checks
