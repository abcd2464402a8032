package report

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"netstage/plans"
)

// Map sizes: the height follows the network's shape within these limits.
const (
	mapMinHeight = 7 * vg.Centimeter
	mapMaxHeight = 15 * vg.Centimeter
)

// mapLink is one link as the map draws it.
type mapLink struct {
	a, b     plotter.XY
	peak     float64 // peak utilisation after the plan over the horizon
	ceiling  float64
	upgraded bool
	built    bool // false for a candidate link that the plan does not build
}

// mapChart draws the sites at their coordinates and the links coloured by
// their peak utilisation after the plan; upgraded links are drawn wider,
// with a diamond at their middle. The caller checks mapNote first.
func mapChart(c *plans.Case, r *plans.Result) (chart, error) {
	latLon := c.Sites[0].HasLatLon
	// Plane coordinates for lat/lon: an equirectangular projection around
	// the network's mean latitude keeps the shape right for a region.
	cosLat := 1.0
	if latLon {
		sum := 0.0
		for _, s := range c.Sites {
			sum += s.Lat
		}
		cosLat = math.Cos(sum / float64(len(c.Sites)) * math.Pi / 180)
		if cosLat < 0.1 {
			cosLat = 0.1
		}
	}
	pos := make([]plotter.XY, len(c.Sites))
	for i, s := range c.Sites {
		if latLon {
			pos[i] = plotter.XY{X: s.Lon, Y: s.Lat}
		} else {
			pos[i] = plotter.XY{X: s.X, Y: s.Y}
		}
	}
	peak := map[string]float64{}
	ceiling := map[string]float64{}
	upgraded := map[string]bool{}
	built := map[string]bool{}
	for _, ly := range r.Links {
		peak[ly.Link] = math.Max(peak[ly.Link], ly.UtilisationAfter)
		ceiling[ly.Link] = ly.Ceiling
		if ly.CapacityAfter > ly.CapacityBefore {
			upgraded[ly.Link] = true
		}
		if ly.CapacityAfter > 0 {
			built[ly.Link] = true
		}
	}
	var links []mapLink
	for _, l := range c.Links {
		if l.A < 0 || l.B < 0 || l.A >= len(pos) || l.B >= len(pos) {
			continue
		}
		links = append(links, mapLink{
			a: pos[l.A], b: pos[l.B], peak: peak[l.ID], ceiling: ceiling[l.ID],
			upgraded: upgraded[l.ID], built: built[l.ID] || l.Candidate == nil,
		})
	}

	xLabel, yLabel := "x (case units)", "y (case units)"
	if latLon {
		xLabel, yLabel = "Longitude (degrees east)", "Latitude (degrees north)"
	}
	p := newPlot("", xLabel, yLabel)
	p.X.Tick.Marker = numberTicks{}
	p.Y.Tick.Marker = numberTicks{}
	p.Add(&mapPlot{links: links})

	sites := make(plotter.XYs, len(pos))
	names := make([]string, len(pos))
	copy(sites, pos)
	for i, s := range c.Sites {
		names[i] = s.Name
		if names[i] == "" {
			names[i] = s.ID
		}
	}
	sc, err := plotter.NewScatter(sites)
	if err != nil {
		return chart{}, err
	}
	sc.Shape = draw.CircleGlyph{}
	sc.Color = siteColor
	sc.Radius = vg.Points(3.5)
	p.Add(sc)
	p.Add(&siteLabels{at: sites, names: names})

	// Ranges with room for labels, and an aspect ratio that keeps the
	// geography: one degree of longitude is cos(latitude) of one of latitude.
	xmin, xmax, ymin, ymax := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, s := range sites {
		xmin, xmax = math.Min(xmin, s.X), math.Max(xmax, s.X)
		ymin, ymax = math.Min(ymin, s.Y), math.Max(ymax, s.Y)
	}
	dx, dy := xmax-xmin, ymax-ymin
	if dx == 0 {
		dx = 1
	}
	if dy == 0 {
		dy = 1
	}
	p.X.Min, p.X.Max = xmin-0.08*dx, xmax+0.22*dx
	p.Y.Min, p.Y.Max = ymin-0.1*dy, ymax+0.12*dy
	plotW := float64(chartWidth - 2.5*vg.Centimeter)
	ratio := (p.Y.Max - p.Y.Min) / ((p.X.Max - p.X.Min) * cosLat)
	h := vg.Length(plotW*ratio) + 2.5*vg.Centimeter
	h = max(mapMinHeight, min(mapMaxHeight, h))

	legendH := 1.9 * vg.Centimeter
	svg, err := svgOf(chartWidth, h+legendH, func(dc draw.Canvas) {
		p.Draw(draw.Crop(dc, 0, 0, legendH, 0))
		legend := draw.Crop(dc, 0.4*vg.Centimeter, 0, 0, -h)
		drawLegendColumns(legend, mapLegend, 3)
	})
	return chart{
		ID:    "chart-map",
		Title: "Network map: peak utilisation after the plan",
		Caption: "Sites at their coordinates. Each link is coloured by its highest peak utilisation over the horizon after the plan; " +
			"orange links reach their utilisation ceiling. Wide links with a diamond at their middle get capacity from the plan; " +
			"dotted grey links are candidate links the plan does not build.",
		SVG: svg,
	}, err
}

var mapLegend = func() []namedThumb {
	var out []namedThumb
	for i := range utilRamp {
		out = append(out, namedThumb{utilBinLabel(i), lineSwatch{clr: utilRamp[i]}})
	}
	out = append(out,
		namedThumb{"at the ceiling", lineSwatch{clr: ceilingColor}},
		namedThumb{"upgraded by the plan", lineSwatch{clr: utilRamp[2], upgraded: true}},
		namedThumb{"candidate, not built", lineSwatch{candidate: true}},
	)
	return out
}()

// Link styles of the map.
var (
	casingColor   = color.RGBA{0x6b, 0x72, 0x7c, 0xff}
	linkWidth     = vg.Points(3)
	upgradedWidth = vg.Points(6.5)
)

// linkStyles returns the casing and the fill of a link line.
func linkStyles(clr color.Color, upgraded, candidate bool) (draw.LineStyle, draw.LineStyle) {
	if candidate {
		s := draw.LineStyle{Color: baseColor, Width: vg.Points(1.2), Dashes: []vg.Length{vg.Points(1.5), vg.Points(2.5)}}
		return draw.LineStyle{}, s
	}
	w := linkWidth
	if upgraded {
		w = upgradedWidth
	}
	return draw.LineStyle{Color: casingColor, Width: w + vg.Points(1.4)}, draw.LineStyle{Color: clr, Width: w}
}

type lineSwatch struct {
	clr       color.Color
	upgraded  bool
	candidate bool
}

func (s lineSwatch) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	casing, fill := linkStyles(s.clr, s.upgraded, s.candidate)
	if casing.Color != nil {
		c.StrokeLine2(casing, c.Min.X, y, c.Max.X, y)
	}
	c.StrokeLine2(fill, c.Min.X, y, c.Max.X, y)
	if s.upgraded {
		c.DrawGlyph(diamondStyle(), vg.Point{X: (c.Min.X + c.Max.X) / 2, Y: y})
	}
}

func diamondStyle() draw.GlyphStyle {
	return draw.GlyphStyle{Color: inkColor, Radius: vg.Points(5), Shape: diamondGlyph{}}
}

// diamondGlyph is a filled diamond with a white rim.
type diamondGlyph struct{}

func (diamondGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius
	rim := r + vg.Points(1.2)
	c.FillPolygon(color.White, []vg.Point{{X: pt.X, Y: pt.Y + rim}, {X: pt.X + rim, Y: pt.Y}, {X: pt.X, Y: pt.Y - rim}, {X: pt.X - rim, Y: pt.Y}})
	c.FillPolygon(sty.Color, []vg.Point{{X: pt.X, Y: pt.Y + r}, {X: pt.X + r, Y: pt.Y}, {X: pt.X, Y: pt.Y - r}, {X: pt.X - r, Y: pt.Y}})
}

// mapPlot draws the links of the map.
type mapPlot struct{ links []mapLink }

func (m *mapPlot) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	pt := func(xy plotter.XY) vg.Point { return vg.Point{X: trX(xy.X), Y: trY(xy.Y)} }
	// Candidates first, then casings, then fills, so that crossings stay
	// readable; upgraded links last, on top.
	for pass := 0; pass < 4; pass++ {
		for _, l := range m.links {
			candidate := !l.built
			switch pass {
			case 0:
				if candidate {
					_, s := linkStyles(nil, false, true)
					c.StrokeLine2(s, pt(l.a).X, pt(l.a).Y, pt(l.b).X, pt(l.b).Y)
				}
				continue
			case 1, 2:
				if candidate || l.upgraded {
					continue
				}
			case 3:
				if candidate || !l.upgraded {
					continue
				}
			}
			casing, fill := linkStyles(utilColor(l.peak, l.ceiling), l.upgraded, false)
			if pass == 1 || pass == 3 {
				c.StrokeLine2(casing, pt(l.a).X, pt(l.a).Y, pt(l.b).X, pt(l.b).Y)
			}
			if pass == 2 || pass == 3 {
				c.StrokeLine2(fill, pt(l.a).X, pt(l.a).Y, pt(l.b).X, pt(l.b).Y)
			}
			if pass == 3 {
				mid := vg.Point{X: (pt(l.a).X + pt(l.b).X) / 2, Y: (pt(l.a).Y + pt(l.b).Y) / 2}
				c.DrawGlyph(diamondStyle(), mid)
			}
		}
	}
}

func (m *mapPlot) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax, ymin, ymax = math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, l := range m.links {
		for _, p := range []plotter.XY{l.a, l.b} {
			xmin, xmax = math.Min(xmin, p.X), math.Max(xmax, p.X)
			ymin, ymax = math.Min(ymin, p.Y), math.Max(ymax, p.Y)
		}
	}
	return
}

// siteLabels writes each site's name to the upper right of its marker on a
// light backing, so that links running under a name do not hide it.
type siteLabels struct {
	at    plotter.XYs
	names []string
}

func (l *siteLabels) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	sty := text.Style{Color: inkColor, Font: font.From(chartFont, 9), Handler: p.TextHandler, YAlign: draw.YBottom}
	backing := color.NRGBA{0xff, 0xff, 0xff, 0xd0}
	pad := vg.Points(1.5)
	for i, xy := range l.at {
		pt := vg.Point{X: trX(xy.X) + vg.Points(5), Y: trY(xy.Y) + vg.Points(3)}
		w, h := sty.Width(l.names[i]), sty.Height(l.names[i])
		c.FillPolygon(backing, []vg.Point{
			{X: pt.X - pad, Y: pt.Y - pad}, {X: pt.X + w + pad, Y: pt.Y - pad},
			{X: pt.X + w + pad, Y: pt.Y + h + pad}, {X: pt.X - pad, Y: pt.Y + h + pad},
		})
		c.FillText(sty, pt, l.names[i])
	}
}
