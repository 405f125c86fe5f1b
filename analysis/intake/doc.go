// Package intake reads and validates the tables pcqc is given: the data
// table of an audit, the loose tables of a review (someone else's loadings,
// scores and variances), exclusion lists, and the size-capped reading of
// every other input file.
//
// What it guarantees to the rest of pcqc:
//
//   - A Table holds only finite numbers no larger than MaxMagnitude in
//     magnitude, one row per sample and one column per variable, with the
//     sample ids, their source lines and the variables that were dropped and
//     why. Missing cells have been handled by the stated MissingPolicy.
//   - A cell written as a limit ("<0.05", ">2000") is never read silently:
//     it is refused under CensorFail, and otherwise replaced by the stated
//     CensorPolicy before any transform and listed in Table.Censored.
//   - Every problem with the input is an *InputError that names the file and
//     the position (line and column, or the spreadsheet cell) and says what
//     is wrong in one line, with control characters escaped.
//   - Inputs are only ever read. Special files (FIFOs, devices, folders) are
//     refused before reading, and every file is read under a size cap.
//
// It knows nothing of the decomposition: package analysis takes a Table
// from here and computes.
package intake
