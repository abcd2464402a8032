package report

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"regexp"
	"sort"
	"strconv"
	"strings"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"netstage/plans"
)

// The report's own palette. Utilisation uses one blue hue from light to
// dark (readable in grey print and by readers with any common colour-vision
// deficiency), and a burnt orange, far from every blue in lightness and
// hue, marks links at their ceiling. Upgrades are marked by a shape as well
// as a colour.
var (
	inkColor     = color.RGBA{0x22, 0x26, 0x2e, 0xff} // text and axes
	gridColor    = color.RGBA{0xd8, 0xdc, 0xe2, 0xff}
	capexColor   = color.RGBA{0x2f, 0x5a, 0x8c, 0xff}
	budgetColor  = color.RGBA{0x22, 0x26, 0x2e, 0xff}
	gainColor    = color.RGBA{0x2f, 0x5a, 0x8c, 0xff}
	lossColor    = color.RGBA{0xb8, 0x5a, 0x1e, 0xff}
	cumColor     = color.RGBA{0x22, 0x26, 0x2e, 0xff}
	baseColor    = color.RGBA{0x8a, 0x90, 0x99, 0xff}
	ceilingColor = color.RGBA{0xc4, 0x54, 0x1b, 0xff}
	noCapColor   = color.RGBA{0xf2, 0xf2, 0xf2, 0xff}
	siteColor    = color.RGBA{0x22, 0x26, 0x2e, 0xff}
	// utilRamp holds the colours of the utilisation bins, light to dark.
	utilRamp = []color.RGBA{
		{0xe3, 0xeb, 0xf5, 0xff},
		{0xb4, 0xc9, 0xe2, 0xff},
		{0x7d, 0xa1, 0xca, 0xff},
		{0x45, 0x6f, 0xa8, 0xff},
		{0x1f, 0x3d, 0x6e, 0xff},
	}
	// utilBins are the upper ends of the ramp's bins (fractions); the last
	// bin runs up to the ceiling.
	utilBins = []float64{0.2, 0.4, 0.6, 0.8}
)

// chartFont is the typeface of every chart: sans serif reads better at
// small sizes. Liberation Sans has the metrics of Arial and Helvetica, which
// the HTML names as fallbacks, so that layout holds on machines without it.
var chartFont = font.Font{Typeface: "Liberation", Variant: "Sans"}

// Chart sizes: the width fits the printable width of A4 and Letter with
// 15 mm margins.
const (
	chartWidth  = 17 * vg.Centimeter
	chartHeight = 8.5 * vg.Centimeter
)

// utilBin returns the ramp index of utilisation u, or −1 at the ceiling.
func utilBin(u, ceiling float64) int {
	if plans.AtCeiling(u, ceiling) {
		return -1
	}
	for i, top := range utilBins {
		if u < top {
			return i
		}
	}
	return len(utilRamp) - 1
}

func utilColor(u, ceiling float64) color.Color {
	if b := utilBin(u, ceiling); b >= 0 {
		return utilRamp[b]
	}
	return ceilingColor
}

// utilBinLabel names bin i for legends.
func utilBinLabel(i int) string {
	lo := 0.0
	if i > 0 {
		lo = utilBins[i-1]
	}
	if i >= len(utilBins) {
		return fmt.Sprintf("%.0f%% up to the ceiling", 100*lo)
	}
	return fmt.Sprintf("%.0f–%.0f%%", 100*lo, 100*utilBins[i])
}

// darkBackground reports whether text on c should be white.
func darkBackground(c color.Color) bool {
	r, g, b, _ := c.RGBA()
	// relative luminance, ITU-R BT.709 weights
	l := (0.2126*float64(r) + 0.7152*float64(g) + 0.0722*float64(b)) / 0xffff
	return l < 0.45
}

// moneyScale picks the unit in which a chart shows money so that tick
// labels stay short.
func moneyScale(maxAbs float64, currency string) (float64, string) {
	switch {
	case maxAbs >= 1e9:
		return 1e9, currency + " billion"
	case maxAbs >= 1e6:
		return 1e6, currency + " million"
	case maxAbs >= 1e4:
		return 1e3, currency + " thousand"
	}
	return 1, currency
}

// newPlot returns a plot with the report's fonts and colours.
func newPlot(title, xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font = font.From(chartFont, 12)
	p.Title.TextStyle.Color = inkColor
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = font.From(chartFont, 10)
		a.Label.TextStyle.Color = inkColor
		a.Tick.Label.Font = font.From(chartFont, 9)
		a.Tick.Label.Color = inkColor
		a.Color = inkColor
		a.Tick.Color = inkColor
	}
	p.X.Label.Text = xLabel
	p.Y.Label.Text = yLabel
	p.Legend.TextStyle.Font = font.From(chartFont, 9)
	p.Legend.TextStyle.Color = inkColor
	return p
}

// yearTicks labels every year (every second one on long horizons).
type yearTicks struct{ first, last int }

func (t yearTicks) Ticks(_, _ float64) []plot.Tick {
	step := 1
	if t.last-t.first >= 12 {
		step = 2
	}
	var ticks []plot.Tick
	for y := t.first; y <= t.last; y++ {
		label := ""
		if (y-t.first)%step == 0 {
			label = strconv.Itoa(y)
		}
		ticks = append(ticks, plot.Tick{Value: float64(y), Label: label})
	}
	return ticks
}

// numberTicks is gonum's default tick placement with labels that use
// thousands separators and the minus sign.
type numberTicks struct{}

func (numberTicks) Ticks(lo, hi float64) []plot.Tick {
	ticks := plot.DefaultTicks{}.Ticks(lo, hi)
	// One number of decimals for all labels: the fewest that show every
	// labelled value as gonum placed it (so 0, 25, 50 rather than 0.00).
	dec := 0
	for _, tk := range ticks {
		if tk.Label == "" {
			continue
		}
		if _, frac, ok := strings.Cut(trimZero(tk.Label), "."); ok {
			dec = max(dec, len(frac))
		}
	}
	dec = min(dec, 3)
	for i := range ticks {
		if ticks[i].Label != "" {
			ticks[i].Label = formatFixed(ticks[i].Value, dec)
		}
	}
	return ticks
}

// svgOf paints a canvas of w × h and returns it as an inline SVG element.
func svgOf(w, h vg.Length, paint func(dc draw.Canvas)) (string, error) {
	c := vgsvg.NewWith(vgsvg.UseWH(w, h), vgsvg.EmbedFonts(false))
	paint(draw.New(c))
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return "", fmt.Errorf("report: writing svg: %w", err)
	}
	return inlineSVG(buf.String()), nil
}

var (
	xmlHeader  = regexp.MustCompile(`(?s)^<\?xml[^>]*\?>\s*(<!--.*?-->\s*)?`)
	svgSize    = regexp.MustCompile(`<svg width="[^"]*" height="[^"]*"`)
	fontFamily = regexp.MustCompile(`font-family:Liberation Sans;`)
)

// inlineSVG turns a standalone SVG document into an element for an HTML
// page: no XML prolog, a size that follows the page width, and a font list
// with metric-compatible fallbacks (the report embeds no fonts).
func inlineSVG(s string) string {
	s = xmlHeader.ReplaceAllString(s, "")
	s = svgSize.ReplaceAllString(s, `<svg class="chart" role="img"`)
	s = fontFamily.ReplaceAllString(s, `font-family:'Liberation Sans',Arial,Helvetica,sans-serif;`)
	return strings.TrimSpace(s)
}

// capexChart draws capex by order year against the yearly budget.
func capexChart(c *plans.Case, r *plans.Result) (chart, error) {
	maxAbs := 0.0
	for _, cf := range r.Cashflow {
		maxAbs = math.Max(maxAbs, cf.Capex)
		if cf.Budget != nil {
			maxAbs = math.Max(maxAbs, *cf.Budget)
		}
	}
	scale, unit := moneyScale(maxAbs, r.Currency)
	p := newPlot("", "Order year", "Capex ("+unit+")")
	first, last := c.FirstYear, c.FirstYear+c.Horizon-1
	p.X.Tick.Marker = yearTicks{first, last}
	p.Y.Tick.Marker = numberTicks{}
	p.X.Min, p.X.Max = float64(first)-0.7, float64(last)+0.7
	p.Add(hGrid())

	bars := make(plotter.XYs, 0, len(r.Cashflow))
	var budget plotter.XYs
	capped := false
	for _, cf := range r.Cashflow {
		bars = append(bars, plotter.XY{X: float64(cf.Year), Y: cf.Capex / scale})
		if cf.Budget != nil {
			capped = true
			budget = append(budget, plotter.XY{X: float64(cf.Year), Y: *cf.Budget / scale})
		}
	}
	b := &barPlot{XYs: bars, Width: 0.6, Fill: capexColor}
	p.Add(b)
	b.Labels = true
	legend := []namedThumb{{"capex in the order year (bar label: " + unit + ")", b}}
	if capped {
		seg := &budgetSteps{XYs: budget, Line: draw.LineStyle{Color: budgetColor, Width: vg.Points(1.6), Dashes: []vg.Length{vg.Points(5), vg.Points(3)}}}
		p.Add(seg)
		legend = append(legend, namedThumb{"yearly budget cap", seg})
	}
	p.Y.Min = 0
	p.Y.Max = maxAbs / scale * 1.12
	if p.Y.Max == 0 {
		p.Y.Max = 1
	}
	s, err := withLegendBelow(p, legend, 1)
	caption := "Capex paid in each order year (after volume discounts), with the yearly budget cap as a dashed step line."
	if !capped {
		caption = "Capex paid in each order year (after volume discounts). The case sets no yearly budget cap."
	}
	return chart{ID: "chart-capex", Title: "Capex by year against the budget", Caption: caption, SVG: s}, err
}

// legendRowHeight is the height of one legend row under a chart.
const legendRowHeight = 0.55 * vg.Centimeter

// withLegendBelow draws p with its legend in cols columns under the plot,
// where it cannot hide data.
func withLegendBelow(p *plot.Plot, legend []namedThumb, cols int) (string, error) {
	rows := (len(legend) + cols - 1) / cols
	legendH := vg.Length(rows)*legendRowHeight + 0.4*vg.Centimeter
	return svgOf(chartWidth, chartHeight+legendH, func(dc draw.Canvas) {
		p.Draw(draw.Crop(dc, 0, 0, legendH, 0))
		drawLegendColumns(draw.Crop(dc, 1.2*vg.Centimeter, 0, 0, -chartHeight), legend, cols)
	})
}

// thumbs draws several thumbnails on top of each other (a line and its
// markers).
type thumbs []plot.Thumbnailer

func (t thumbs) Thumbnail(c *draw.Canvas) {
	for _, x := range t {
		x.Thumbnail(c)
	}
}

// hGrid returns light horizontal grid lines only.
func hGrid() *plotter.Grid {
	g := plotter.NewGrid()
	g.Vertical.Color = nil
	g.Horizontal.Color = gridColor
	g.Horizontal.Width = vg.Points(0.6)
	return g
}

// barPlot draws one bar per point at its x, from zero to y.
type barPlot struct {
	XYs   plotter.XYs
	Width float64 // in x units
	Fill  color.Color
	// NegFill, when set, colours bars below zero.
	NegFill color.Color
	// Labels prints each bar's value (in chart units, one decimal) at its end.
	Labels bool
}

func (b *barPlot) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for _, pt := range b.XYs {
		if pt.Y == 0 {
			continue
		}
		x0, x1 := trX(pt.X-b.Width/2), trX(pt.X+b.Width/2)
		y0, y1 := trY(0), trY(pt.Y)
		fill := b.Fill
		if pt.Y < 0 && b.NegFill != nil {
			fill = b.NegFill
		}
		poly := c.ClipPolygonY([]vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}})
		c.FillPolygon(fill, poly)
		if b.Labels {
			// Inside the top of the bar in white when it fits (clear of
			// budget lines above), else just outside it.
			sty := text.Style{Color: color.White, Font: font.From(chartFont, 8.5), XAlign: draw.XCenter, YAlign: draw.YTop, Handler: p.TextHandler}
			at := vg.Point{X: (x0 + x1) / 2, Y: y1 - vg.Points(3)}
			inside := math.Abs(float64(y1-y0)) > float64(vg.Points(16))
			if pt.Y < 0 {
				sty.YAlign = draw.YBottom
				at.Y = y1 + vg.Points(3)
			}
			if !inside {
				sty.Color = inkColor
				if pt.Y >= 0 {
					sty.YAlign, at.Y = draw.YBottom, y1+vg.Points(2)
				} else {
					sty.YAlign, at.Y = draw.YTop, y1-vg.Points(2)
				}
			}
			c.FillText(sty, at, formatFixed(pt.Y, 1))
		}
	}
}

func (b *barPlot) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax, ymin, ymax = math.Inf(1), math.Inf(-1), 0, 0
	for _, pt := range b.XYs {
		xmin = math.Min(xmin, pt.X-b.Width/2)
		xmax = math.Max(xmax, pt.X+b.Width/2)
		ymin = math.Min(ymin, pt.Y)
		ymax = math.Max(ymax, pt.Y)
	}
	return
}

func (b *barPlot) Thumbnail(c *draw.Canvas) {
	r := c.Rectangle
	c.FillPolygon(b.Fill, []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}})
}

// budgetSteps draws each year's cap as a horizontal segment over the
// year's bar slot, joined into steps where consecutive years are capped.
type budgetSteps struct {
	XYs  plotter.XYs
	Line draw.LineStyle
}

func (s *budgetSteps) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	var line []vg.Point
	flush := func() {
		if len(line) > 1 {
			c.StrokeLines(s.Line, c.ClipLinesXY(line)...)
		}
		line = nil
	}
	for i, pt := range s.XYs {
		if i > 0 && s.XYs[i-1].X != pt.X-1 {
			flush()
		}
		line = append(line, vg.Point{X: trX(pt.X - 0.5), Y: trY(pt.Y)}, vg.Point{X: trX(pt.X + 0.5), Y: trY(pt.Y)})
	}
	flush()
}

func (s *budgetSteps) DataRange() (xmin, xmax, ymin, ymax float64) {
	return plotter.XYRange(s.XYs)
}

func (s *budgetSteps) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	c.StrokeLine2(s.Line, c.Min.X, y, c.Max.X, y)
}

// cashChart draws the yearly net cash flow as bars with the cumulative
// discounted cash flow of the plan and of doing nothing as lines.
func cashChart(c *plans.Case, r *plans.Result) (chart, error) {
	maxAbs := 0.0
	for _, cf := range r.Cashflow {
		maxAbs = math.Max(maxAbs, math.Max(math.Abs(cf.Net), math.Abs(cf.CumulativePV)))
	}
	for _, cf := range r.BaselineCashflow {
		maxAbs = math.Max(maxAbs, math.Abs(cf.CumulativePV))
	}
	scale, unit := moneyScale(maxAbs, r.Currency)
	p := newPlot("", "Year", "Cash ("+unit+")")
	first, last := c.FirstYear, c.FirstYear+c.Horizon-1
	p.X.Tick.Marker = yearTicks{first, last}
	p.Y.Tick.Marker = numberTicks{}
	p.X.Min, p.X.Max = float64(first)-0.7, float64(last)+0.7
	p.Add(hGrid())
	var net, cum, base plotter.XYs
	for _, cf := range r.Cashflow {
		net = append(net, plotter.XY{X: float64(cf.Year), Y: cf.Net / scale})
		cum = append(cum, plotter.XY{X: float64(cf.Year), Y: cf.CumulativePV / scale})
	}
	for _, cf := range r.BaselineCashflow {
		base = append(base, plotter.XY{X: float64(cf.Year), Y: cf.CumulativePV / scale})
	}
	zero, _ := plotter.NewLine(plotter.XYs{{X: float64(first) - 0.7, Y: 0}, {X: float64(last) + 0.7, Y: 0}})
	zero.Color = inkColor
	zero.Width = vg.Points(0.8)
	bars := &barPlot{XYs: net, Width: 0.6, Fill: gainColor, NegFill: lossColor, Labels: true}
	p.Add(bars, zero)
	legend := []namedThumb{{"net cash flow of the year, plan", bars}}
	if neg := hasNegative(net); neg {
		legend = append(legend, namedThumb{"net cash flow below zero", &barPlot{Fill: lossColor}})
	}
	if len(base) > 0 {
		l, s, err := plotter.NewLinePoints(base)
		if err != nil {
			return chart{}, fmt.Errorf("report: baseline line: %w", err)
		}
		l.Color, l.Width, l.Dashes = baseColor, vg.Points(1.5), []vg.Length{vg.Points(4), vg.Points(3)}
		s.Shape, s.Color, s.Radius = draw.TriangleGlyph{}, baseColor, vg.Points(3)
		p.Add(l, s)
		legend = append(legend, namedThumb{"cumulative discounted cash flow, doing nothing", thumbs{l, s}})
	}
	l, s, err := plotter.NewLinePoints(cum)
	if err != nil {
		return chart{}, fmt.Errorf("report: cumulative line: %w", err)
	}
	l.Color, l.Width = cumColor, vg.Points(1.8)
	s.Shape, s.Color, s.Radius = draw.CircleGlyph{}, cumColor, vg.Points(3)
	p.Add(l, s)
	legend = append(legend, namedThumb{"cumulative discounted cash flow, plan", thumbs{l, s}})
	ymin, ymax := 0.0, 0.0
	for _, set := range []plotter.XYs{net, cum, base} {
		for _, pt := range set {
			ymin, ymax = math.Min(ymin, pt.Y), math.Max(ymax, pt.Y)
		}
	}
	span := ymax - ymin
	if span == 0 {
		span = 1
	}
	p.Y.Min, p.Y.Max = ymin-0.05*span, ymax+0.08*span
	svg, err := withLegendBelow(p, legend, 1)
	return chart{
		ID:    "chart-cash",
		Title: "Net cash flow and cumulative discounted cash flow",
		Caption: "Bars: the plan's net cash flow of each year (revenue − opex − capex − tax, plus salvage in the last year). " +
			"Lines: the running sum of the discounted cash flow, for the plan and for doing nothing; where the plan's line ends is its NPV.",
		SVG: svg,
	}, err
}

func hasNegative(xy plotter.XYs) bool {
	for _, p := range xy {
		if p.Y < 0 {
			return true
		}
	}
	return false
}

// utilChart draws the link × year grid of peak utilisation, before the plan
// (top) and after it (bottom).
func utilChart(c *plans.Case, r *plans.Result) ([]chart, error) {
	links, total := gridLinks(r)
	index := map[string]int{}
	for i, l := range links {
		index[l] = i
	}
	first, last := c.FirstYear, c.FirstYear+c.Horizon-1
	mk := func(title string, after bool) *plot.Plot {
		p := newPlot(title, "Year", "Link")
		p.X.Tick.Marker = yearTicks{first, last}
		var ticks []plot.Tick
		for i, l := range links {
			ticks = append(ticks, plot.Tick{Value: float64(len(links) - 1 - i), Label: l})
		}
		p.Y.Tick.Marker = plot.ConstantTicks(ticks)
		p.Y.Tick.Length = 0
		p.X.Tick.Length = 0
		p.Y.Padding, p.X.Padding = 0, 0
		p.X.Min, p.X.Max = float64(first)-0.5, float64(last)+0.5
		p.Y.Min, p.Y.Max = -0.5, float64(len(links))-0.5
		p.Add(&utilGridPlot{r: r, index: index, n: len(links), after: after})
		return p
	}
	rowH := 0.62 * vg.Centimeter
	panelH := vg.Length(len(links))*rowH + 2.0*vg.Centimeter
	legendH := 2.4 * vg.Centimeter
	// One figure per panel, each with its legend, so that each fits a
	// printed page.
	panel := func(title string, after bool) (string, error) {
		p := mk(title, after)
		return svgOf(chartWidth, panelH+legendH, func(dc draw.Canvas) {
			p.Draw(draw.Crop(dc, 0, 0, legendH, 0))
			drawLegendColumns(draw.Crop(dc, 0.4*vg.Centimeter, 0, 0, -panelH), utilLegend, 2)
		})
	}
	before, err := panel("", false)
	if err != nil {
		return nil, err
	}
	after, err := panel("", true)
	if err != nil {
		return nil, err
	}
	caption := "Each cell is the link's peak utilisation in the busier direction in that year, as a share of its capacity (%). " +
		"Orange cells with bold figures are at the utilisation ceiling: without more capacity, traffic there is turned away."
	if len(links) < total {
		caption += fmt.Sprintf(" The grid shows %d of the %d links: those the plan upgrades, then the busiest after the plan; the Markdown report lists every link.", len(links), total)
	}
	return []chart{
		{ID: "chart-utilisation-before", Title: "Peak utilisation by link and year before the plan (doing nothing)", Caption: caption, SVG: before},
		{ID: "chart-utilisation-after", Title: "Peak utilisation by link and year after the plan",
			Caption: "As above, with the plan's purchases in service. A frame with a corner mark shows capacity added by the plan.", SVG: after},
	}, nil
}

// maxGridLinks is the most links the utilisation grid draws, so that the
// figure fits one printed page.
const maxGridLinks = 22

// gridLinks returns the links of the utilisation grid in the Result's
// order, and how many links there are. When there are more than
// maxGridLinks it keeps the upgraded links first, then the links with the
// highest peak utilisation after the plan (ties by name).
func gridLinks(r *plans.Result) ([]string, int) {
	var all []string
	seen := map[string]bool{}
	upgraded := map[string]bool{}
	peak := map[string]float64{}
	for _, ly := range r.Links {
		if !seen[ly.Link] {
			seen[ly.Link] = true
			all = append(all, ly.Link)
		}
		if ly.CapacityAfter > ly.CapacityBefore {
			upgraded[ly.Link] = true
		}
		u := ly.UtilisationAfter
		if ly.Ceiling > 0 {
			u /= ly.Ceiling // how close to its own ceiling
		}
		peak[ly.Link] = math.Max(peak[ly.Link], u)
	}
	if len(all) <= maxGridLinks {
		return all, len(all)
	}
	rank := append([]string(nil), all...)
	sort.SliceStable(rank, func(i, j int) bool {
		a, b := rank[i], rank[j]
		if upgraded[a] != upgraded[b] {
			return upgraded[a]
		}
		if peak[a] != peak[b] {
			return peak[a] > peak[b]
		}
		return a < b
	})
	keep := map[string]bool{}
	for _, l := range rank[:maxGridLinks] {
		keep[l] = true
	}
	var out []string
	for _, l := range all {
		if keep[l] {
			out = append(out, l)
		}
	}
	return out, len(all)
}

// drawLegendColumns draws the entries of l in cols columns.
func drawLegendColumns(c draw.Canvas, entries []namedThumb, cols int) {
	per := (len(entries) + cols - 1) / cols
	w := (c.Max.X - c.Min.X) / vg.Length(cols)
	for k := 0; k < cols; k++ {
		lo := k * per
		hi := min(lo+per, len(entries))
		if lo >= hi {
			break
		}
		sub := plot.NewLegend()
		sub.TextStyle.Font = font.From(chartFont, 9)
		sub.TextStyle.Color = inkColor
		sub.Top, sub.Left = true, true
		sub.Padding = vg.Points(4)
		sub.ThumbnailWidth = vg.Points(22)
		for _, e := range entries[lo:hi] {
			sub.Add(e.name, e.thumb)
		}
		col := draw.Crop(c, vg.Length(k)*w, -(vg.Length(cols-1-k) * w), 0, 0)
		sub.Draw(col)
	}
}

type namedThumb struct {
	name  string
	thumb plot.Thumbnailer
}

// utilLegend is the fixed legend of the utilisation grid.
var utilLegend = func() []namedThumb {
	var out []namedThumb
	for i := range utilRamp {
		out = append(out, namedThumb{utilBinLabel(i), swatch{fill: utilRamp[i]}})
	}
	out = append(out,
		namedThumb{"at the utilisation ceiling (bold figure)", swatch{fill: ceilingColor}},
		namedThumb{"capacity added by the plan", swatch{fill: utilRamp[1], mark: true}},
		namedThumb{"no capacity (link not built)", swatch{fill: noCapColor}},
	)
	return out
}()

// swatch is a legend thumbnail: a filled square, optionally with the
// upgrade corner mark.
type swatch struct {
	fill color.Color
	mark bool
}

func (s swatch) Thumbnail(c *draw.Canvas) {
	r := c.Rectangle
	side := math.Min(float64(r.Max.X-r.Min.X), float64(r.Max.Y-r.Min.Y))
	x0 := r.Min.X
	y0 := r.Min.Y
	x1, y1 := x0+vg.Length(side), y0+vg.Length(side)
	c.FillPolygon(s.fill, []vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}})
	c.StrokeLines(draw.LineStyle{Color: gridColor, Width: vg.Points(0.5)}, []vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}, {X: x0, Y: y0}})
	if s.mark {
		in := vg.Points(1.5)
		c.StrokeLines(draw.LineStyle{Color: inkColor, Width: vg.Points(1.2)}, []vg.Point{{X: x0 + in, Y: y0 + in}, {X: x1 - in, Y: y0 + in}, {X: x1 - in, Y: y1 - in}, {X: x0 + in, Y: y1 - in}, {X: x0 + in, Y: y0 + in}})
		drawCornerMark(c, x1, y1, vg.Length(side)*0.5)
	}
}

// drawCornerMark draws the "capacity added" mark: a dark triangle in the
// top-right corner at (x, y).
func drawCornerMark(c *draw.Canvas, x, y, size vg.Length) {
	drawCornerMarkColor(c, x, y, size, inkColor)
}

// utilGridPlot draws the cells of one utilisation panel.
type utilGridPlot struct {
	r     *plans.Result
	index map[string]int
	n     int
	after bool
}

func (g *utilGridPlot) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for _, ly := range g.r.Links {
		i, ok := g.index[ly.Link]
		if !ok {
			continue // not in the grid
		}
		row := float64(g.n - 1 - i)
		x0, x1 := trX(float64(ly.Year)-0.5), trX(float64(ly.Year)+0.5)
		y0, y1 := trY(row-0.5), trY(row+0.5)
		capacity, u := ly.CapacityBefore, ly.UtilisationBefore
		if g.after {
			capacity, u = ly.CapacityAfter, ly.UtilisationAfter
		}
		fill := color.Color(noCapColor)
		label := "—"
		bold := false
		if capacity > 0 {
			fill = utilColor(u, ly.Ceiling)
			label = formatFixed(100*u, 1)
			bold = plans.AtCeiling(u, ly.Ceiling)
		}
		cell := []vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}}
		c.FillPolygon(fill, cell)
		c.StrokeLines(draw.LineStyle{Color: color.White, Width: vg.Points(1.2)}, append(cell, cell[0]))
		txt := color.Color(inkColor)
		if darkBackground(fill) {
			txt = color.White
		}
		size := vg.Length(8)
		if x1-x0 < 0.9*vg.Centimeter { // long horizons: narrow cells
			size = 6.5
		}
		f := font.From(chartFont, size)
		if bold {
			f.Weight = xfont.WeightBold
		}
		sty := text.Style{Color: txt, Font: f, XAlign: draw.XCenter, YAlign: draw.YCenter, Handler: p.TextHandler}
		c.FillText(sty, vg.Point{X: (x0 + x1) / 2, Y: (y0 + y1) / 2}, label)
		if g.after && ly.CapacityAfter > ly.CapacityBefore {
			// Capacity added: an inset frame and a corner triangle in the
			// text colour, so that the mark reads on every fill.
			in := vg.Points(2.2)
			frame := []vg.Point{{X: x0 + in, Y: y0 + in}, {X: x1 - in, Y: y0 + in}, {X: x1 - in, Y: y1 - in}, {X: x0 + in, Y: y1 - in}, {X: x0 + in, Y: y0 + in}}
			c.StrokeLines(draw.LineStyle{Color: txt, Width: vg.Points(1.6)}, frame)
			drawCornerMarkColor(&c, x1-in, y1-in, 0.42*(y1-y0), txt)
		}
	}
}

func drawCornerMarkColor(c *draw.Canvas, x, y, size vg.Length, clr color.Color) {
	c.FillPolygon(clr, []vg.Point{{X: x - size, Y: y}, {X: x, Y: y}, {X: x, Y: y - size}})
}

func (g *utilGridPlot) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = math.Inf(1), math.Inf(-1)
	for _, ly := range g.r.Links {
		xmin = math.Min(xmin, float64(ly.Year)-0.5)
		xmax = math.Max(xmax, float64(ly.Year)+0.5)
	}
	return xmin, xmax, -0.5, float64(g.n) - 0.5
}
