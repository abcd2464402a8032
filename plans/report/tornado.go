package report

import (
	"fmt"
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"netstage/plans"
	"netstage/plans/scenario"
)

// Colours of the tornado's two ends: one blue hue, light and dark, so that
// the ends differ in lightness (grey print, any colour-vision deficiency);
// each bar also sits in its own half of the row and is labelled with the
// factor's value. They are near the utilisation ramp's but not equal to any
// colour of the report, so that the browser test can find the bars.
var (
	tornadoLowColor  = color.RGBA{0x93, 0xb4, 0xdc, 0xff}
	tornadoHighColor = color.RGBA{0x17, 0x33, 0x5e, 0xff}
)

// tornadoView is the report's tornado section.
type tornadoView struct {
	Intro string
	Rows  []tornadoRow
	// Chart is drawn only for HTML.
	Chart *chart
}

// tornadoRow is one factor of the table, formatted.
type tornadoRow struct {
	Factor        string
	Case          string // the case's own value (×1 for a multiplier)
	Low, LowNPV   string
	High, HighNPV string
	Swing         string
}

// factorLabel names a factor for people.
func factorLabel(name string) string {
	switch name {
	case plans.FactorGrowth:
		return "Traffic growth"
	case plans.FactorTariff:
		return "Tariffs"
	case plans.FactorCapex:
		return "Equipment prices"
	case plans.FactorDiscountRate:
		return "Discount rate"
	case plans.FactorBudget:
		return "Capex budget caps"
	}
	return name
}

// factorValue formats a factor's value: a rate as a percentage, a
// multiplier as "×0.8".
func factorValue(name string, v float64) string {
	if name == plans.FactorDiscountRate {
		return percent(v)
	}
	return "×" + strconv.FormatFloat(v, 'g', -1, 64)
}

// noPlanText says in words why an end of a bar has no NPV.
func noPlanText(status string) string {
	switch plans.Status(status) {
	case plans.StatusInfeasible:
		return "no plan (infeasible)"
	case plans.StatusUnbounded:
		return "no plan (unbounded)"
	case plans.StatusLimit:
		return "no plan within the limits"
	case scenario.StatusError:
		return "no plan (the solve failed)"
	}
	return "no plan (" + status + ")"
}

// endNPV formats an end's NPV, or why it has none; a plan not proven
// optimal says so.
func endNPV(npv *float64, status, currency string) string {
	if npv == nil {
		return noPlanText(status)
	}
	s := moneyCur(*npv, currency)
	if plans.Status(status) == plans.StatusFeasible {
		s += " (not proven optimal)"
	}
	return s
}

// buildTornado formats the bars of a one-factor-at-a-time run. Bars come
// widest swing first, as scenario.Tornado returns them.
func buildTornado(c *plans.Case, bars []scenario.TornadoBar, currency string, costMode bool) *tornadoView {
	if len(bars) == 0 {
		return nil
	}
	tv := &tornadoView{}
	base := "the plan above"
	if b := bars[0].BaseNPV; b != nil {
		base += ", NPV " + moneyCur(*b, currency)
	}
	tv.Intro = "How far the NPV moves when one assumption at a time is set to a low and to a high value, " +
		"every other assumption at the case's values. At each end the case is solved again, so each figure is the best plan " +
		"for that assumption, not the plan above re-priced. The base is " + base + "; " +
		"the factors are sorted by how far they move it, the widest first."
	if costMode {
		tv.Intro += " No demand pays a tariff, so each NPV is minus the network's present cost."
	}
	for _, b := range bars {
		row := tornadoRow{
			Factor: factorLabel(b.Factor), Case: factorValue(b.Factor, scenario.BaseValue(c, b.Factor)),
			Low: factorValue(b.Factor, b.Low), LowNPV: endNPV(b.LowNPV, b.LowStatus, currency),
			High: factorValue(b.Factor, b.High), HighNPV: endNPV(b.HighNPV, b.HighStatus, currency),
		}
		row.Swing = "no plan at one end"
		if b.Swing != nil {
			row.Swing = moneyCur(*b.Swing, currency)
		}
		tv.Rows = append(tv.Rows, row)
	}
	return tv
}

// tornadoRowHeight is the height of one factor's row in the chart.
const tornadoRowHeight = 1.25 * vg.Centimeter

// tornadoLabelFont is the size of the bar labels.
const tornadoLabelFont = 8.5

// fontSlack is how much wider than Liberation Sans (whose metrics place the
// labels) a fallback font may render them: DejaVu Sans, the fallback on
// many Linux machines, runs about 12 % wider. Room is left for it beyond a
// label's end, and a label running left starts that much earlier, so that
// it cannot run into its bar.
const fontSlack = 0.18

// tornadoLabel is a text at the end of a bar (or at the base line for an
// end without a plan), in chart units.
type tornadoLabel struct {
	x    float64 // anchor
	row  float64 // y of the half-row's centre
	left bool    // the text runs left of the anchor
	text string
}

// tornadoPlot draws the bars: each factor's row has its low end in the upper
// half and its high end in the lower half, each from the base NPV to that
// end's NPV, so that ends on the same side of the base never hide each
// other.
type tornadoPlot struct {
	bars   []scenario.TornadoBar
	base   float64 // chart units
	scale  float64 // money per chart unit
	labels []tornadoLabel
}

// halfOffset is where each end's half-bar sits from the row's centre, and
// halfHeight how tall it is (in rows).
const (
	halfOffset = 0.2
	halfHeight = 0.36
)

func newTornadoPlot(bars []scenario.TornadoBar, base, scale float64) *tornadoPlot {
	tp := &tornadoPlot{bars: bars, base: base / scale, scale: scale}
	n := len(bars)
	for i, b := range bars {
		row := float64(n - 1 - i)
		ends := []struct {
			v      float64
			npv    *float64
			status string
			y      float64
		}{{b.Low, b.LowNPV, b.LowStatus, row + halfOffset}, {b.High, b.HighNPV, b.HighStatus, row - halfOffset}}
		for k, e := range ends {
			value := factorValue(b.Factor, e.v)
			if e.npv == nil {
				// Text from the base line, on the side away from the other
				// end's bar (to the right when neither has one).
				left := false
				if o := ends[1-k].npv; o != nil && *o/scale > tp.base {
					left = true
				}
				tp.labels = append(tp.labels, tornadoLabel{x: tp.base, row: e.y, left: left, text: value + ": " + noPlanText(e.status)})
				continue
			}
			x := *e.npv / scale
			tp.labels = append(tp.labels, tornadoLabel{x: x, row: e.y, left: x < tp.base, text: value + ": " + formatFixed(x, 1)})
		}
	}
	return tp
}

func (tp *tornadoPlot) labelStyle(p *plot.Plot) text.Style {
	return text.Style{Color: inkColor, Font: font.From(chartFont, tornadoLabelFont), YAlign: draw.YCenter, Handler: p.TextHandler}
}

func (tp *tornadoPlot) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	n := len(tp.bars)
	for i, b := range tp.bars {
		row := float64(n - 1 - i)
		for _, e := range []struct {
			npv  *float64
			y    float64
			fill color.Color
		}{{b.LowNPV, row + halfOffset, tornadoLowColor}, {b.HighNPV, row - halfOffset, tornadoHighColor}} {
			if e.npv == nil {
				continue
			}
			x0, x1 := trX(tp.base), trX(*e.npv/tp.scale)
			if x1 < x0 {
				x0, x1 = x1, x0
			}
			if x1-x0 < vg.Points(1) { // no move: a hairline, still visible
				x1 = x0 + vg.Points(1)
			}
			y0, y1 := trY(e.y-halfHeight/2), trY(e.y+halfHeight/2)
			c.FillPolygon(e.fill, []vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}})
		}
	}
	// The base line over the bars, then the labels.
	bx := trX(tp.base)
	c.StrokeLine2(tornadoBaseLine, bx, c.Min.Y, bx, c.Max.Y)
	sty := tp.labelStyle(p)
	gap := vg.Points(3)
	for _, l := range tp.labels {
		at := vg.Point{X: trX(l.x) + gap, Y: trY(l.row)}
		s := sty
		s.XAlign = draw.XLeft
		if l.left {
			at.X = trX(l.x) - gap - fontSlack*sty.Width(l.text)
			s.XAlign = draw.XRight
		}
		c.FillText(s, at, l.text)
	}
}

var tornadoBaseLine = draw.LineStyle{Color: inkColor, Width: vg.Points(1.4), Dashes: []vg.Length{vg.Points(5), vg.Points(3)}}

func (tp *tornadoPlot) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = tp.base, tp.base
	for _, l := range tp.labels {
		xmin, xmax = math.Min(xmin, l.x), math.Max(xmax, l.x)
	}
	return xmin, xmax, -0.5, float64(len(tp.bars)) - 0.5
}

// fitLabels widens the x range of p until every label fits inside the
// data area of a w × h chart: the labels' widths are fixed in points while
// the range is in chart units, so the range is found by a few rounds of
// measuring the data area and widening.
func (tp *tornadoPlot) fitLabels(p *plot.Plot, w, h vg.Length) {
	xmin, xmax, _, _ := tp.DataRange()
	span := xmax - xmin
	if span == 0 {
		span = math.Max(math.Abs(tp.base)*0.1, 1)
	}
	// a little air beyond the data, so that bars do not touch the frame
	lo, hi := xmin-0.04*span, xmax+0.04*span
	sty := tp.labelStyle(p)
	gap := vg.Points(3)
	for round := 0; round < 8; round++ {
		p.X.Min, p.X.Max = lo, hi
		dc := p.DataCanvas(draw.New(vgsvg.New(w, h)))
		areaW := float64(dc.Max.X - dc.Min.X)
		if areaW <= 0 {
			return
		}
		perPoint := (hi - lo) / areaW
		nlo, nhi := lo, hi
		for _, l := range tp.labels {
			need := float64((1+fontSlack)*sty.Width(l.text)+gap+vg.Points(2)) * perPoint
			if l.left {
				nlo = math.Min(nlo, l.x-need)
			} else {
				nhi = math.Max(nhi, l.x+need)
			}
		}
		if nlo == lo && nhi == hi {
			return
		}
		lo, hi = nlo, nhi
	}
	p.X.Min, p.X.Max = lo, hi
}

func (tp *tornadoPlot) Thumbnail(*draw.Canvas) {}

// tornadoChart draws the bars as an SVG figure.
func tornadoChart(bars []scenario.TornadoBar, currency string) (chart, error) {
	maxAbs := 0.0
	for _, b := range bars {
		for _, v := range []*float64{b.LowNPV, b.HighNPV, b.BaseNPV} {
			if v != nil {
				maxAbs = math.Max(maxAbs, math.Abs(*v))
			}
		}
	}
	scale, unit := moneyScale(maxAbs, currency)
	base := 0.0
	if b := bars[0].BaseNPV; b != nil {
		base = *b
	}
	p := newPlot("", "NPV ("+unit+")", "")
	p.X.Tick.Marker = numberTicks{}
	var ticks []plot.Tick
	for i, b := range bars {
		// Two en spaces (which SVG does not collapse) keep the name clear
		// of the axis in a wider fallback font (fontSlack).
		ticks = append(ticks, plot.Tick{Value: float64(len(bars) - 1 - i), Label: factorLabel(b.Factor) + "\u2002\u2002"})
	}
	p.Y.Tick.Marker = plot.ConstantTicks(ticks)
	p.Y.Tick.Length = 0
	p.Y.Padding = 0
	p.Y.Min, p.Y.Max = -0.5, float64(len(bars))-0.5
	grid := hGrid()
	grid.Horizontal.Color, grid.Vertical.Color = nil, gridColor
	grid.Vertical.Width = vg.Points(0.6)
	p.Add(grid)
	tp := newTornadoPlot(bars, base, scale)
	p.Add(tp)
	h := vg.Length(len(bars))*tornadoRowHeight + 1.6*vg.Centimeter
	tp.fitLabels(p, chartWidth, h)
	legend := []namedThumb{
		{"NPV with the factor at its low value", swatch{fill: tornadoLowColor}},
		{"NPV with the factor at its high value", swatch{fill: tornadoHighColor}},
		{fmt.Sprintf("base NPV: the plan above (%s %s)", formatFixed(base/scale, 1), unit), lineThumb{tornadoBaseLine}},
	}
	rows := len(legend)
	legendH := vg.Length(rows)*legendRowHeight + 0.4*vg.Centimeter
	svg, err := svgOf(chartWidth, h+legendH, func(dc draw.Canvas) {
		p.Draw(draw.Crop(dc, 0, 0, legendH, 0))
		drawLegendColumns(draw.Crop(dc, 1.2*vg.Centimeter, 0, 0, -h), legend, 1)
	})
	return chart{
		ID:    "chart-tornado",
		Title: "NPV when one assumption moves (tornado)",
		Caption: "Each row is one assumption: the upper bar is the NPV with it at its low value, the lower bar at its high value, " +
			"each from the base NPV (dashed line). Labels give the value and the NPV in " + unit + ".",
		SVG: svg,
	}, err
}

// lineThumb is a legend thumbnail of a line style.
type lineThumb struct{ style draw.LineStyle }

func (l lineThumb) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	c.StrokeLine2(l.style, c.Min.X, y, c.Max.X, y)
}
