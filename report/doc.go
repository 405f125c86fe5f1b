// Package report writes what an audit produces: the machine-readable tables
// (variance.csv, loadings.csv, scores.csv, …), summary.json, and the report
// itself, into an output folder that appears complete or not at all.
//
// It reads analysis results and check results; it computes no statistics of
// its own beyond formatting them.
package report
