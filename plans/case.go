package plans

import (
	"math"
	"sort"
	"strings"
	"time"
)

// Year indexing. Every per-year slice in a Case has length Case.Horizon and is
// indexed by the year index i = t−1, so index 0 is the case's first year
// (Case.FirstYear) and index Horizon−1 its last. Calendar years appear only in
// Case.FirstYear and in Delivery.Year; Case.Year converts.

// Case is one checked planning case: the network, the traffic forecast with
// its tariffs, the finance policy and the resolved cost catalogs, with every
// per-year quantity already derived. Build one with Load or LoadDemo; the
// planning model reads it and never re-derives anything.
//
// All money is in Case.Currency (catalog prices are converted with
// ExchangeRates at load time). Capacities and traffic are in Gbps in each
// direction (links are full duplex).
type Case struct {
	// Name is the case's display name.
	Name string
	// File is the path of the case file ("" for the embedded demo read from
	// memory); catalog paths were resolved relative to it.
	File string

	// FirstYear is the calendar year of year index 0.
	FirstYear int
	// Horizon is the number of planning years T (≥ 1).
	Horizon int
	// Currency is the ISO 4217 code of every money amount in the Case.
	Currency string
	// ExchangeRates maps a foreign currency code to the number of case
	// currency units one unit of it is worth (EUR = 1.08 in a USD case).
	ExchangeRates map[string]float64

	// DiscountRate is the yearly discount rate r as a fraction (0.08 = 8 %).
	DiscountRate float64
	// MidYear selects mid-year discounting, DF_t = (1+r)^−(t−0.5); the
	// default (false) is end of year, DF_t = (1+r)^−t. Salvage is always
	// discounted at the end of year T.
	MidYear bool

	// Ceiling is the default utilisation ceiling, a fraction in (0, 1]: each
	// direction of a link carries at most Ceiling × capacity (default 0.7,
	// common practice). Link.Ceiling holds the value that applies to each link.
	Ceiling float64
	// ClassCeiling overrides Ceiling for the links of a class.
	ClassCeiling map[string]float64

	// ReadyByMonth c (1..12, default 9) is the month by which capacity must
	// be live to count for a year (DESIGN.md §2 lead-time rule; see InService).
	ReadyByMonth int

	// SLAPenalty is charged per Gbps-month of committed traffic the baseline
	// cannot carry (case currency; default 0).
	SLAPenalty float64

	// PricesRollForward lets a quote be used in every year of the horizon
	// whatever its valid_until date: its items stay orderable in every year
	// at their eroded prices, and load reports a warning instead of an error
	// (quote expired before FirstYear) or instead of excluding the years
	// after its expiry. Without it an item is orderable only in the years
	// that start on or before its quote's last valid day (Item.Orderable).
	PricesRollForward bool

	// VendorOnly, when not "", restricts the whole network to the items of
	// the vendor with this id ([case] vendor = "ID").
	VendorOnly string
	// ClassVendor restricts the links of a class to the items of one vendor
	// ([case.class_vendor], link class → vendor id). For a class named here
	// it wins over VendorOnly; see VendorFor. Both are applied at load time
	// by leaving other vendors' items out of Link.Items.
	ClassVendor map[string]string
	// OneVendor lets the optimiser choose the vendor ([case] one_vendor):
	// OneVendorPerClass allows the links of each class the items of one
	// vendor, the one that gives the best plan; OneVendorNetwork allows
	// one vendor for the whole network. Classes named in ClassVendor keep
	// their vendor and are left out of the choice; with VendorOnly set the
	// choice is already made. "" leaves every allowed vendor open.
	OneVendor string

	// Tornado lists the factors of [report.tornado] (factor name → [low,
	// high]), sorted by name: `report` solves the case with each factor at
	// its low and at its high value, one at a time, and charts the swing of
	// the NPV. Empty when the case asks for no tornado chart.
	Tornado []Sensitivity

	// Budget holds the capex caps.
	Budget Budget
	// Finance holds salvage and tax policy.
	Finance Finance

	// Sites, Links and Demands make up the network and its traffic. Links
	// and demands refer to sites by index into Sites.
	Sites   []Site
	Links   []Link
	Demands []Demand

	// Catalogs lists the catalog files in the order the case names them.
	Catalogs []CatalogFile
	// Vendors and Items are the resolved catalogs: items refer to vendors
	// by index into Vendors. Items are in catalog order, then file order.
	Vendors []Vendor
	Items   []Item
}

// Budget holds the capex caps of a case, in case currency. A cap applies to
// the capex (after volume discounts, including candidate link builds) paid
// in an order year.
type Budget struct {
	// Yearly has length Horizon; +Inf marks an uncapped year.
	Yearly []float64
	// Cumulative caps total capex over the horizon; +Inf when uncapped.
	Cumulative float64
}

// YearCap returns the capex cap of year index i and whether that year is
// capped at all.
func (b Budget) YearCap(i int) (float64, bool) {
	v := b.Yearly[i]
	return v, !math.IsInf(v, 1)
}

// limit returns the most capex the budget allows in year index i: the
// lesser of that year's cap and the cumulative cap (+Inf for neither).
// The model's budget rows and fixings take it through Model.yearLimit;
// check's budget warnings read it directly.
func (b Budget) limit(i int) float64 {
	limit := b.Cumulative
	if yc, ok := b.YearCap(i); ok {
		limit = math.Min(limit, yc)
	}
	return limit
}

// SalvageMethod says how equipment still in its book life at the horizon is
// valued.
type SalvageMethod int

const (
	// SalvageStraightLine values each purchase at its straight-line book
	// value at the end of year T: capex × remaining life / book life.
	SalvageStraightLine SalvageMethod = iota
	// SalvageNone values everything at zero at the horizon.
	SalvageNone
)

// String returns the case-file spelling of m.
func (m SalvageMethod) String() string {
	switch m {
	case SalvageStraightLine:
		return "straight_line"
	case SalvageNone:
		return "none"
	}
	return "unknown"
}

// Finance is the finance policy of a case.
type Finance struct {
	// Salvage is the method for book value at the horizon (default
	// straight line).
	Salvage SalvageMethod
	// TaxRate τ in [0, 1) (0 = no tax): tax = τ·(revenue − opex −
	// depreciation), straight-line depreciation over each book life; a loss
	// year is a credit.
	TaxRate float64
}

// Site is a node of the network.
type Site struct {
	ID   string
	Name string // display name; ID when the case gives none
	// HasLatLon is true when Lat and Lon (degrees, WGS84) were given.
	HasLatLon bool
	Lat, Lon  float64
	// HasXY is true when X and Y (plain plane coordinates, any unit) were
	// given instead.
	HasXY bool
	X, Y  float64
}

// UnlimitedSlots is the value of Link.Slots when the case sets no slot limit.
const UnlimitedSlots = -1

// Link is an existing or candidate full-duplex link between two sites.
type Link struct {
	ID string
	// A and B index Case.Sites (A ≠ B).
	A, B int
	// KM is the route length in kilometres (used by per-km capex and by the
	// tie-breaking Gbps·km routing).
	KM float64
	// Class names the link class; catalog items fit a link when they list
	// its class.
	Class string
	// Ceiling is the utilisation ceiling that applies to this link (its
	// class's, or the case default).
	Ceiling float64
	// Slots is the number of free slots for new items (each item uses
	// Item.SlotsPerUnit), or UnlimitedSlots.
	Slots int

	// Installed is the capacity in service at the start of the first year,
	// Gbps each direction (0 for a candidate).
	Installed float64
	// OnOrder lists capacity already ordered: it adds Gbps from its year on.
	OnOrder []Delivery
	// Retirements lists capacity taken out: it removes Gbps from its year on.
	Retirements []Delivery
	// BaseCapacity[i] = Installed + on-order arrived by year i − retired by
	// year i (Gbps, never negative): the capacity before any purchase.
	BaseCapacity []float64

	// Candidate is non-nil for a link that is not yet built.
	Candidate *Candidate

	// Items lists the indices into Case.Items of the catalog items that fit
	// this link (their classes include Class) and that the case's vendor
	// restriction allows (Case.VendorFor(Class)), in Case.Items order.
	Items []int
}

// Delivery is a capacity change of an existing link at a calendar year.
type Delivery struct {
	Gbps float64
	Year int // calendar year in which the change takes effect
}

// Candidate describes the build of a link that does not exist yet. A
// candidate carries nothing until built; every module on it is gated by the
// build decision.
type Candidate struct {
	// BuildCost is the capex of the build, paid in the order year.
	BuildCost float64
	// LeadMonths is the build's lead time in months.
	LeadMonths int
	// Opex is the yearly cost of the built link from its in-service year.
	Opex float64
	// BookLife in years drives depreciation and salvage of BuildCost.
	BookLife int
	// InService[i] is the year index in which a build ordered in year index
	// i is in service (Case.InService with LeadMonths); ≥ Horizon means an
	// order in year i would not serve within the horizon and is not offered.
	InService []int
}

// Demand is the traffic between two sites: the same Gbps in each direction,
// each direction routed on its own, billed once.
type Demand struct {
	// ID is "A-B" with the two site ids as the case gives them.
	ID string
	// A and B index Case.Sites (A ≠ B).
	A, B int
	// Forecast[i] is the busy-hour Gbps in each direction in year i:
	// f₁·(1+g)^i for a growth rate g, or the explicit list.
	Forecast []float64
	// Committed[i] ≤ Forecast[i] is the contracted Gbps that must be carried.
	Committed []float64
	// Tariff[i] is the price per Gbps per month in year i, case currency,
	// after erosion: p₁·(1−e)^i. Revenue in year i = 12 × Tariff[i] × served.
	Tariff []float64
	// Growth is the yearly growth rate given in the case (NaN when the
	// forecast was an explicit list); kept for reports only.
	Growth float64
	// Erosion is the yearly tariff erosion e given in the case (negative:
	// prices rise); kept for reports only.
	Erosion float64
}

// CatalogFile is one catalog named by the case.
type CatalogFile struct {
	// Name is the file's base name (the variant name in compare).
	Name string
	// Path is the resolved path ("" for the embedded demo).
	Path string
}

// Vendor is a vendor quote from a catalog, resolved into the case.
type Vendor struct {
	ID    string
	Name  string // display name
	Quote string // the quote's reference
	// ValidUntil is the quote's last valid day (zero when not given).
	ValidUntil time.Time
	// Currency is the quote's own currency; Rate converts it (case currency
	// per unit of it; 1 when it is the case currency).
	Currency string
	Rate     float64
	// Catalog indexes Case.Catalogs: the file the vendor came from.
	Catalog int
	// Tiers are its volume discounts, sorted by increasing threshold within
	// each basis; see Tier.
	Tiers []Tier
}

// TierBasis says what a tier threshold counts.
type TierBasis int

const (
	// TierBySpend: the vendor's list spend of one order year (after price
	// erosion, before discount), in case currency.
	TierBySpend TierBasis = iota
	// TierByUnits: the number of units bought from the vendor in one order
	// year, over all links and items.
	TierByUnits
)

// String returns the catalog-file spelling of b.
func (b TierBasis) String() string {
	switch b {
	case TierBySpend:
		return "spend"
	case TierByUnits:
		return "units"
	}
	return "unknown"
}

// Tier is an all-units volume discount (DESIGN.md §2): when a vendor's order
// year reaches Threshold (by Basis), every capex amount of that vendor in that
// year is reduced by Discount. When several tiers are reached, the one with
// the largest discount applies.
type Tier struct {
	Basis     TierBasis
	Threshold float64 // case currency (spend) or units
	Discount  float64 // fraction in [0, 1)
}

// ItemKind distinguishes capacity modules from leases.
type ItemKind int

const (
	// Module is bought: capex per unit (plus per km), yearly opex, book life.
	Module ItemKind = iota
	// Lease has no capex: a yearly fee (Opex) from its in-service year,
	// kept to the horizon once taken.
	Lease
)

// String returns the catalog-file spelling of k.
func (k ItemKind) String() string {
	switch k {
	case Module:
		return "module"
	case Lease:
		return "lease"
	}
	return "unknown"
}

// Item is one purchasable upgrade of a catalog, resolved into the case: all
// money converted to case currency, prices already eroded per order year.
type Item struct {
	ID string
	// Vendor indexes Case.Vendors.
	Vendor int
	Kind   ItemKind
	// Classes lists the link classes it fits.
	Classes []string
	// Gbps is the capacity one unit adds in each direction.
	Gbps float64
	// CapexPerUnit and CapexPerKM are the first-year list prices (case
	// currency); a unit on link l costs CapexPerUnit + CapexPerKM × l.KM
	// before erosion. Both are 0 for a lease.
	CapexPerUnit, CapexPerKM float64
	// Opex is the first-year yearly opex per unit (a lease's fee).
	Opex float64
	// LeadMonths is the lead time in months.
	LeadMonths int
	// BookLife in years drives depreciation and salvage (0 for a lease).
	BookLife int
	// SlotsPerUnit is the number of link slots one unit uses.
	SlotsPerUnit int
	// MaxUnits caps units per link (≥ 1).
	MaxUnits int
	// Erosion is the yearly list price erosion e (negative: prices rise).
	Erosion float64

	// PriceFactor[i] = (1−e)^i is the list price multiplier of an order in
	// year index i.
	PriceFactor []float64
	// UnitCapex[i] and KMCapex[i] are the eroded list prices of an order
	// placed in year i: CapexPerUnit·PriceFactor[i], CapexPerKM·PriceFactor[i].
	UnitCapex, KMCapex []float64
	// OrderOpex[i] is the yearly opex per unit of units ordered in year i,
	// paid every year from their in-service year to the horizon: a lease's
	// fee is fixed at its order-year price, OrderOpex[i] = Opex·PriceFactor[i];
	// a module's opex is not eroded, OrderOpex[i] = Opex.
	OrderOpex []float64
	// Orderable[i] reports whether the item may be ordered in year index i:
	// true when its vendor's quote has no valid_until date, when the year
	// starts (1 January, orders are placed at the start of the year) on or
	// before valid_until, or when Case.PricesRollForward is set. Reports use
	// it to say why an order year is missing.
	Orderable []bool
	// InService[i] is the year index in which units ordered in year index i
	// start to serve (Case.InService with LeadMonths), or Horizon when
	// Orderable[i] is false. A value ≥ Horizon (lead time too long, or not
	// orderable) means such orders are not created.
	InService []int
}

// Capex returns the list capex (before volume discount) of one unit ordered
// in year index i on a link of km kilometres.
func (it *Item) Capex(i int, km float64) float64 {
	return it.UnitCapex[i] + it.KMCapex[i]*km
}

// Fits reports whether the item fits links of class.
func (it *Item) Fits(class string) bool {
	for _, c := range it.Classes {
		if c == class {
			return true
		}
	}
	return false
}

// Year returns the calendar year of year index i.
func (c *Case) Year(i int) int { return c.FirstYear + i }

// InService returns the year index in which an order placed at the start of
// year index i with a lead time of leadMonths months serves traffic
// (DESIGN.md §2): i + max(0, ⌈(m − c)/12⌉) with c = ReadyByMonth. A result
// ≥ Horizon means the order would not serve within the horizon.
func (c *Case) InService(i, leadMonths int) int {
	return i + inServiceDelay(leadMonths, c.ReadyByMonth)
}

// inServiceDelay is max(0, ⌈(m − c)/12⌉) in whole years.
func inServiceDelay(leadMonths, readyBy int) int {
	d := leadMonths - readyBy
	if d <= 0 {
		return 0
	}
	return (d + 11) / 12
}

// DiscountFactor returns DF for year index i: (1+r)^−(i+1) at end of year,
// (1+r)^−(i+0.5) in mid-year mode. It is computed from DiscountRate on each
// call (nothing cached), so a copy of a Case with another rate is consistent.
func (c *Case) DiscountFactor(i int) float64 {
	return discountFactor(c.DiscountRate, c.MidYear, i)
}

// SalvageDiscountFactor returns the factor applied to salvage: always end of
// the last year, (1+r)^−T.
func (c *Case) SalvageDiscountFactor() float64 {
	return math.Pow(1+c.DiscountRate, -float64(c.Horizon))
}

func discountFactor(r float64, midYear bool, i int) float64 {
	t := float64(i + 1)
	if midYear {
		t -= 0.5
	}
	return math.Pow(1+r, -t)
}

// CostMode reports whether no demand pays a tariff in any year: netstage then
// treats every demand as committed and minimises present cost.
func (c *Case) CostMode() bool {
	for _, d := range c.Demands {
		for _, p := range d.Tariff {
			if p != 0 {
				return false
			}
		}
	}
	return true
}

// linksAtSites returns, for each site, the indices of the links with an
// end there, in link order.
func (c *Case) linksAtSites() [][]int {
	at := make([][]int, len(c.Sites))
	for li, l := range c.Links {
		at[l.A] = append(at[l.A], li)
		at[l.B] = append(at[l.B], li)
	}
	return at
}

// SiteIndex returns the index of the site with id, or −1.
func (c *Case) SiteIndex(id string) int {
	for i, s := range c.Sites {
		if s.ID == id {
			return i
		}
	}
	return -1
}

// LinkIndex returns the index of the link with id, or −1.
func (c *Case) LinkIndex(id string) int {
	for i, l := range c.Links {
		if l.ID == id {
			return i
		}
	}
	return -1
}

// VendorFor returns the id of the only vendor whose items may be used on
// links of class, or "" when any vendor may: the class's entry in
// ClassVendor if there is one (it wins over VendorOnly), else VendorOnly.
func (c *Case) VendorFor(class string) string {
	if v, ok := c.ClassVendor[class]; ok {
		return v
	}
	return c.VendorOnly
}

// Values of Case.OneVendor.
const (
	OneVendorPerClass = "per_class"
	OneVendorNetwork  = "network"
)

// VendorChoiceGroup returns the name of the group of links that must share
// one vendor chosen by the optimiser to which links of class belong: the
// class itself under OneVendorPerClass, "" (the whole network) under
// OneVendorNetwork. ok is false when no choice applies to the class: no
// OneVendor policy, or a vendor already named for it.
func (c *Case) VendorChoiceGroup(class string) (group string, ok bool) {
	if c.OneVendor == "" || c.VendorFor(class) != "" {
		return "", false
	}
	if c.OneVendor == OneVendorPerClass {
		return class, true
	}
	return "", true
}

// VendorPolicy describes the case's vendor restrictions in words ("" when
// every vendor may be used everywhere): "metro links only polaris; one
// vendor per link class for the others, chosen by netstage".
func (c *Case) VendorPolicy() string {
	var parts []string
	if c.VendorOnly != "" {
		parts = append(parts, "only "+c.VendorOnly)
	}
	classes := make([]string, 0, len(c.ClassVendor))
	for k := range c.ClassVendor {
		classes = append(classes, k)
	}
	sort.Strings(classes)
	for _, k := range classes {
		parts = append(parts, k+" links only "+c.ClassVendor[k])
	}
	if c.OneVendor != "" && c.VendorOnly == "" {
		others := ""
		if len(classes) > 0 {
			others = " for the other classes"
		}
		switch c.OneVendor {
		case OneVendorPerClass:
			parts = append(parts, "one vendor per link class"+others+", chosen by netstage")
		case OneVendorNetwork:
			parts = append(parts, "one vendor"+others+", chosen by netstage")
		}
	}
	return strings.Join(parts, "; ")
}

// VendorIndex returns the index of the vendor with id, or −1.
func (c *Case) VendorIndex(id string) int {
	for i, v := range c.Vendors {
		if v.ID == id {
			return i
		}
	}
	return -1
}

// TotalForecast returns the sum of all demands' forecasts in year index i
// (Gbps each direction).
func (c *Case) TotalForecast(i int) float64 {
	s := 0.0
	for _, d := range c.Demands {
		s += d.Forecast[i]
	}
	return s
}
