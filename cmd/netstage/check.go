package main

import (
	"fmt"
	"io"
	"math"
	"slices"
	"sort"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"netstage/plans"
)

func init() { registerCommand(newCheckCmd) }

// checkOptions are the inputs of `netstage check`.
type checkOptions struct {
	casePath string
	useDemo  bool
}

func newCheckCmd(env *cmdEnv) *cobra.Command {
	opts := &checkOptions{}
	cmd := &cobra.Command{
		Use:   "check CASE.toml | --demo",
		Short: "Check a case and its catalogs and summarise them",
		Long: `Check reads a case file and the catalogs it names, reports every error
it finds (file, line, column, key; exit status 2), or prints a summary of the
case: sites, links, demands, the total forecast per year, catalogs, items per
vendor, horizon and budget, followed by warnings about suspicious values.

The first-year utilisation warning routes every demand on its shortest path
by km over the existing links: a rough screen, not the plan's routing.`,
		Example: `  netstage check --demo
  netstage check mycase/case.toml`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if len(args) == 1 {
				opts.casePath = args[0]
			}
			return runCheck(env, opts)
		},
	}
	cmd.Flags().BoolVar(&opts.useDemo, "demo", false, "check the embedded demo case")
	return cmd
}

func runCheck(env *cmdEnv, opts *checkOptions) error {
	c, warns, err := loadCase(opts.casePath, opts.useDemo)
	if err != nil {
		printWarnings(env.stderr, warns)
		return err
	}
	writeCaseSummary(env.stdout, c, opts.useDemo)
	if len(warns) > 0 {
		fmt.Fprintf(env.stdout, "\nwarnings (%d)\n", len(warns))
		for _, w := range warns {
			fmt.Fprintf(env.stdout, "  %s\n", w)
		}
	} else {
		fmt.Fprintln(env.stdout, "\nno warnings")
	}
	return nil
}

// writeCaseSummary prints what a checked case contains, with fixed number
// formats so that the output can be golden-tested.
func writeCaseSummary(w io.Writer, c *plans.Case, demo bool) {
	file := c.File
	if demo {
		file = "(embedded demo)"
	}
	last := c.Year(c.Horizon - 1)
	disc := "end of year"
	if c.MidYear {
		disc = "mid-year"
	}
	candidates, committed := 0, 0
	for _, l := range c.Links {
		if l.Candidate != nil {
			candidates++
		}
	}
	for _, d := range c.Demands {
		for _, v := range d.Committed {
			if v > 0 {
				committed++
				break
			}
		}
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "case\t%s\n", c.Name)
	fmt.Fprintf(tw, "file\t%s\n", file)
	fmt.Fprintf(tw, "horizon\t%d-%d (%d years), money in %s\n", c.FirstYear, last, c.Horizon, c.Currency)
	fmt.Fprintf(tw, "discounting\t%.2f %% a year, %s\n", 100*c.DiscountRate, disc)
	fmt.Fprintf(tw, "ceiling\t%s, capacity ready by month %d\n", ceilingText(c), c.ReadyByMonth)
	fmt.Fprintf(tw, "finance\tsalvage %s, tax rate %.2f %%, SLA penalty %s per Gbps-month\n",
		c.Finance.Salvage, 100*c.Finance.TaxRate, money(c.SLAPenalty))
	if r := c.VendorPolicy(); r != "" {
		fmt.Fprintf(tw, "vendors\t%s\n", r)
	}
	fmt.Fprintf(tw, "sites\t%d\n", len(c.Sites))
	fmt.Fprintf(tw, "links\t%d (%d candidate), %s\n", len(c.Links), candidates, classCounts(c))
	fmt.Fprintf(tw, "demands\t%d (%d with committed traffic)", len(c.Demands), committed)
	if c.CostMode() {
		fmt.Fprint(tw, ", no tariffs: cost mode (present cost is minimised)")
	}
	fmt.Fprintln(tw)
	if len(c.Tornado) > 0 {
		fmt.Fprintf(tw, "report	%s\n", tornadoText(c.Tornado))
	}
	tw.Flush()

	// Per-year table.
	fmt.Fprintln(w)
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprint(tw, "year\t")
	for i := range c.Horizon {
		fmt.Fprintf(tw, "%d\t", c.Year(i))
	}
	fmt.Fprintln(tw)
	row := func(label string, f func(i int) string) {
		fmt.Fprintf(tw, "%s\t", label)
		for i := range c.Horizon {
			fmt.Fprintf(tw, "%s\t", f(i))
		}
		fmt.Fprintln(tw)
	}
	row("forecast Gbps", func(i int) string { return fmt.Sprintf("%.1f", c.TotalForecast(i)) })
	row("committed Gbps", func(i int) string {
		s := 0.0
		for _, d := range c.Demands {
			s += d.Committed[i]
		}
		return fmt.Sprintf("%.1f", s)
	})
	row("base capacity Gbps", func(i int) string {
		s := 0.0
		for _, l := range c.Links {
			s += l.BaseCapacity[i]
		}
		return fmt.Sprintf("%.0f", s)
	})
	row("budget "+c.Currency, func(i int) string {
		if v, ok := c.Budget.YearCap(i); ok {
			return money(v)
		}
		return "none"
	})
	tw.Flush()
	if math.IsInf(c.Budget.Cumulative, 1) {
		fmt.Fprintln(w, "cumulative budget: none")
	} else {
		fmt.Fprintf(w, "cumulative budget: %s %s\n", money(c.Budget.Cumulative), c.Currency)
	}

	// Catalogs and their vendors' items.
	fmt.Fprintf(w, "\ncatalogs (%d)\n", len(c.Catalogs))
	for ci, cat := range c.Catalogs {
		fmt.Fprintf(w, "  %s\n", cat.Name)
		for vi, v := range c.Vendors {
			if v.Catalog != ci {
				continue
			}
			valid := "no expiry date"
			if !v.ValidUntil.IsZero() {
				valid = "valid until " + v.ValidUntil.Format("2006-01-02")
				if y := v.ValidUntil.Year(); y >= c.FirstYear && y < last {
					if c.PricesRollForward {
						valid += fmt.Sprintf(" (prices rolled forward from %d)", y+1)
					} else {
						valid += fmt.Sprintf(" (no orders from %d)", y+1)
					}
				}
			}
			rate := ""
			if v.Currency != c.Currency {
				rate = fmt.Sprintf(" at %.4g %s", v.Rate, c.Currency)
			}
			fmt.Fprintf(w, "    vendor %s (%s), quote %s, %s, %s%s, %d tier(s)\n",
				v.ID, v.Name, v.Quote, valid, v.Currency, rate, len(v.Tiers))
			tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
			for ii, it := range c.Items {
				if it.Vendor != vi {
					continue
				}
				fits := 0 // links the item fits and the vendor restriction allows
				for _, l := range c.Links {
					if slices.Contains(l.Items, ii) {
						fits++
					}
				}
				price := fmt.Sprintf("capex %s + %s/km", money(it.CapexPerUnit), money(it.CapexPerKM))
				if it.Kind == plans.Lease {
					price = "no capex"
				}
				fmt.Fprintf(tw, "      %s\t%s\t%g Gbps\t%s\topex %s/yr\tlead %d mo\tfits %d/%d links\n",
					it.ID, it.Kind, it.Gbps, price, money(it.Opex), it.LeadMonths, fits, len(c.Links))
			}
			tw.Flush()
		}
	}
}

// ceilingText describes the utilisation ceilings in percent.
func ceilingText(c *plans.Case) string {
	s := fmt.Sprintf("%.0f %%", 100*c.Ceiling)
	if len(c.ClassCeiling) == 0 {
		return s
	}
	classes := make([]string, 0, len(c.ClassCeiling))
	for k := range c.ClassCeiling {
		classes = append(classes, k)
	}
	sort.Strings(classes)
	parts := make([]string, len(classes))
	for i, k := range classes {
		parts[i] = fmt.Sprintf("%s %.0f %%", k, 100*c.ClassCeiling[k])
	}
	return s + " (" + strings.Join(parts, ", ") + ")"
}

// classCounts lists the number of links per class, sorted by class.
func classCounts(c *plans.Case) string {
	n := map[string]int{}
	for _, l := range c.Links {
		n[l.Class]++
	}
	classes := make([]string, 0, len(n))
	for k := range n {
		classes = append(classes, k)
	}
	sort.Strings(classes)
	parts := make([]string, len(classes))
	for i, k := range classes {
		parts[i] = fmt.Sprintf("%d %s", n[k], k)
	}
	return strings.Join(parts, ", ")
}

// tornadoText says what the report's tornado chart will vary: "tornado
// chart over growth 0.8–1.2, tariff 0.9–1.1 (4 more solves)".
func tornadoText(fs []plans.Sensitivity) string {
	parts := make([]string, len(fs))
	for i, f := range fs {
		parts[i] = fmt.Sprintf("%s %s–%s", f.Name, factorText(f.Low), factorText(f.High))
	}
	return fmt.Sprintf("tornado chart over %s (%d more solves)", strings.Join(parts, ", "), 2*len(fs))
}
