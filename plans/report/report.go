package report

import (
	"bufio"
	"fmt"
	"html"
	"io"
	"strings"

	"netstage/plans"
	"netstage/plans/scenario"
)

// Format is an output format of the report.
type Format int

const (
	// HTML is one self-contained page: inline CSS and SVG, no scripts.
	HTML Format = iota
	// Markdown is plain Markdown (tables, no images) for wikis and email.
	Markdown
)

// String returns the format's name as the --format flag spells it.
func (f Format) String() string {
	switch f {
	case HTML:
		return "html"
	case Markdown:
		return "md"
	}
	return "unknown"
}

// ParseFormat reads a format name: "html", or "md" (or "markdown").
func ParseFormat(s string) (Format, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "html", "htm":
		return HTML, nil
	case "md", "markdown":
		return Markdown, nil
	}
	return 0, fmt.Errorf("report: unknown format %q (allowed: html, md)", s)
}

// Options adds to a report what the Result does not carry. The zero value
// adds nothing.
type Options struct {
	// InputWarnings are the warnings of loading the case (legal but
	// suspicious inputs); the report lists them with the solver's warnings.
	InputWarnings []string
	// Tornado holds the bars of a one-factor-at-a-time run
	// (scenario.Tornado), widest swing first; the report charts them in a
	// section of their own when the result has a plan. Nil: no section.
	Tornado []scenario.TornadoBar
}

// Write renders the report of the solved plan r for the case c in format f.
// It fails only when c or r is nil, a chart cannot be drawn, or w fails.
func Write(w io.Writer, c *plans.Case, r *plans.Result, f Format) error {
	return WriteWith(w, c, r, f, Options{})
}

// WriteWith is Write with options.
func WriteWith(w io.Writer, c *plans.Case, r *plans.Result, f Format, opts Options) error {
	v, err := buildView(c, r)
	if err != nil {
		return err
	}
	v.Warnings = append(append([]string(nil), opts.InputWarnings...), v.Warnings...)
	if v.HasPlan {
		v.Tornado = buildTornado(c, opts.Tornado, v.Currency, v.CostMode)
	}
	bw := bufio.NewWriter(w)
	switch f {
	case HTML:
		if v.HasPlan {
			if err := addCharts(v, c, r); err != nil {
				return err
			}
			if v.Tornado != nil {
				ch, err := tornadoChart(opts.Tornado, v.Currency)
				if err != nil {
					return err
				}
				ch = namedForScreenReaders(ch)
				v.Tornado.Chart = &ch
			}
		}
		err = writeHTML(bw, v)
	case Markdown:
		err = writeMarkdown(bw, v)
	default:
		return fmt.Errorf("report: unknown format %d", int(f))
	}
	if err != nil {
		return err
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	return nil
}

// addCharts draws the HTML charts: capex, cash flow, utilisation, and the
// map when the case has coordinates.
func addCharts(v *view, c *plans.Case, r *plans.Result) error {
	for _, f := range []func(*plans.Case, *plans.Result) (chart, error){capexChart, cashChart} {
		ch, err := f(c, r)
		if err != nil {
			return err
		}
		v.Charts = append(v.Charts, ch)
	}
	grid, err := utilChart(c, r)
	if err != nil {
		return err
	}
	v.Charts = append(v.Charts, grid...)
	if v.MapNote == "" {
		ch, err := mapChart(c, r)
		if err != nil {
			return err
		}
		v.Charts = append(v.Charts, ch)
	}
	for i := range v.Charts {
		v.Charts[i] = namedForScreenReaders(v.Charts[i])
	}
	return nil
}

// namedForScreenReaders gives the chart's SVG its title as an ARIA label.
func namedForScreenReaders(ch chart) chart {
	ch.SVG = strings.Replace(ch.SVG, `<svg class="chart" role="img"`,
		`<svg class="chart" role="img" aria-label="`+html.EscapeString(ch.Title)+`"`, 1)
	return ch
}
