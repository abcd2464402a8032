package catalog

import (
	"fmt"
	"os"
	"regexp"
	"time"
)

// Catalog is one decoded and checked catalog file, with prices in the
// vendors' own currencies as quoted. Conversion to a case's currency, price
// erosion per year and the match of items to links are done by package
// plans, which knows the case.
type Catalog struct {
	File    string
	Vendors []Vendor
	Items   []Item
	Tiers   []Tier
}

// Vendor is one vendor quote.
type Vendor struct {
	ID         string
	Name       string    // display name (ID when absent)
	Quote      string    // quote reference
	ValidUntil time.Time // last valid day; zero when not given
	Currency   string    // ISO 4217 code, three capital letters
	Pos        Position  // of the vendor's table
	CurrencyAt Position  // of its currency key
	ValidAt    Position  // of its valid_until key
}

// Kind is a module (bought) or a lease (rented).
type Kind string

// The item kinds.
const (
	KindModule Kind = "module"
	KindLease  Kind = "lease"
)

// Item is one purchasable upgrade. Money is in its vendor's currency.
type Item struct {
	ID           string
	Vendor       string
	Kind         Kind
	Classes      []string // link classes it fits
	Gbps         float64  // capacity per unit, each direction
	Capex        float64  // capex per unit (0 for a lease)
	CapexPerKM   float64  // capex per unit per km of link (0 for a lease)
	Opex         float64  // yearly opex per unit; a lease's yearly fee
	LeadMonths   int      // lead time in months
	BookLife     int      // years (0 for a lease)
	SlotsPerUnit int      // link slots one unit uses (default 1)
	MaxUnits     int      // units per link at most (default 1)
	Erosion      float64  // yearly list price erosion e, −1 < e < 1
	Pos          Position // of the item's table
}

// Basis says what a tier threshold counts.
type Basis string

// The tier bases.
const (
	BasisSpend Basis = "spend" // list spend in the vendor's currency
	BasisUnits Basis = "units" // units of any item of the vendor
)

// Tier is an all-units volume discount: when a vendor's list spend (or unit
// count) in one order year reaches Threshold, every capex amount of that
// vendor in that year is reduced by Discount.
type Tier struct {
	Vendor    string
	Basis     Basis
	Threshold float64 // vendor currency (spend) or units
	Discount  float64 // fraction in (0, 1)
	Pos       Position
}

var currencyCode = regexp.MustCompile(`^[A-Z]{3}$`)

// IsCurrency reports whether s looks like an ISO 4217 code (three capital
// letters).
func IsCurrency(s string) bool { return currencyCode.MatchString(s) }

// maxErosion bounds yearly erosion: a list price cannot fall by 100 % or more
// in a year, and a rise of more than 100 % a year is surely a typo.
const maxErosion = 1.0

// ReadFile reads and decodes the catalog at path; see Decode.
func ReadFile(path string) (*Catalog, []Warning, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, nil, fmt.Errorf("catalog: %w", err)
	}
	return Decode(path, data)
}

// Decode decodes and checks a catalog file. file names it in messages. Every
// problem found is returned in one ErrorList (sorted by position); warnings
// are returned even when there are errors. Decode never panics on any input.
func Decode(file string, data []byte) (*Catalog, []Warning, error) {
	src, root, err := Parse(file, data)
	if err != nil {
		return nil, nil, err
	}
	c := &Catalog{File: file}
	vendorTables, _ := root.Array("vendors")
	itemTables, _ := root.Array("items")
	tierTables, _ := root.Array("tiers")
	root.Done()
	if len(vendorTables) == 0 {
		root.Errorf("vendors", ErrMissing, "a catalog needs at least one [[vendors]] table")
	}
	if len(itemTables) == 0 {
		root.Errorf("items", ErrMissing, "a catalog needs at least one [[items]] table")
	}

	vendors := map[string]bool{}
	for _, t := range vendorTables {
		v := decodeVendor(t)
		if v.ID != "" {
			if vendors[v.ID] {
				t.Errorf("id", ErrDuplicate, "vendor %q is defined twice", v.ID)
			}
			vendors[v.ID] = true
		}
		c.Vendors = append(c.Vendors, v)
	}
	items := map[string]bool{}
	for _, t := range itemTables {
		it := decodeItem(t, vendors)
		if it.ID != "" {
			k := it.Vendor + "\x00" + it.ID
			if items[k] {
				t.Errorf("id", ErrDuplicate, "item %q of vendor %q is defined twice", it.ID, it.Vendor)
			}
			items[k] = true
		}
		c.Items = append(c.Items, it)
	}
	for _, t := range tierTables {
		c.Tiers = append(c.Tiers, decodeTier(t, vendors))
	}
	checkTierOrder(src, c.Tiers)
	SortWarnings(src.Warns)
	if err := src.Errs.Err(); err != nil {
		return nil, src.Warns, err
	}
	return c, src.Warns, nil
}

// id reads a required identifier.
func id(t *Table, key string) string {
	if !t.Need(key) {
		return ""
	}
	s, _ := t.String(key)
	if s == "" && t.Has(key) {
		t.Errorf(key, ErrRange, "must not be empty")
	}
	return s
}

func decodeVendor(t *Table) Vendor {
	v := Vendor{Pos: t.Pos(""), CurrencyAt: t.Pos("currency"), ValidAt: t.Pos("valid_until")}
	v.ID = id(t, "id")
	v.Name, _ = t.String("name")
	if v.Name == "" {
		v.Name = v.ID
	}
	v.Quote, _ = t.String("quote")
	v.ValidUntil, _ = t.Date("valid_until")
	if t.Need("currency") {
		v.Currency, _ = t.String("currency")
		if v.Currency != "" && !IsCurrency(v.Currency) {
			t.Errorf("currency", ErrRange, "%q is not a three-letter currency code like EUR", v.Currency)
		}
	}
	t.Done()
	return v
}

func decodeItem(t *Table, vendors map[string]bool) Item {
	it := Item{Pos: t.Pos(""), SlotsPerUnit: 1, MaxUnits: 1}
	it.ID = id(t, "id")
	it.Vendor = id(t, "vendor")
	if it.Vendor != "" && !vendors[it.Vendor] {
		t.Errorf("vendor", ErrReference, "vendor %q is not defined in this catalog%s", it.Vendor, suggestFrom(it.Vendor, vendors))
	}
	if t.Need("kind") {
		k, _ := t.String("kind")
		it.Kind = Kind(k)
		if it.Kind != KindModule && it.Kind != KindLease && k != "" {
			t.Errorf("kind", ErrRange, "%q is not an item kind (allowed: module, lease)", k)
		}
	}
	if t.Need("classes") {
		it.Classes, _ = t.Strings("classes")
		if len(it.Classes) == 0 && t.Has("classes") {
			t.Errorf("classes", ErrRange, "an item must fit at least one link class")
		}
	}
	if t.Need("gbps") {
		it.Gbps, _ = t.Float("gbps")
		if it.Gbps <= 0 && t.Has("gbps") {
			t.Errorf("gbps", ErrRange, "capacity per unit must be > 0, got %v", it.Gbps)
		}
	}
	it.Capex = nonNegative(t, "capex")
	it.CapexPerKM = nonNegative(t, "capex_per_km")
	it.Opex = nonNegative(t, "opex")
	if it.Kind == KindLease {
		if it.Capex != 0 || it.CapexPerKM != 0 {
			t.Errorf("capex", ErrRange, "a lease has no capex: put its yearly fee in opex")
		}
		if it.Opex == 0 {
			t.Warnf("opex", "a lease with no yearly fee is free capacity")
		}
	}
	if it.Kind == KindModule && it.Capex == 0 && it.CapexPerKM == 0 && t.Has("gbps") {
		t.Warnf("capex", "a module with no capex is free capacity")
	}
	if n, ok := t.Int("lead_months"); ok {
		if n < 0 {
			t.Errorf("lead_months", ErrRange, "lead time must be ≥ 0 months, got %d", n)
		}
		it.LeadMonths = n
	}
	if n, ok := t.Int("book_life"); ok {
		if n < 1 {
			t.Errorf("book_life", ErrRange, "book life must be ≥ 1 year, got %d", n)
		}
		it.BookLife = n
	} else if it.Kind == KindModule && !t.Has("book_life") {
		t.Errorf("book_life", ErrMissing, "a module needs a book life in years")
	}
	if it.Kind == KindLease && it.BookLife != 0 {
		t.Errorf("book_life", ErrRange, "a lease has no book life")
	}
	if n, ok := t.Int("slots"); ok {
		if n < 0 {
			t.Errorf("slots", ErrRange, "slots per unit must be ≥ 0, got %d", n)
		}
		it.SlotsPerUnit = n
	}
	if n, ok := t.Int("max_units"); ok {
		if n < 1 {
			t.Errorf("max_units", ErrRange, "max units per link must be ≥ 1, got %d", n)
		}
		it.MaxUnits = n
	}
	if e, ok := t.Float("erosion"); ok {
		if e <= -maxErosion || e >= maxErosion {
			t.Errorf("erosion", ErrRange, "yearly erosion must be between -1 and 1 (exclusive), got %v", e)
		}
		it.Erosion = e
	}
	t.Done()
	return it
}

func nonNegative(t *Table, key string) float64 {
	f, ok := t.Float(key)
	if ok && f < 0 {
		t.Errorf(key, ErrRange, "must be ≥ 0, got %v", f)
	}
	return f
}

func decodeTier(t *Table, vendors map[string]bool) Tier {
	r := Tier{Pos: t.Pos("")}
	r.Vendor = id(t, "vendor")
	if r.Vendor != "" && !vendors[r.Vendor] {
		t.Errorf("vendor", ErrReference, "vendor %q is not defined in this catalog%s", r.Vendor, suggestFrom(r.Vendor, vendors))
	}
	if t.Need("basis") {
		b, _ := t.String("basis")
		r.Basis = Basis(b)
		if r.Basis != BasisSpend && r.Basis != BasisUnits && b != "" {
			t.Errorf("basis", ErrRange, "%q is not a tier basis (allowed: spend, units)", b)
		}
	}
	if t.Need("threshold") {
		r.Threshold, _ = t.Float("threshold")
		if r.Threshold <= 0 && t.Has("threshold") {
			t.Errorf("threshold", ErrRange, "threshold must be > 0, got %v", r.Threshold)
		}
	}
	if t.Need("discount") {
		r.Discount, _ = t.Float("discount")
		if (r.Discount <= 0 || r.Discount >= 1) && t.Has("discount") {
			t.Errorf("discount", ErrRange, "discount must be a fraction between 0 and 1 (exclusive), got %v", r.Discount)
		}
	}
	t.Done()
	return r
}

// checkTierOrder requires a vendor's tiers of one basis to give larger
// discounts at larger thresholds, and no two at the same threshold.
func checkTierOrder(src *Source, tiers []Tier) {
	for i, a := range tiers {
		for _, b := range tiers[:i] {
			if a.Vendor != b.Vendor || a.Basis != b.Basis {
				continue
			}
			switch {
			case a.Threshold == b.Threshold:
				src.ErrorAt(a.Pos, "tiers.threshold", fmt.Errorf("%w: vendor %q has two %s tiers at threshold %v", ErrDuplicate, a.Vendor, a.Basis, a.Threshold))
			case (a.Threshold > b.Threshold) != (a.Discount > b.Discount):
				src.WarnAt(a.Pos, "tiers.discount", fmt.Sprintf("vendor %q: a larger %s threshold should give a larger discount", a.Vendor, a.Basis))
			}
		}
	}
}

func suggestFrom(word string, set map[string]bool) string {
	c := make([]string, 0, len(set))
	for k := range set {
		c = append(c, k)
	}
	if s := Suggest(word, c); s != "" {
		return fmt.Sprintf(" (did you mean %q?)", s)
	}
	return ""
}
