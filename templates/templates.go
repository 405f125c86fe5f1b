// Package templates holds the report's Markdown templates and the HTML page
// that wraps the rendered Markdown, embedded so that the binary stands
// alone. The report package fills them; they import nothing.
package templates

import "embed"

// FS holds report.md.tmpl (an audit), apply.md.tmpl (new samples against a
// saved model), checks.md.tmpl (the verdict banner, the Verdict section and
// the appendix of checks, which both place) and page.html.tmpl.
//
//go:embed report.md.tmpl apply.md.tmpl compare.md.tmpl checks.md.tmpl page.html.tmpl
var FS embed.FS
