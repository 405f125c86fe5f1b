package report

import (
	"bytes"
	"fmt"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"time"

	"codeberg.org/go-fonts/liberation/liberationmonoregular"
	"codeberg.org/go-fonts/liberation/liberationsansbold"
	"codeberg.org/go-fonts/liberation/liberationsansbolditalic"
	"codeberg.org/go-fonts/liberation/liberationsansitalic"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"codeberg.org/go-pdf/fpdf"
	"github.com/yuin/goldmark/ast"
	east "github.com/yuin/goldmark/extension/ast"
	"github.com/yuin/goldmark/util"
)

// The PDF is drawn by walking the same goldmark tree the HTML comes from.
// fpdf's built-in fonts are cp1252 only, so the Liberation fonts (already
// in the module graph through gonum/plot) are embedded for "T²", "λ", "≥"
// and the like.

const (
	pdfMargin    = 18.0 // mm
	pdfBodySize  = 9.5  // pt
	pdfTableSize = 7.5
	pdfLine      = 4.6 // mm per body line
	pdfTableLine = 3.4
	pdfCellPad   = 1.2
	pdfImageW    = 160.0 // mm: the figures' own width
	mmPerPt      = 25.4 / 72
)

type pdfWriter struct {
	pdf      *fpdf.Fpdf
	src      []byte
	dir      string
	contentW float64
	bold     int
	italic   int
	mono     int
	size     float64
	lineH    float64
	// headerRepeats counts table headers drawn again after a page break.
	headerRepeats int
	images        int
}

// RenderPDF draws the parsed report. dir is the report folder (the figures
// are read from dir/figures). The same document and date give the same
// bytes: the creation and modification dates are fixed and the catalogue
// is sorted.
func RenderPDF(src []byte, doc ast.Node, page Page, dir string) ([]byte, error) {
	out, _, err := renderPDF(src, doc, page, dir)
	return out, err
}

// Page is what every page of a rendering shows beyond the Markdown: the
// document's title, author, date and version for the metadata, and the
// input file and its hash for the footer.
type Page struct {
	Title, Author, Date, Version string
	File, SHA256                 string
}

// page returns the page information of an audit document.
func (d *Document) page() Page {
	return Page{Title: d.Title, Author: d.Author, Date: d.Date, Version: d.Version, File: d.Data.File, SHA256: d.Data.SHA256}
}

// pdfStats describes a rendered PDF, for tests.
type pdfStats struct {
	headerRepeats, images int
}

func renderPDF(src []byte, doc ast.Node, d Page, dir string) ([]byte, pdfStats, error) {
	w, err := newPDFWriter(src, d, dir)
	if err != nil {
		return nil, pdfStats{}, err
	}
	if err := w.blocks(doc); err != nil {
		return nil, pdfStats{}, err
	}
	if err := w.pdf.Error(); err != nil {
		return nil, pdfStats{}, err
	}
	var out bytes.Buffer
	if err := w.pdf.Output(&out); err != nil {
		return nil, pdfStats{}, err
	}
	return out.Bytes(), pdfStats{w.headerRepeats, w.images}, nil
}

func reportTime(date string) time.Time {
	t, err := time.Parse("2006-01-02", date)
	if err != nil {
		return time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)
	}
	return t.UTC()
}

func newPDFWriter(src []byte, d Page, dir string) (*pdfWriter, error) {
	pdf := fpdf.New("P", "mm", "A4", "")
	pdf.SetCatalogSort(true)
	stamp := reportTime(d.Date)
	pdf.SetCreationDate(stamp)
	pdf.SetModificationDate(stamp)
	pdf.SetTitle(metadataText(d.Title), true)
	if d.Author != "" {
		pdf.SetAuthor(metadataText(d.Author), true)
	}
	pdf.SetCreator("pcqc "+d.Version, true)
	pdf.AddUTF8FontFromBytes("sans", "", liberationsansregular.TTF)
	pdf.AddUTF8FontFromBytes("sans", "B", liberationsansbold.TTF)
	pdf.AddUTF8FontFromBytes("sans", "I", liberationsansitalic.TTF)
	pdf.AddUTF8FontFromBytes("sans", "BI", liberationsansbolditalic.TTF)
	pdf.AddUTF8FontFromBytes("mono", "", liberationmonoregular.TTF)
	pdf.SetMargins(pdfMargin, pdfMargin, pdfMargin)
	pdf.SetCellMargin(0) // padding is the writer's business
	pdf.SetAutoPageBreak(true, pdfMargin+4)
	pdf.AliasNbPages("{nb}")
	// The file name is the user's: one line, and short enough to leave
	// room for the page number.
	file := drawText(shorten(oneLine(d.File), maxFooterFile), sansCovers)
	footer := fmt.Sprintf("pcqc %s · %s · input SHA-256 %s", d.Version, file, shortHash(d.SHA256))
	pdf.SetFooterFunc(func() {
		pdf.SetY(-pdfMargin + 4)
		pdf.SetFont("sans", "", 7)
		pdf.SetTextColor(110, 116, 125)
		pdf.CellFormat(0, 4, footer, "", 0, "L", false, 0, "")
		pdf.CellFormat(0, 4, fmt.Sprintf("page %d of {nb}", pdf.PageNo()), "", 0, "R", false, 0, "")
		pdf.SetTextColor(43, 47, 54)
	})
	pdf.AddPage()
	pdf.SetTextColor(43, 47, 54)
	pageW, _ := pdf.GetPageSize()
	w := &pdfWriter{pdf: pdf, src: src, dir: dir, contentW: pageW - 2*pdfMargin, size: pdfBodySize, lineH: pdfLine}
	w.setFont()
	return w, pdf.Error()
}

// metadataText prepares user text for the PDF's document information: one
// line, and characters beyond the Basic Multilingual Plane (emoji) as
// U+FFFD, since fpdf's UTF-16 conversion would garble them.
func metadataText(s string) string {
	return strings.Map(func(r rune) rune {
		if r > 0xffff {
			return '\ufffd'
		}
		return r
	}, oneLine(s))
}

// maxFooterFile is the most characters of the input's file name the
// footer shows.
const maxFooterFile = 60

// covers tells whether the current font can show a rune.
func (w *pdfWriter) covers(r rune) bool {
	if w.mono > 0 {
		return monoCovers(r)
	}
	return sansCovers(r)
}

// write writes text into the flowing paragraph in the current font, as
// drawText prepares it.
func (w *pdfWriter) write(s string) {
	w.pdf.Write(w.lineH, drawText(s, w.covers))
}

func (w *pdfWriter) setFont() {
	if w.mono > 0 {
		w.pdf.SetFont("mono", "", w.size*0.92)
		return
	}
	style := ""
	if w.bold > 0 {
		style += "B"
	}
	if w.italic > 0 {
		style += "I"
	}
	w.pdf.SetFont("sans", style, w.size)
}

// ensure starts a new page unless h millimetres fit above the bottom margin.
func (w *pdfWriter) ensure(h float64) {
	_, pageH := w.pdf.GetPageSize()
	if w.pdf.GetY()+h > pageH-pdfMargin-4 {
		w.pdf.AddPage()
	}
}

func (w *pdfWriter) blocks(parent ast.Node) error {
	for n := parent.FirstChild(); n != nil; n = n.NextSibling() {
		if err := w.block(n); err != nil {
			return err
		}
	}
	return nil
}

func (w *pdfWriter) block(n ast.Node) error {
	switch n := n.(type) {
	case *ast.Heading:
		w.heading(n)
	case *ast.Paragraph:
		if img := onlyImage(n); img != nil {
			return w.image(img)
		}
		w.paragraph(n, 0)
	case *ast.TextBlock:
		w.paragraph(n, 0)
	case *ast.List:
		return w.list(n)
	case *ast.FencedCodeBlock, *ast.CodeBlock:
		w.code(n)
	case *east.Table:
		w.table(n)
	case *ast.Blockquote:
		return w.banner(n)
	case *ast.ThematicBreak:
		y := w.pdf.GetY() + 2
		w.pdf.Line(pdfMargin, y, pdfMargin+w.contentW, y)
		w.pdf.Ln(5)
	default:
		return w.blocks(n)
	}
	return nil
}

func (w *pdfWriter) heading(h *ast.Heading) {
	sizes := map[int]float64{1: 19, 2: 13.5, 3: 11}
	size := sizes[h.Level]
	if size == 0 {
		size = 10.5
	}
	// Keep the heading with the start of what follows it: a figure whole,
	// anything else by a few lines.
	next := 18.0
	if p, ok := h.NextSibling().(*ast.Paragraph); ok {
		if img := onlyImage(p); img != nil {
			if _, ih, err := w.imageSize(img); err == nil {
				next = ih + 10
			}
		}
	}
	w.ensure(size*mmPerPt*2 + next)
	if h.Level > 1 && w.pdf.GetY() > pdfMargin+1 {
		w.pdf.Ln(3)
	}
	w.size, w.lineH = size, size*mmPerPt*1.35
	w.bold++
	w.setFont()
	if h.Level == 1 {
		w.pdf.SetTextColor(31, 78, 140)
	}
	w.inlines(h)
	w.pdf.Ln(w.lineH)
	w.pdf.SetTextColor(43, 47, 54)
	w.bold--
	if h.Level <= 2 {
		y := w.pdf.GetY() + 0.5
		w.pdf.SetDrawColor(31, 78, 140)
		w.pdf.SetLineWidth(map[int]float64{1: 0.8, 2: 0.3}[h.Level])
		w.pdf.Line(pdfMargin, y, pdfMargin+w.contentW, y)
		w.pdf.SetDrawColor(0, 0, 0)
		w.pdf.SetLineWidth(0.2)
		w.pdf.Ln(3)
	} else {
		w.pdf.Ln(1)
	}
	w.size, w.lineH = pdfBodySize, pdfLine
	w.setFont()
}

// bannerColours are the bars of the verdict banner by status (the HTML
// page uses the same): the bar repeats what the mark and the word say.
var bannerColours = map[string][3]int{
	"pass": {0x2e, 0x7d, 0x4f},
	"warn": {0xc9, 0x84, 0x3a},
	"fail": {0x9c, 0x2f, 0x22},
	"":     {43, 47, 54},
}

// banner draws a block quote, which the report uses for the verdict
// banner only: framed, with a bar on the left in the status's colour, its
// first paragraph (the headline) large and the rest at body size.
func (w *pdfWriter) banner(q *ast.Blockquote) error {
	const bar, pad, headline = 3.0, 3.0, 14.0
	pdf := w.pdf
	// The banner is never split: it is a few lines, and a split frame
	// would read as two banners.
	lines := 0
	for c := q.FirstChild(); c != nil; c = c.NextSibling() {
		lines += 1 + len(plainText(c, w.src))/110
	}
	w.ensure(headline*mmPerPt*1.35 + float64(lines)*w.lineH + 2*pad + 4)
	left, _, right, _ := pdf.GetMargins()
	x0, y0 := left, pdf.GetY()+1
	pdf.SetLeftMargin(left + bar + pad)
	pdf.SetRightMargin(right + pad)
	pdf.SetXY(left+bar+pad, y0+pad)
	for c := q.FirstChild(); c != nil; c = c.NextSibling() {
		if c == q.FirstChild() {
			w.size, w.lineH = headline, headline*mmPerPt*1.35
			w.bold++
		}
		w.setFont()
		switch c := c.(type) {
		case *ast.Paragraph, *ast.TextBlock:
			w.inlines(c)
			pdf.Ln(w.lineH)
		default:
			if err := w.block(c); err != nil {
				return err
			}
		}
		if c == q.FirstChild() {
			w.size, w.lineH = pdfBodySize, pdfLine
			w.bold--
			w.setFont()
		}
		if c.NextSibling() != nil {
			pdf.Ln(1.2)
		}
	}
	y1 := pdf.GetY() + pad - 1
	pdf.SetLeftMargin(left)
	pdf.SetRightMargin(right)
	rgb := bannerColours[bannerStatus(q, w.src)]
	pdf.SetDrawColor(43, 47, 54)
	pdf.SetLineWidth(0.3)
	pdf.Rect(x0, y0, w.contentW, y1-y0, "D")
	pdf.SetFillColor(rgb[0], rgb[1], rgb[2])
	pdf.Rect(x0, y0, bar, y1-y0, "F")
	pdf.SetDrawColor(0, 0, 0)
	pdf.SetLineWidth(0.2)
	pdf.SetXY(left, y1+5)
	return nil
}

func (w *pdfWriter) paragraph(n ast.Node, indent float64) {
	w.inlines(n)
	w.pdf.Ln(w.lineH)
	if _, tight := n.(*ast.TextBlock); !tight {
		w.pdf.Ln(1.6)
	}
}

// inlines writes the inline children of n in flowing text.
func (w *pdfWriter) inlines(n ast.Node) {
	for c := n.FirstChild(); c != nil; c = c.NextSibling() {
		switch c := c.(type) {
		case *ast.Text:
			w.write(textValue(c, w.src))
			if c.HardLineBreak() {
				w.pdf.Ln(w.lineH)
			} else if c.SoftLineBreak() {
				w.pdf.Write(w.lineH, " ")
			}
		case *ast.String:
			w.write(string(c.Value))
		case *ast.Emphasis:
			if c.Level >= 2 {
				w.bold++
			} else {
				w.italic++
			}
			w.setFont()
			w.inlines(c)
			if c.Level >= 2 {
				w.bold--
			} else {
				w.italic--
			}
			w.setFont()
		case *ast.CodeSpan:
			w.mono++
			w.setFont()
			w.write(plainText(c, w.src))
			w.mono--
			w.setFont()
		default:
			w.inlines(c)
		}
	}
}

// textValue returns a text node's text as it reads: goldmark keeps the
// source bytes, backslash escapes included, and unescapes when rendering.
func textValue(t *ast.Text, src []byte) string {
	v := t.Segment.Value(src)
	if t.IsRaw() {
		return string(v)
	}
	return string(util.UnescapePunctuations(v))
}

// plainText concatenates the text below n.
func plainText(n ast.Node, src []byte) string {
	var b strings.Builder
	ast.Walk(n, func(c ast.Node, entering bool) (ast.WalkStatus, error) {
		if !entering {
			return ast.WalkContinue, nil
		}
		switch c := c.(type) {
		case *ast.Text:
			b.WriteString(textValue(c, src))
			if c.SoftLineBreak() {
				b.WriteByte(' ')
			}
		case *ast.String:
			b.Write(c.Value)
		}
		return ast.WalkContinue, nil
	})
	return b.String()
}

func (w *pdfWriter) list(l *ast.List) error {
	const indent = 5.0
	left, _, _, _ := w.pdf.GetMargins()
	for item := l.FirstChild(); item != nil; item = item.NextSibling() {
		w.ensure(w.lineH * 2)
		w.pdf.SetX(left)
		w.pdf.CellFormat(indent, w.lineH, "•", "", 0, "L", false, 0, "")
		w.pdf.SetLeftMargin(left + indent)
		w.pdf.SetX(left + indent)
		for c := item.FirstChild(); c != nil; c = c.NextSibling() {
			switch c := c.(type) {
			case *ast.TextBlock, *ast.Paragraph:
				w.inlines(c)
				w.pdf.Ln(w.lineH)
			default:
				if err := w.block(c); err != nil {
					return err
				}
			}
		}
		w.pdf.SetLeftMargin(left)
		w.pdf.Ln(0.8)
	}
	w.pdf.Ln(1.6)
	return nil
}

func (w *pdfWriter) code(n ast.Node) {
	var b strings.Builder
	lines := n.Lines()
	for i := 0; i < lines.Len(); i++ {
		seg := lines.At(i)
		b.Write(seg.Value(w.src))
	}
	text := strings.TrimRight(b.String(), "\n")
	w.mono++
	w.setFont()
	rows := strings.Split(text, "\n")
	for i, l := range rows {
		rows[i] = drawText(l, monoCovers)
	}
	text = strings.Join(rows, "\n")
	w.pdf.SetFillColor(238, 241, 245)
	w.pdf.MultiCell(w.contentW, w.lineH, text, "", "L", true)
	w.mono--
	w.setFont()
	w.pdf.Ln(2)
}

func onlyImage(p *ast.Paragraph) *ast.Image {
	img, ok := p.FirstChild().(*ast.Image)
	if !ok || p.FirstChild() != p.LastChild() {
		return nil
	}
	return img
}

// pngPath maps an image destination to the PNG file in the report folder.
func (w *pdfWriter) pngPath(img *ast.Image) (dest, path string) {
	dest = strings.TrimSuffix(string(img.Destination), ".svg")
	if !strings.HasSuffix(dest, ".png") {
		dest += ".png"
	}
	return dest, filepath.Join(w.dir, filepath.FromSlash(dest))
}

// imageSize returns the size (mm) at which a figure is drawn: its own width
// (or the text width), shrunk to fit a page.
func (w *pdfWriter) imageSize(img *ast.Image) (width, height float64, err error) {
	_, path := w.pngPath(img)
	f, err := os.Open(path)
	if err != nil {
		return 0, 0, err
	}
	defer f.Close()
	cfg, err := png.DecodeConfig(f)
	if err != nil {
		return 0, 0, err
	}
	width = min(pdfImageW, w.contentW)
	height = width * float64(cfg.Height) / float64(cfg.Width)
	_, pageH := w.pdf.GetPageSize()
	if avail := pageH - 2*pdfMargin - 12; height > avail {
		width, height = width*avail/height, avail
	}
	return width, height, nil
}

func (w *pdfWriter) image(img *ast.Image) error {
	dest, path := w.pngPath(img)
	data, err := os.ReadFile(path)
	if err != nil {
		return fmt.Errorf("figure for the PDF: %w", err)
	}
	if info := w.pdf.RegisterImageOptionsReader(dest, fpdf.ImageOptions{ImageType: "PNG"}, bytes.NewReader(data)); info == nil {
		return w.pdf.Error()
	}
	width, height, err := w.imageSize(img)
	if err != nil {
		return fmt.Errorf("figure for the PDF: %w", err)
	}
	w.ensure(height + 10) // keep the caption with its figure
	x := pdfMargin + (w.contentW-width)/2
	w.pdf.ImageOptions(dest, x, w.pdf.GetY(), width, height, false, fpdf.ImageOptions{ImageType: "PNG"}, 0, "")
	w.pdf.SetY(w.pdf.GetY() + height + 1.5)
	w.images++
	return nil
}

// tableCells collects a table's text: the header, then the body rows.
func tableCells(t *east.Table, src []byte) (header []string, rows [][]string) {
	for r := t.FirstChild(); r != nil; r = r.NextSibling() {
		var cells []string
		for c := r.FirstChild(); c != nil; c = c.NextSibling() {
			cells = append(cells, strings.TrimSpace(plainText(c, src)))
		}
		if _, ok := r.(*east.TableHeader); ok {
			header = cells
		} else {
			rows = append(rows, cells)
		}
	}
	return header, rows
}

// columnWidths shares width among the columns: each gets its natural width
// (its widest cell) when that fits, and otherwise the narrow columns keep
// theirs and the wide ones split what is left. Narrow tables are stretched
// to the full width.
func columnWidths(natural []float64, width float64) []float64 {
	n := len(natural)
	out := make([]float64, n)
	total := 0.0
	for _, v := range natural {
		total += v
	}
	if total <= width {
		for i, v := range natural {
			out[i] = v * width / total
		}
		return out
	}
	fixed := make([]bool, n)
	left, open := width, n
	for changed := true; changed; {
		changed = false
		share := left / float64(open)
		for i, v := range natural {
			if !fixed[i] && v <= share {
				out[i], fixed[i] = v, true
				left -= v
				open--
				changed = true
			}
		}
		if open == 0 {
			break
		}
	}
	for i := range out {
		if !fixed[i] {
			out[i] = left / float64(open)
		}
	}
	return out
}

// wrapCell splits text into lines no wider than width (mm) in the current
// font; a word longer than the width is broken, so nothing overflows.
func (w *pdfWriter) wrapCell(text string, width float64) []string {
	if text == "" {
		return []string{""}
	}
	return w.pdf.SplitText(text, width)
}

// maxCellLines is the most lines a table cell of the PDF takes; a longer
// text (a name of hundreds of characters) is cut with an ellipsis, so that
// one row can never outgrow a page. The CSV files hold it whole.
const maxCellLines = 20

// cellLines returns the lines a table cell shows: its text wrapped to
// width, at most maxCellLines of them, each in visual order.
func (w *pdfWriter) cellLines(text string, width float64) []string {
	lines := w.wrapCell(coverText(text, w.covers), width)
	if len(lines) > maxCellLines {
		lines = lines[:maxCellLines]
		last := []rune(strings.TrimRight(lines[maxCellLines-1], " "))
		for len(last) > 0 && w.pdf.GetStringWidth(string(last)+"…") > width {
			last = last[:len(last)-1]
		}
		lines[maxCellLines-1] = string(last) + "…"
	}
	for i, l := range lines {
		lines[i] = string(visualOrder([]rune(l)))
	}
	return lines
}

func (w *pdfWriter) table(t *east.Table) {
	header, rows := tableCells(t, w.src)
	if len(header) == 0 {
		return
	}
	pdf := w.pdf
	saveSize := w.size
	w.size = pdfTableSize
	natural := make([]float64, len(header))
	measure := func(cells []string, bold bool) {
		w.bold = map[bool]int{true: 1, false: 0}[bold]
		w.setFont()
		for i, c := range cells {
			if i < len(natural) {
				natural[i] = max(natural[i], pdf.GetStringWidth(coverText(c, w.covers))+2*pdfCellPad+0.5)
			}
		}
	}
	measure(header, true)
	for _, r := range rows {
		measure(r, false)
	}
	widths := columnWidths(natural, w.contentW)

	drawRow := func(cells []string, head bool) {
		w.bold = map[bool]int{true: 1, false: 0}[head]
		w.setFont()
		lines := make([][]string, len(widths))
		maxLines := 1
		for i := range widths {
			cell := ""
			if i < len(cells) {
				cell = cells[i]
			}
			lines[i] = w.cellLines(cell, widths[i]-2*pdfCellPad)
			maxLines = max(maxLines, len(lines[i]))
		}
		h := float64(maxLines)*pdfTableLine + 2*pdfCellPad
		x, y := pdfMargin, pdf.GetY()
		for i, wd := range widths {
			style := "D"
			if head {
				pdf.SetFillColor(226, 231, 238)
				style = "FD"
			}
			pdf.SetDrawColor(200, 205, 212)
			pdf.Rect(x, y, wd, h, style)
			for l, line := range lines[i] {
				pdf.SetXY(x+pdfCellPad, y+pdfCellPad+float64(l)*pdfTableLine)
				pdf.CellFormat(wd-2*pdfCellPad, pdfTableLine, line, "", 0, "L", false, 0, "")
			}
			x += wd
		}
		pdf.SetDrawColor(0, 0, 0)
		pdf.SetXY(pdfMargin, y+h)
	}
	rowHeight := func(cells []string) float64 {
		w.bold = 0
		w.setFont()
		maxLines := 1
		for i := range widths {
			if i < len(cells) {
				maxLines = max(maxLines, len(w.cellLines(cells[i], widths[i]-2*pdfCellPad)))
			}
		}
		return float64(maxLines)*pdfTableLine + 2*pdfCellPad
	}
	_, pageH := pdf.GetPageSize()
	bottom := pageH - pdfMargin - 4
	first := 0.0
	if len(rows) > 0 {
		first = rowHeight(rows[0])
	}
	w.ensure(2*pdfTableLine + 2*pdfCellPad + first)
	drawRow(header, true)
	for _, r := range rows {
		if pdf.GetY()+rowHeight(r) > bottom {
			pdf.AddPage()
			drawRow(header, true)
			w.headerRepeats++
		}
		drawRow(r, false)
	}
	w.bold = 0
	w.size = saveSize
	w.setFont()
	pdf.Ln(3)
}
