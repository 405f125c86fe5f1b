package report

import (
	"bytes"
	"os/exec"
	"strings"
	"testing"

	"golang.org/x/net/html"
)

// hostileTexts are user texts that mean something in Markdown, HTML, a
// shell or a terminal. Whatever a name, id or label holds, the report must
// show it as literal text.
var hostileTexts = []string{
	"line\n~~~\ncode", "x\n## Verdict\nfake", "pi|pe", "back`tick``s", "<script>alert(1)</script>",
	"[link](http://x)", "**bold**", "    four spaces", "```", "~~~", "---", "***", "___", "1. one", "12) twelve",
	"# h", "Study ##", "> quote", "+ plus", "= equals", "- dash", "two spaces  \nbreak", `trailing\`, "&amp; &#65; &copy",
	"<!-- comment -->", "<?php ?>", "<div>block</div>", "![img](x.png)", "[x]: http://y", "_a_", "__init__",
	"C# & F#", "\x1b[31mred\x1b[0m", "\u202eevil\u202c", "tab\there", "crlf\r\nline", "| a | b |\n|---|---|",
	"http://example.com", "a\\*b", "\\", "*", "~", "<", "&", "x <b>y</b> z", "\u2028sep",
	"תחנת ניטור צפונית מספר שבע ליד הנהר הגדול", "محطة الرصد",
}

// literal is how a hostile text must read once rendered: oneLine's visible
// escapes, without surrounding spaces.
func literal(s string) string { return strings.TrimSpace(oneLine(s)) }

// htmlShape summarises the block structure of rendered HTML and its text.
func htmlShape(t *testing.T, src string) (elements map[string]int, text string) {
	t.Helper()
	var out bytes.Buffer
	if err := newMarkdown().Convert([]byte(src), &out); err != nil {
		t.Fatal(err)
	}
	root, err := html.Parse(&out)
	if err != nil {
		t.Fatal(err)
	}
	elements = map[string]int{}
	var b strings.Builder
	var walk func(n *html.Node)
	walk = func(n *html.Node) {
		switch n.Type {
		case html.ElementNode:
			elements[n.Data]++
		case html.TextNode:
			b.WriteString(n.Data)
		case html.CommentNode:
			elements["<!--"]++
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(root)
	return elements, b.String()
}

// Every hostile text, in every place the templates put user text, renders
// as exactly the same HTML elements as a plain word would, and its text
// reads back literally.
func TestEscapeMarkdownHostileText(t *testing.T) {
	contexts := []struct {
		name   string
		render func(s string) string
	}{
		{"heading", func(s string) string { return "# " + escapeMarkdown(s) + "\n\nafter\n" }},
		{"list item", func(s string) string {
			return "- **Variables:** " + escapeMarkdown(s) + "\n- " + escapeMarkdown(s) + "\n\nafter\n"
		}},
		{"line start", func(s string) string { return "before\n\n" + escapeMarkdown(s) + "\n\nafter\n" }},
		{"inline", func(s string) string { return "Limits: " + escapeMarkdown(s) + " end.\n" }},
		{"emphasis", func(s string) string { return "*Figure 1. " + escapeMarkdown(s) + "*\n" }},
		{"image alt", func(s string) string { return "![" + escapeMarkdown(s) + "](figures/a.png)\n" }},
		{"table", func(s string) string {
			return markdownTable([]string{"h", s}, [][]string{{s, "x"}, {"y", s}}) + "\n\nafter\n"
		}},
	}
	for _, c := range contexts {
		want, _ := htmlShape(t, c.render("plain"))
		for _, s := range hostileTexts {
			got, text := htmlShape(t, c.render(s))
			if !equalCounts(got, want) {
				t.Errorf("%s: %q renders as elements %v, a plain word as %v\n%s", c.name, s, got, want, c.render(s))
			}
			if c.name == "image alt" {
				continue // alt text is an attribute, not a text node
			}
			if !strings.Contains(text, literal(s)) {
				t.Errorf("%s: %q reads %q", c.name, s, text)
			}
		}
	}
}

func equalCounts(a, b map[string]int) bool {
	if len(a) != len(b) {
		return false
	}
	for k, v := range a {
		if b[k] != v {
			return false
		}
	}
	return true
}

// Code spans and fences cannot be closed by the text they hold.
func TestCodeSpanAndFence(t *testing.T) {
	for _, s := range []string{"plain", "a`b", "``x``", "`lead", "trail`", "<b>&amp;</b>", "x\ny", "a\\b"} {
		elements, text := htmlShape(t, "Id: "+codeSpan(s)+" end.\n")
		if elements["code"] != 1 || !strings.Contains(text, "Id: "+literal(s)+" end.") {
			t.Errorf("code span of %q: %v %q", s, elements, text)
		}
	}
	for _, s := range []string{"pcqc run x.csv", "a ``` b", "````", "~~~"} {
		src := "before\n\n" + codeFence(s) + "\n" + s + "\n" + codeFence(s) + "\n\n## After\n"
		elements, text := htmlShape(t, src)
		if elements["pre"] != 1 || elements["h2"] != 1 || !strings.Contains(text, s) {
			t.Errorf("fence around %q: %v %q", s, elements, text)
		}
	}
}

// The command line in the report stays on one line and pastes back into a
// shell as the very arguments that were given.
func TestShellQuote(t *testing.T) {
	args := []string{"pcqc", "run", "plain.csv", "with space.csv", "it's", "--title", "line\n## Verdict\n~~~", "tab\tand \x1b esc", "\u202eevil", "back\\slash ' quote", "", "тест"}
	quoted := shellQuote(args)
	if strings.ContainsAny(quoted, "\n\r\t\x1b\u202e") {
		t.Fatalf("not one visible line: %q", quoted)
	}
	if _, err := exec.LookPath("bash"); err != nil {
		t.Skip("bash not installed")
	}
	out, err := exec.Command("bash", "-c", "for a in "+quoted+`; do printf '%s\0' "$a"; done`).Output()
	if err != nil {
		t.Fatal(err)
	}
	got := strings.Split(strings.TrimSuffix(string(out), "\x00"), "\x00")
	if strings.Join(got, "|") != strings.Join(args, "|") {
		t.Errorf("bash reads %q\nwant %q", got, args)
	}
}
