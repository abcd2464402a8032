package report

import (
	"fmt"
	"html/template"
	"io"
)

// writeHTML renders v as one self-contained HTML page.
func writeHTML(w io.Writer, v *view) error {
	if err := htmlTemplate.Execute(w, v); err != nil {
		return fmt.Errorf("report: html: %w", err)
	}
	return nil
}

var htmlTemplate = template.Must(template.New("report").Funcs(template.FuncMap{
	"svg": func(s string) template.HTML { return template.HTML(s) }, // drawn by this package
}).Parse(htmlSource))

// pageCSS styles the page for screens and for print on A4 and Letter: the
// content fits the narrower printable width of the two, and page breaks
// never split a chart, a table row or a heading from its section.
const pageCSS = `
:root { --ink:#22262e; --muted:#5b6370; --rule:#d8dce2; --band:#f3f5f8; --accent:#2f5a8c; --warn:#b8541b; }
* { box-sizing:border-box; }
html { -webkit-print-color-adjust:exact; print-color-adjust:exact; }
body { margin:0; color:var(--ink); background:#fff; font:15px/1.5 "Segoe UI","Helvetica Neue",Arial,"Liberation Sans",sans-serif; }
main { max-width:980px; margin:0 auto; padding:28px 32px 48px; }
header { border-bottom:3px solid var(--accent); padding-bottom:12px; margin-bottom:20px; }
h1 { font-size:26px; margin:0 0 4px; line-height:1.2; }
.sub { color:var(--muted); margin:0; }
h2 { font-size:20px; margin:32px 0 10px; padding-bottom:4px; border-bottom:1px solid var(--rule); break-after:avoid; page-break-after:avoid; }
h3 { font-size:16px; margin:18px 0 6px; break-after:avoid; page-break-after:avoid; }
p { margin:0 0 10px; }
.decision { font-size:17px; line-height:1.55; background:var(--band); border-left:5px solid var(--accent); padding:14px 18px; }
.keys { display:grid; grid-template-columns:repeat(auto-fill,minmax(200px,1fr)); gap:10px; margin:16px 0 0; }
.key { border:1px solid var(--rule); border-radius:6px; padding:10px 12px; break-inside:avoid; }
.key .label { font-size:13px; color:var(--muted); }
.key .value { font-size:21px; font-weight:600; font-variant-numeric:tabular-nums; white-space:nowrap; }
.key .note { font-size:12px; color:var(--muted); }
figure { margin:18px 0 26px; break-inside:avoid; page-break-inside:avoid; }
figure h3 { margin-top:0; }
figcaption { font-size:13px; color:var(--muted); margin-top:4px; }
svg.chart { display:block; width:100%; height:auto; }
table { border-collapse:collapse; width:100%; margin:8px 0 14px; font-size:13px; }
th, td { padding:5px 7px; border-bottom:1px solid var(--rule); text-align:left; vertical-align:top; }
th { vertical-align:bottom; }
th { background:var(--band); font-weight:600; }
thead { display:table-header-group; }
tr { break-inside:avoid; page-break-inside:avoid; }
td.num, th.num { text-align:right; font-variant-numeric:tabular-nums; }
td.num { white-space:nowrap; }
tr.total td { font-weight:600; border-top:2px solid var(--ink); }
tr.stage td { background:#fafbfc; font-weight:600; }
.why { break-inside:avoid; page-break-inside:avoid; margin-bottom:14px; }
.why ul { margin:4px 0 6px 20px; padding:0; }
.why p { margin:0 0 4px; }
table.narrow { width:auto; min-width:50%; }
.note { color:var(--muted); font-size:13px; }
.caution { border:2px solid var(--warn); border-radius:6px; padding:12px 16px; break-inside:avoid; page-break-inside:avoid; }
.caution h2 { border:0; margin-top:0; }
.wide { overflow-x:auto; }
@page { size:auto; margin:14mm 13mm; }
@media print {
  body { font-size:10pt; }
  main { max-width:none; padding:0; }
  h1 { font-size:18pt; }
  h2 { font-size:13.5pt; }
  .decision { font-size:11pt; }
  .keys { grid-template-columns:repeat(4,1fr); }
  .key .value { font-size:13pt; }
  table { font-size:8pt; }
  th, td { padding:2.5pt 3.5pt; }
  .wide { overflow:visible; }
  #chart-capex svg.chart, #chart-cash svg.chart { width:82%; }
  figure { margin:4mm 0 8mm; }
  a { color:inherit; text-decoration:none; }
}
`

const htmlSource = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}}</title>
<style>` + pageCSS + `</style>
</head>
<body>
<main>
<header>
<h1>{{.Title}}</h1>
<p class="sub">Staged capex plan for {{.Years}}, in {{.Currency}} · solver status: {{.Status}}</p>
</header>

<section id="decision">
<h2>Decision</h2>
<p class="decision">{{.Decision}}</p>
{{if .Key}}<div class="keys">{{range .Key}}
<div class="key"><div class="label">{{.Label}}</div><div class="value">{{.Value}}</div>{{if .Note}}<div class="note">{{.Note}}</div>{{end}}</div>{{end}}
</div>{{end}}
</section>
{{if .Infeasibility}}
<section id="infeasibility">
<h2>What blocks a plan</h2>
<table><thead><tr><th>Kind</th><th>Name</th><th class="num">Year</th><th class="num">Must give by</th><th>Explanation</th></tr></thead><tbody>
{{range .Infeasibility}}<tr><td>{{.Kind}}</td><td>{{.Name}}</td><td class="num">{{.Year}}</td><td class="num">{{.Amount}}</td><td>{{.Message}}</td></tr>
{{end}}</tbody></table>
</section>
{{end}}{{if .HasPlan}}
<section id="charts" class="charts">
<h2>Charts</h2>
{{range .Charts}}<figure id="{{.ID}}">
<h3>{{.Title}}</h3>
{{svg .SVG}}
<figcaption>{{.Caption}}</figcaption>
</figure>
{{end}}{{if .MapNote}}<p class="note" id="chart-map-skipped">{{.MapNote}}</p>{{end}}
</section>

<section id="plan">
<h2>Staged plan</h2>
{{if .Stages}}<p class="note">Order year: capex is paid and counted against the budget in that year. Order by: the latest month to place the order so that the capacity is live by the case's ready-by month of its in-service year. Money in {{.Currency}}.</p>
<div class="wide"><table>
<thead><tr><th>Order year</th><th>Link</th><th>Item</th><th>Vendor</th><th class="num">Units</th><th class="num">Capacity added</th><th class="num">Capex</th><th class="num">In service</th><th class="num">Order by</th></tr></thead>
<tbody>
{{range .Stages}}{{$y := .Year}}{{range .Rows}}<tr><td>{{$y}}</td><td>{{.Link}}</td><td>{{.Item}}</td><td>{{.Vendor}}</td><td class="num">{{.Units}}</td><td class="num">{{.Gbps}}</td><td class="num">{{.Capex}}</td><td class="num">{{.InService}}</td><td class="num">{{.OrderBy}}</td></tr>
{{end}}<tr class="stage"><td>{{.Year}}</td><td colspan="5">stage total (budget {{.Budget}})</td><td class="num">{{.Capex}}</td><td colspan="2"></td></tr>
{{end}}<tr class="total"><td colspan="6">Total capex</td><td class="num">{{.PlanTotal}}</td><td colspan="2"></td></tr>
</tbody></table></div>
{{if .HorizonNote}}<p class="note" id="horizon-end">{{.HorizonNote}}</p>
{{end}}{{else}}<p>The plan buys nothing.</p>{{end}}
</section>

<section id="cashflow">
<h2>Cash flow</h2>
<p class="note">{{.Currency}}, undiscounted except the present value (PV) columns. Net = revenue − opex − capex − tax{{if .HasPenalty}} − SLA penalty{{end}} + salvage. The column “vs doing nothing” is the year's net minus the net of the do-nothing network. Budgets are in the staged plan and the assumptions.</p>
<div class="wide"><table>
<thead><tr><th>Year</th><th class="num">Revenue</th><th class="num">Opex</th><th class="num">Capex</th><th class="num">Tax</th>{{if .HasPenalty}}<th class="num">SLA penalty</th>{{end}}<th class="num">Salvage</th><th class="num">Net</th><th class="num">Discount factor</th><th class="num">PV</th><th class="num">Cumulative PV</th><th class="num">vs doing nothing</th></tr></thead>
<tbody>
{{range .Cash}}<tr><td>{{.Year}}</td><td class="num">{{.Revenue}}</td><td class="num">{{.Opex}}</td><td class="num">{{.Capex}}</td><td class="num">{{.Tax}}</td>{{if $.HasPenalty}}<td class="num">{{.Penalty}}</td>{{end}}<td class="num">{{.Salvage}}</td><td class="num">{{.Net}}</td><td class="num">{{.DF}}</td><td class="num">{{.PV}}</td><td class="num">{{.CumPV}}</td><td class="num">{{.Incremental}}</td></tr>
{{end}}{{with .CashTotal}}<tr class="total"><td>{{.Year}}</td><td class="num">{{.Revenue}}</td><td class="num">{{.Opex}}</td><td class="num">{{.Capex}}</td><td class="num">{{.Tax}}</td>{{if $.HasPenalty}}<td class="num">{{.Penalty}}</td>{{end}}<td class="num">{{.Salvage}}</td><td class="num">{{.Net}}</td><td></td><td class="num">{{.PV}}</td><td></td><td class="num">{{.Incremental}}</td></tr>{{end}}
</tbody></table></div>
</section>

<section id="why">
<h2>Why each upgrade</h2>
{{range .Why}}<div class="why">
<h3>Link {{.Link}}</h3>
<ul>{{range .Purchases}}<li>{{.}}</li>{{end}}</ul>
{{range .Text}}<p>{{.}}</p>{{end}}
</div>
{{else}}<p>The plan buys nothing, so there is nothing to justify.</p>
{{end}}<p class="note">The demands named are those the solved plan routes over the link (of the routings with the plan's NPV, the one with the fewest Gbps·km), in the direction from the demand's first site to its second.</p>
</section>
{{with .Tornado}}
<section id="tornado">
<h2>Sensitivity: one assumption at a time</h2>
<p>{{.Intro}}</p>
{{with .Chart}}<figure id="{{.ID}}">
<h3>{{.Title}}</h3>
{{svg .SVG}}
<figcaption>{{.Caption}}</figcaption>
</figure>
{{end}}<div class="wide"><table>
<thead><tr><th>Assumption</th><th class="num">Case value</th><th class="num">Low value</th><th class="num">NPV at low</th><th class="num">High value</th><th class="num">NPV at high</th><th class="num">Swing</th></tr></thead>
<tbody>
{{range .Rows}}<tr><td>{{.Factor}}</td><td class="num">{{.Case}}</td><td class="num">{{.Low}}</td><td class="num">{{.LowNPV}}</td><td class="num">{{.High}}</td><td class="num">{{.HighNPV}}</td><td class="num">{{.Swing}}</td></tr>
{{end}}</tbody></table></div>
</section>
{{end}}{{end}}
<section id="assumptions">
<h2>Assumptions</h2>
<table><tbody>
{{range .Assumptions}}<tr><th scope="row">{{.Label}}</th><td>{{.Value}}</td></tr>
{{end}}</tbody></table>
{{if .Budgets}}<h3>Budget by year ({{.Currency}})</h3>
<div class="wide"><table class="narrow"><thead><tr><th>Year</th><th class="num">Cap</th><th class="num">Capex of the plan</th></tr></thead><tbody>
{{range .Budgets}}<tr><td>{{.Year}}</td><td class="num">{{.Cap}}</td><td class="num">{{.Used}}</td></tr>
{{end}}</tbody></table></div>{{end}}
{{if .Demands}}<h3>Demand forecast and tariffs</h3>
<div class="wide"><table><thead><tr><th>Demand</th><th>From</th><th>To</th><th class="num">Forecast, first → last year</th><th class="num">Growth</th><th class="num">Committed, first year</th><th class="num">Tariff, first year ({{.Currency}} per Gbps-month)</th><th class="num">Tariff erosion</th></tr></thead><tbody>
{{range .Demands}}<tr><td>{{.ID}}</td><td>{{.From}}</td><td>{{.To}}</td><td class="num">{{.Forecast}}</td><td class="num">{{.Growth}}</td><td class="num">{{.Committed}}</td><td class="num">{{.Tariff}}</td><td class="num">{{.Erosion}}</td></tr>
{{end}}</tbody></table></div>{{end}}
{{if .Vendors}}<h3>Vendor quotes</h3>
<div class="wide"><table><thead><tr><th>Vendor</th><th>Catalog</th><th>Quote</th><th>Valid until</th><th>Currency</th><th>Volume tiers</th></tr></thead><tbody>
{{range .Vendors}}<tr><td>{{.Vendor}}</td><td>{{.Catalog}}</td><td>{{.Quote}}</td><td>{{.ValidUntil}}</td><td>{{.Currency}}</td><td>{{.Tiers}}</td></tr>
{{end}}</tbody></table></div>{{end}}
{{if .Items}}<h3>Catalog items ({{.Currency}}, first-year list prices)</h3>
<div class="wide"><table><thead><tr><th>Item</th><th>Vendor</th><th>Kind</th><th class="num">Capacity</th><th class="num">Capex per unit</th><th class="num">Capex per km</th><th class="num">Opex per year</th><th class="num">Lead time</th><th class="num">Book life</th><th class="num">Price erosion</th><th>Orderable in</th></tr></thead><tbody>
{{range .Items}}<tr><td>{{.Item}}</td><td>{{.Vendor}}</td><td>{{.Kind}}</td><td class="num">{{.Gbps}}</td><td class="num">{{.Capex}}</td><td class="num">{{.PerKM}}</td><td class="num">{{.Opex}}</td><td class="num">{{.Lead}}</td><td class="num">{{.Life}}</td><td class="num">{{.Erosion}}</td><td>{{.Orderable}}</td></tr>
{{end}}</tbody></table></div>{{end}}
<h3>Solver</h3>
<table><tbody>
{{range .Solver}}<tr><th scope="row">{{.Label}}</th><td>{{.Value}}</td></tr>
{{end}}</tbody></table>
{{if .Warnings}}<h3>Warnings</h3>
<ul>{{range .Warnings}}<li>{{.}}</li>{{end}}</ul>{{end}}
</section>

<section id="caution" class="caution">
<h2>Caution</h2>
<p>{{.Caution}}</p>
</section>
</main>
</body>
</html>
`
