package plans

import (
	"fmt"
	"io/fs"
	"math"
	"os"
	"path"
	"path/filepath"
	"strings"

	"netstage/catalog"
	"netstage/plans/demo"
)

// Defaults of optional case settings.
const (
	// DefaultCeiling is the utilisation ceiling when the case sets none:
	// upgrades are planned to finish before the busy hour passes 70 %
	// (common practice, REFERENCES.md §4: plan at 50–70 %).
	DefaultCeiling = 0.7
	// DefaultReadyByMonth is the month by which capacity must be live to
	// count for a year: before the autumn busy season (common practice).
	DefaultReadyByMonth = 9
	// MaxHorizon bounds the planning horizon in years.
	MaxHorizon = 50
	// highGrowth is the yearly growth above which a forecast is flagged.
	highGrowth = 1.0
	// committedSlack is the relative tolerance of committed ≤ forecast, so
	// that a committed value equal to the forecast up to rounding passes.
	committedSlack = 1e-9
	// retireSlack is the relative tolerance of retirements ≤ capacity, for
	// the same reason (retiring exactly what is installed must pass).
	retireSlack = 1e-9
)

// Load reads the case file at path and the catalogs it names (paths
// relative to the case file's directory), checks them and derives every
// per-year quantity. Bad input comes back as an ErrorList holding every
// problem found in all files; warnings come back even with errors. A file
// that cannot be read is an ordinary error (not an ErrorList).
func Load(path string) (*Case, []Warning, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, nil, fmt.Errorf("plans: %w", err)
	}
	dir := filepath.Dir(path)
	read := func(rel string) (string, []byte, error) {
		p := rel
		if !filepath.IsAbs(p) {
			p = filepath.Join(dir, filepath.FromSlash(rel))
		}
		b, err := os.ReadFile(p)
		return p, b, err
	}
	return Decode(path, data, read)
}

// LoadFS is Load on a file system (catalog paths relative to name's
// directory, slash-separated).
func LoadFS(fsys fs.FS, name string) (*Case, []Warning, error) {
	data, err := fs.ReadFile(fsys, name)
	if err != nil {
		return nil, nil, fmt.Errorf("plans: %w", err)
	}
	dir := path.Dir(name)
	read := func(rel string) (string, []byte, error) {
		p := path.Join(dir, rel)
		b, err := fs.ReadFile(fsys, p)
		return p, b, err
	}
	return Decode(name, data, read)
}

// LoadDemo loads the embedded demo case (package plans/demo).
func LoadDemo() (*Case, []Warning, error) {
	c, w, err := LoadFS(demo.Files, demo.CaseFile)
	if c != nil {
		c.File = ""
	}
	return c, w, err
}

// ReadFunc returns the contents of a catalog named rel in the case file,
// and the name to show for it in messages.
type ReadFunc func(rel string) (name string, data []byte, err error)

// Decode decodes the case file data (named file in messages), reads its
// catalogs through read, checks everything and builds the Case. It never
// panics on any input.
func Decode(file string, data []byte, read ReadFunc) (*Case, []Warning, error) {
	src, root, err := catalog.Parse(file, data)
	if err != nil {
		return nil, nil, err
	}
	d := &decoder{src: src}
	c := d.decodeCase(root)
	c.File = file

	var errs ErrorList
	var warns []Warning
	var cats []*catalog.Catalog
	for i, rel := range d.catalogPaths {
		at := src.Position(fmt.Sprintf("case.catalogs[%d]", i))
		name, b, rerr := read(rel)
		if rerr != nil {
			src.ErrorAt(at, "case.catalogs", fmt.Errorf("%w: cannot read catalog %q: %v", catalog.ErrReference, rel, rerr))
			continue
		}
		cat, w, cerr := catalog.Decode(name, b)
		warns = append(warns, w...)
		if cerr != nil {
			if l, ok := cerr.(ErrorList); ok {
				errs = append(errs, l...)
			} else {
				errs = append(errs, &Error{File: name, Err: cerr})
			}
			continue
		}
		c.Catalogs = append(c.Catalogs, CatalogFile{Name: path.Base(filepath.ToSlash(name)), Path: name})
		cats = append(cats, cat)
	}
	d.allCatalogs = len(cats) == len(d.catalogPaths)
	if c.horizonOK() {
		errs = append(errs, d.resolveCatalogs(c, cats)...)
		d.checkNetwork(c)
	}
	errs = append(errs, src.Errs...)
	warns = append(warns, src.Warns...)
	src.Warns = nil
	if len(errs) == 0 && len(src.Errs) == 0 {
		d.warnings(c)
		warns = append(warns, src.Warns...)
	}
	catalog.SortWarnings(warns)
	if err := errs.Err(); err != nil {
		return nil, warns, err
	}
	return c, warns, nil
}

// decoder holds what decoding the case file needs besides the Case.
type decoder struct {
	src          *catalog.Source
	catalogPaths []string
	// positions of entities, for cross-file messages
	linkAt   []catalog.Position
	demandAt []catalog.Position
	classAt  map[string]catalog.Position // class_ceiling keys
	itemAt   []filePos                   // of each Case.Items entry, in its catalog
	// vendor restriction keys ([case] vendor, [case.class_vendor])
	vendorAt      catalog.Position
	classVendorAt map[string]catalog.Position
	oneVendorAt   catalog.Position
	// allCatalogs is true when every catalog the case names was read and
	// decoded, so that an unknown vendor id is really unknown.
	allCatalogs bool
}

// filePos is a position in a named file.
type filePos struct {
	file string
	pos  catalog.Position
}

func (d *decoder) decodeCase(root *catalog.Table) *Case {
	c := &Case{Ceiling: DefaultCeiling, ReadyByMonth: DefaultReadyByMonth, ExchangeRates: map[string]float64{}, ClassCeiling: map[string]float64{},
		ClassVendor: map[string]string{}}
	ct, ok := root.Sub("case")
	if !ok && !root.Has("case") {
		root.Errorf("case", catalog.ErrMissing, "a case file needs a [case] table")
	}
	if ct != nil {
		d.caseTable(c, ct)
	}
	budget, _ := root.Sub("budget")
	finance, _ := root.Sub("finance")
	report, _ := root.Sub("report")
	sites, _ := root.Array("sites")
	links, _ := root.Array("links")
	demands, _ := root.Array("demands")
	root.Done()

	horizonOK := c.horizonOK()
	c.Budget = Budget{Cumulative: math.Inf(1)}
	if horizonOK {
		c.Budget.Yearly = repeat(math.Inf(1), c.Horizon)
		if budget != nil {
			d.budget(c, budget)
		}
	}
	if finance != nil {
		d.finance(c, finance)
	}
	if report != nil {
		c.Tornado = reportTable(report)
	}
	if len(sites) == 0 {
		root.Errorf("sites", catalog.ErrMissing, "a case needs at least two [[sites]]")
	}
	siteIdx := map[string]int{}
	for _, t := range sites {
		s := d.site(t)
		if s.ID != "" {
			if _, dup := siteIdx[s.ID]; dup {
				t.Errorf("id", catalog.ErrDuplicate, "site %q is defined twice", s.ID)
			} else {
				siteIdx[s.ID] = len(c.Sites)
			}
		}
		c.Sites = append(c.Sites, s)
	}
	if len(links) == 0 {
		root.Errorf("links", catalog.ErrMissing, "a case needs at least one [[links]] table")
	}
	linkIDs := map[string]bool{}
	for _, t := range links {
		l := d.link(c, t, siteIdx, horizonOK)
		if l.ID != "" {
			if linkIDs[l.ID] {
				t.Errorf("id", catalog.ErrDuplicate, "link %q is defined twice", l.ID)
			}
			linkIDs[l.ID] = true
		}
		c.Links = append(c.Links, l)
		d.linkAt = append(d.linkAt, t.Pos(""))
	}
	if len(demands) == 0 {
		root.Errorf("demands", catalog.ErrMissing, "a case needs at least one [[demands]] table")
	}
	pairs := map[[2]int]bool{}
	for _, t := range demands {
		dm, ok := d.demand(c, t, siteIdx, horizonOK)
		if ok {
			p := [2]int{min(dm.A, dm.B), max(dm.A, dm.B)}
			if pairs[p] {
				t.Errorf("", catalog.ErrDuplicate, "a demand between %s and %s is defined twice", c.Sites[dm.A].ID, c.Sites[dm.B].ID)
			}
			pairs[p] = true
		}
		c.Demands = append(c.Demands, dm)
		d.demandAt = append(d.demandAt, t.Pos(""))
	}
	return c
}

func repeat(v float64, n int) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = v
	}
	return s
}

func (d *decoder) caseTable(c *Case, t *catalog.Table) {
	if t.Need("name") {
		c.Name, _ = t.String("name")
	}
	if t.Need("first_year") {
		if y, ok := t.Int("first_year"); ok {
			if y < 1900 || y > 2500 {
				t.Errorf("first_year", catalog.ErrRange, "first year must be a calendar year like 2027, got %d", y)
			} else {
				c.FirstYear = y
			}
		}
	}
	if t.Need("horizon") {
		if n, ok := t.Int("horizon"); ok {
			if n < 1 || n > MaxHorizon {
				t.Errorf("horizon", catalog.ErrRange, "horizon must be 1 to %d years, got %d", MaxHorizon, n)
			} else {
				c.Horizon = n
			}
		}
	}
	if t.Need("currency") {
		c.Currency, _ = t.String("currency")
		if c.Currency != "" && !catalog.IsCurrency(c.Currency) {
			t.Errorf("currency", catalog.ErrRange, "%q is not a three-letter currency code like EUR", c.Currency)
		}
	}
	if rates, ok := t.Sub("exchange_rates"); ok {
		for _, k := range rates.Keys() {
			if !catalog.IsCurrency(k) {
				rates.Errorf(k, catalog.ErrRange, "%q is not a three-letter currency code like EUR", k)
				continue
			}
			v, ok := rates.Float(k)
			if ok && v <= 0 {
				rates.Errorf(k, catalog.ErrRange, "an exchange rate must be > 0, got %v", v)
				continue
			}
			if ok {
				c.ExchangeRates[k] = v
			}
		}
	}
	if t.Need("discount_rate") {
		if r, ok := t.Float("discount_rate"); ok {
			if r < 0 || r >= 1 {
				t.Errorf("discount_rate", catalog.ErrRange, "discount rate must be a fraction ≥ 0 and < 1 (0.08 = 8 %%), got %v", r)
			}
			c.DiscountRate = r
		}
	}
	if s, ok := t.String("discounting"); ok {
		switch s {
		case "end_of_year":
		case "mid_year":
			c.MidYear = true
		default:
			t.Errorf("discounting", catalog.ErrRange, "%q is not a discounting convention (allowed: end_of_year, mid_year)", s)
		}
	}
	if v, ok := t.Float("utilisation_ceiling"); ok {
		if v <= 0 || v > 1 {
			t.Errorf("utilisation_ceiling", catalog.ErrRange, "utilisation ceiling must be a fraction in (0, 1], got %v", v)
		}
		c.Ceiling = v
	}
	if cc, ok := t.Sub("class_ceiling"); ok {
		d.classAt = map[string]catalog.Position{}
		for _, k := range cc.Keys() {
			d.classAt[k] = cc.Pos(k)
			if v, ok := cc.Float(k); ok {
				if v <= 0 || v > 1 {
					cc.Errorf(k, catalog.ErrRange, "utilisation ceiling must be a fraction in (0, 1], got %v", v)
				}
				c.ClassCeiling[k] = v
			}
		}
	}
	if m, ok := t.Int("ready_by_month"); ok {
		if m < 1 || m > 12 {
			t.Errorf("ready_by_month", catalog.ErrRange, "ready_by_month must be a month 1 to 12, got %d", m)
		}
		c.ReadyByMonth = m
	}
	if v, ok := t.Float("sla_penalty"); ok {
		if v < 0 {
			t.Errorf("sla_penalty", catalog.ErrRange, "SLA penalty per Gbps-month must be ≥ 0, got %v", v)
		}
		c.SLAPenalty = v
	}
	c.PricesRollForward, _ = t.Bool("prices_roll_forward")
	if v, ok := t.String("vendor"); ok {
		if v == "" {
			t.Errorf("vendor", catalog.ErrRange, "must not be empty (leave the key out to allow every vendor)")
		} else {
			c.VendorOnly = v
			d.vendorAt = t.Pos("vendor")
		}
	}
	if v, ok := t.String("one_vendor"); ok {
		switch v {
		case OneVendorPerClass, OneVendorNetwork:
			c.OneVendor = v
			d.oneVendorAt = t.Pos("one_vendor")
		default:
			t.Errorf("one_vendor", catalog.ErrRange, "want %q (one vendor for each link class) or %q (one for the whole network), got %q",
				OneVendorPerClass, OneVendorNetwork, v)
		}
	}
	if cv, ok := t.Sub("class_vendor"); ok {
		d.classVendorAt = map[string]catalog.Position{}
		for _, k := range cv.Keys() {
			if v, ok := cv.String(k); ok {
				if v == "" {
					cv.Errorf(k, catalog.ErrRange, "must not be empty (leave the class out to allow every vendor)")
					continue
				}
				d.classVendorAt[k] = cv.Pos(k)
				c.ClassVendor[k] = v
			}
		}
	}
	if t.Need("catalogs") {
		paths, ok := t.Strings("catalogs")
		if ok && len(paths) == 0 {
			t.Errorf("catalogs", catalog.ErrMissing, "name at least one catalog file")
		}
		seen := map[string]bool{}
		for i, p := range paths {
			if seen[p] {
				d.src.ErrorAt(d.src.Position(fmt.Sprintf("case.catalogs[%d]", i)), "case.catalogs",
					fmt.Errorf("%w: catalog %q is listed twice", catalog.ErrDuplicate, p))
				continue
			}
			seen[p] = true
			d.catalogPaths = append(d.catalogPaths, p)
		}
	}
	t.Done()
}

// perYear reads a key that is one number (the same every year) or a list
// with one value per year. ok is false when absent or wrong.
func perYear(t *catalog.Table, key string, c *Case) ([]float64, bool) {
	v, list, ok := t.FloatOrList(key)
	if !ok {
		return nil, false
	}
	if list == nil {
		return repeat(v, c.Horizon), true
	}
	if len(list) != c.Horizon {
		t.Errorf(key, catalog.ErrLength, "want one value per year of the horizon (%d), got %d", c.Horizon, len(list))
		return nil, false
	}
	return list, true
}

func (d *decoder) budget(c *Case, t *catalog.Table) {
	if caps, ok := perYear(t, "capex_per_year", c); ok {
		for i, v := range caps {
			if v < 0 {
				t.Errorf("capex_per_year", catalog.ErrRange, "budget of %d must be ≥ 0, got %v", c.Year(i), v)
				break
			}
		}
		c.Budget.Yearly = caps
	}
	if v, ok := t.Float("cumulative"); ok {
		if v < 0 {
			t.Errorf("cumulative", catalog.ErrRange, "cumulative budget must be ≥ 0, got %v", v)
		}
		c.Budget.Cumulative = v
	}
	t.Done()
}

func (d *decoder) finance(c *Case, t *catalog.Table) {
	if s, ok := t.String("salvage"); ok {
		switch s {
		case "straight_line":
			c.Finance.Salvage = SalvageStraightLine
		case "none":
			c.Finance.Salvage = SalvageNone
		default:
			t.Errorf("salvage", catalog.ErrRange, "%q is not a salvage method (allowed: straight_line, none)", s)
		}
	}
	if v, ok := t.Float("tax_rate"); ok {
		if v < 0 || v >= 1 {
			t.Errorf("tax_rate", catalog.ErrRange, "tax rate must be a fraction ≥ 0 and < 1, got %v", v)
		}
		c.Finance.TaxRate = v
	}
	t.Done()
}

// reportTable reads [report]: tornado = { factor = [low, high], ... }.
func reportTable(t *catalog.Table) []Sensitivity {
	var out []Sensitivity
	if tt, ok := t.Sub("tornado"); ok {
		for _, name := range tt.Keys() {
			if !IsFactor(name) {
				hint := ""
				if s := catalog.Suggest(name, factorNames); s != "" {
					hint = fmt.Sprintf(" (did you mean %q?)", s)
				}
				tt.Errorf(name, catalog.ErrReference, "%q is not a factor%s; known: %s", name, hint, strings.Join(factorNames, ", "))
				continue
			}
			v, ok := tt.Floats(name)
			if !ok {
				continue
			}
			if len(v) != 2 || v[0] >= v[1] {
				tt.Errorf(name, catalog.ErrRange, "want [low, high] with low < high, got %s", formatList(v))
				continue
			}
			bad := false
			for _, x := range v {
				if err := CheckFactorValue(name, x); err != nil {
					tt.Errorf(name, catalog.ErrRange, "%v", err)
					bad = true
					break
				}
			}
			if !bad {
				out = append(out, Sensitivity{Name: name, Low: v[0], High: v[1]})
			}
		}
		tt.Done()
	}
	t.Done()
	return out
}

func formatList(v []float64) string {
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = fmt.Sprint(x)
	}
	return "[" + strings.Join(parts, ", ") + "]"
}

func (d *decoder) site(t *catalog.Table) Site {
	var s Site
	if t.Need("id") {
		s.ID, _ = t.String("id")
		if s.ID == "" && t.Has("id") {
			t.Errorf("id", catalog.ErrRange, "must not be empty")
		}
	}
	s.Name, _ = t.String("name")
	if s.Name == "" {
		s.Name = s.ID
	}
	lat, hasLat := t.Float("lat")
	lon, hasLon := t.Float("lon")
	x, hasX := t.Float("x")
	y, hasY := t.Float("y")
	switch {
	case (hasLat || hasLon) && (hasX || hasY):
		t.Errorf("x", catalog.ErrRange, "give lat/lon or x/y, not both")
	case hasLat != hasLon:
		t.Errorf("", catalog.ErrMissing, "give both lat and lon")
	case hasX != hasY:
		t.Errorf("", catalog.ErrMissing, "give both x and y")
	case hasLat:
		if lat < -90 || lat > 90 {
			t.Errorf("lat", catalog.ErrRange, "latitude must be within ±90 degrees, got %v", lat)
		}
		if lon < -180 || lon > 180 {
			t.Errorf("lon", catalog.ErrRange, "longitude must be within ±180 degrees, got %v", lon)
		}
		s.HasLatLon, s.Lat, s.Lon = true, lat, lon
	case hasX:
		s.HasXY, s.X, s.Y = true, x, y
	}
	t.Done()
	return s
}

// siteRef reads a required reference to a site.
func siteRef(t *catalog.Table, key string, sites map[string]int) (int, bool) {
	if !t.Need(key) {
		return -1, false
	}
	id, ok := t.String(key)
	if !ok {
		return -1, false
	}
	i, ok := sites[id]
	if !ok {
		known := make([]string, 0, len(sites))
		for k := range sites {
			known = append(known, k)
		}
		hint := ""
		if s := catalog.Suggest(id, known); s != "" {
			hint = fmt.Sprintf(" (did you mean %q?)", s)
		}
		t.Errorf(key, catalog.ErrReference, "site %q is not defined%s", id, hint)
		return -1, false
	}
	return i, true
}

// candidateKeys are the keys only a candidate link may have.
var candidateKeys = []string{"build_cost", "lead_months", "opex", "book_life"}

func (d *decoder) link(c *Case, t *catalog.Table, sites map[string]int, horizonOK bool) Link {
	l := Link{Slots: UnlimitedSlots}
	if t.Need("id") {
		l.ID, _ = t.String("id")
		if l.ID == "" && t.Has("id") {
			t.Errorf("id", catalog.ErrRange, "must not be empty")
		}
	}
	a, okA := siteRef(t, "from", sites)
	b, okB := siteRef(t, "to", sites)
	l.A, l.B = a, b
	if okA && okB && a == b {
		t.Errorf("to", catalog.ErrRange, "a link must join two different sites, both ends are %q", c.Sites[a].ID)
	}
	if t.Need("km") {
		if v, ok := t.Float("km"); ok {
			if v < 0 {
				t.Errorf("km", catalog.ErrRange, "length must be ≥ 0 km, got %v", v)
			}
			l.KM = v
		}
	}
	if t.Need("class") {
		l.Class, _ = t.String("class")
		if l.Class == "" && t.Has("class") {
			t.Errorf("class", catalog.ErrRange, "must not be empty")
		}
	}
	if n, ok := t.Int("slots"); ok {
		if n < 0 {
			t.Errorf("slots", catalog.ErrRange, "free slots must be ≥ 0, got %d", n)
		}
		l.Slots = n
	}
	candidate, _ := t.Bool("candidate")
	if v, ok := t.Float("capacity_gbps"); ok {
		if v < 0 {
			t.Errorf("capacity_gbps", catalog.ErrRange, "installed capacity must be ≥ 0 Gbps, got %v", v)
		}
		if candidate && v != 0 {
			t.Errorf("capacity_gbps", catalog.ErrRange, "a candidate link has no installed capacity: capacity comes from catalog items once it is built")
		}
		l.Installed = v
	} else if !candidate && !t.Has("capacity_gbps") {
		t.Errorf("capacity_gbps", catalog.ErrMissing, "an existing link needs its installed capacity (or candidate = true)")
	}
	l.OnOrder = d.deliveries(c, t, "on_order", horizonOK)
	l.Retirements = d.deliveries(c, t, "retire", horizonOK)
	if candidate && (len(l.OnOrder) > 0 || len(l.Retirements) > 0) {
		t.Errorf("on_order", catalog.ErrRange, "a candidate link has no capacity on order or to retire")
	}
	if candidate {
		cand := &Candidate{}
		if t.Need("build_cost") {
			cand.BuildCost = nonNegative(t, "build_cost")
		}
		if n, ok := t.Int("lead_months"); ok {
			if n < 0 {
				t.Errorf("lead_months", catalog.ErrRange, "lead time must be ≥ 0 months, got %d", n)
			}
			cand.LeadMonths = n
		}
		cand.Opex = nonNegative(t, "opex")
		if n, ok := t.Int("book_life"); ok {
			if n < 1 {
				t.Errorf("book_life", catalog.ErrRange, "book life must be ≥ 1 year, got %d", n)
			}
			cand.BookLife = n
		} else if cand.BuildCost > 0 && !t.Has("book_life") {
			t.Errorf("book_life", catalog.ErrMissing, "a candidate link with a build cost needs a book life in years")
		}
		l.Candidate = cand
	} else {
		for _, k := range candidateKeys {
			if t.Has(k) {
				t.Errorf(k, catalog.ErrRange, "%s is only for candidate links (set candidate = true)", k)
			}
		}
	}
	t.Done()
	if horizonOK {
		d.deriveLink(c, t, &l)
	}
	return l
}

func nonNegative(t *catalog.Table, key string) float64 {
	v, ok := t.Float(key)
	if ok && v < 0 {
		t.Errorf(key, catalog.ErrRange, "must be ≥ 0, got %v", v)
	}
	return v
}

// deliveries reads a list of {gbps, year} tables.
func (d *decoder) deliveries(c *Case, t *catalog.Table, key string, horizonOK bool) []Delivery {
	ts, ok := t.Array(key)
	if !ok {
		return nil
	}
	var out []Delivery
	for _, e := range ts {
		var dl Delivery
		if e.Need("gbps") {
			if v, ok := e.Float("gbps"); ok {
				if v <= 0 {
					e.Errorf("gbps", catalog.ErrRange, "must be > 0 Gbps, got %v", v)
				}
				dl.Gbps = v
			}
		}
		if e.Need("year") {
			if y, ok := e.Int("year"); ok {
				dl.Year = y
				if horizonOK && y < c.FirstYear {
					e.Errorf("year", catalog.ErrRange, "year %d is before the first year %d: count it in capacity_gbps instead", y, c.FirstYear)
				} else if horizonOK && y >= c.FirstYear+c.Horizon {
					e.Warnf("year", "year %d is after the horizon (%d–%d); ignored", y, c.FirstYear, c.FirstYear+c.Horizon-1)
				}
			}
		}
		e.Done()
		out = append(out, dl)
	}
	return out
}

// deriveLink computes the link's base capacity per year.
func (d *decoder) deriveLink(c *Case, t *catalog.Table, l *Link) {
	l.BaseCapacity = make([]float64, c.Horizon)
	for i := range l.BaseCapacity {
		y := c.Year(i)
		capacity := l.Installed
		for _, o := range l.OnOrder {
			if o.Year <= y {
				capacity += o.Gbps
			}
		}
		for _, r := range l.Retirements {
			if r.Year <= y {
				capacity -= r.Gbps
			}
		}
		if capacity < -retireSlack*max(1, l.Installed) {
			t.Errorf("retire", catalog.ErrRange, "retirements exceed the link's capacity in %d (%v Gbps left)", y, capacity)
			capacity = 0
		}
		l.BaseCapacity[i] = max(0, capacity)
	}
	if l.Candidate != nil {
		l.Candidate.InService = make([]int, c.Horizon)
		for i := range l.Candidate.InService {
			l.Candidate.InService[i] = c.InService(i, l.Candidate.LeadMonths)
		}
	}
}

func (d *decoder) demand(c *Case, t *catalog.Table, sites map[string]int, horizonOK bool) (Demand, bool) {
	dm := Demand{Growth: math.NaN()}
	a, okA := siteRef(t, "from", sites)
	b, okB := siteRef(t, "to", sites)
	dm.A, dm.B = a, b
	ok := okA && okB
	if ok && a == b {
		t.Errorf("to", catalog.ErrRange, "a demand must join two different sites, both ends are %q", c.Sites[a].ID)
		ok = false
	}
	if id, has := t.String("id"); has {
		dm.ID = id
	} else if ok {
		dm.ID = c.Sites[a].ID + "-" + c.Sites[b].ID
	}

	// Forecast: first-year Gbps with growth, or an explicit list.
	f1, hasF1 := t.Float("gbps")
	g, hasG := t.Float("growth")
	list, hasList := t.Floats("forecast")
	switch {
	case t.Has("forecast") && (t.Has("gbps") || t.Has("growth")):
		t.Errorf("forecast", catalog.ErrRange, "give either gbps (with growth) or a forecast list, not both")
	case !t.Has("forecast") && !t.Has("gbps"):
		t.Errorf("gbps", catalog.ErrMissing, "a demand needs its first-year busy-hour Gbps (gbps) or a forecast list")
	}
	if hasF1 && f1 < 0 {
		t.Errorf("gbps", catalog.ErrRange, "forecast must be ≥ 0 Gbps, got %v", f1)
	}
	if hasG {
		if g <= -1 {
			t.Errorf("growth", catalog.ErrRange, "yearly growth must be > -1 (−100 %%), got %v", g)
		} else if g > highGrowth {
			t.Warnf("growth", "growth of %.0f %% a year is very high; is it a fraction (0.25 = 25 %%)?", 100*g)
		}
		dm.Growth = g
	} else if hasF1 {
		dm.Growth = 0
	}
	if hasList {
		for i, v := range list {
			if v < 0 {
				t.Errorf("forecast", catalog.ErrRange, "forecast must be ≥ 0 Gbps, got %v in year %d", v, i+1)
				break
			}
		}
		if horizonOK && len(list) != c.Horizon {
			t.Errorf("forecast", catalog.ErrLength, "want one value per year of the horizon (%d), got %d", c.Horizon, len(list))
			hasList = false
		}
	}

	// Tariff: first-year price with erosion, or an explicit list.
	e, hasE := t.Float("tariff_erosion")
	if hasE && (e <= -1 || e >= 1) {
		t.Errorf("tariff_erosion", catalog.ErrRange, "yearly tariff erosion must be between -1 and 1 (exclusive), got %v", e)
	}
	dm.Erosion = e
	p1, tariffList, hasTariff := t.FloatOrList("tariff")
	if tariffList != nil && hasE {
		t.Errorf("tariff_erosion", catalog.ErrRange, "give a tariff list or tariff_erosion, not both")
	}
	if hasTariff && p1 < 0 {
		t.Errorf("tariff", catalog.ErrRange, "tariff must be ≥ 0 per Gbps-month, got %v", p1)
	}
	for _, v := range tariffList {
		if v < 0 {
			t.Errorf("tariff", catalog.ErrRange, "tariff must be ≥ 0 per Gbps-month, got %v", v)
			break
		}
	}
	var committed []float64
	var hasCommitted bool
	if horizonOK {
		committed, hasCommitted = perYear(t, "committed", c)
		if hasTariff && tariffList != nil && len(tariffList) != c.Horizon {
			t.Errorf("tariff", catalog.ErrLength, "want one value per year of the horizon (%d), got %d", c.Horizon, len(tariffList))
		}
	} else {
		t.FloatOrList("committed")
	}
	t.Done()
	if !horizonOK {
		return dm, ok
	}

	// Derived vectors.
	dm.Forecast = make([]float64, c.Horizon)
	switch {
	case hasList:
		copy(dm.Forecast, list)
	case hasF1:
		for i := range dm.Forecast {
			dm.Forecast[i] = f1 * math.Pow(1+dm.Growth, float64(i))
		}
	}
	dm.Tariff = make([]float64, c.Horizon)
	switch {
	case tariffList != nil && len(tariffList) == c.Horizon:
		copy(dm.Tariff, tariffList)
	case hasTariff && tariffList == nil:
		for i := range dm.Tariff {
			dm.Tariff[i] = p1 * math.Pow(1-e, float64(i))
		}
	}
	dm.Committed = make([]float64, c.Horizon)
	if hasCommitted {
		copy(dm.Committed, committed)
		for i, v := range committed {
			if v < 0 {
				t.Errorf("committed", catalog.ErrRange, "committed traffic must be ≥ 0 Gbps, got %v", v)
				break
			}
			if v > dm.Forecast[i]*(1+committedSlack) && (hasList || hasF1) {
				t.Errorf("committed", catalog.ErrRange, "committed %v Gbps is above the forecast %.4g Gbps in %d", v, dm.Forecast[i], c.Year(i))
				break
			}
		}
	}
	return dm, ok
}
