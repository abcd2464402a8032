package plans

import (
	"fmt"
	"sort"

	"netstage/lp"
)

// vendorChoice is the optimiser's choice of one vendor for a group of
// links ([case] one_vendor): a class, or the whole network (name "").
type vendorChoice struct {
	name string
	// vendors lists the vendors whose items fit some link of the group,
	// in vendor order; col[i] is the binary "vendors[i] is the group's
	// vendor".
	vendors []int
	col     []int
	// options lists the options on the group's links.
	options []int
}

// addVendorChoice adds, for each group of links that must share one vendor
// chosen by the optimiser (Case.VendorChoiceGroup) and that has items of at
// least two vendors, a binary w[g,v] per vendor with
//
//	Σ_v w[g,v] ≤ 1                       one vendor at most (none: buy nothing)
//	y[o,last] ≤ max_o · w[g,vendor(o)]    for each option o on a link of g
//
// where y[o,last] is o's cumulative unit count at its last order year (the
// units bought over the horizon; the earlier counts are below it). Cost
// O(options).
func (m *Model) addVendorChoice() {
	c := m.Case
	groups := map[string]*vendorChoice{}
	var names []string
	optsOf := map[string][]int{}
	for oi := range m.options {
		o := &m.options[oi]
		g, ok := c.VendorChoiceGroup(c.Links[o.link].Class)
		if !ok {
			continue
		}
		vc := groups[g]
		if vc == nil {
			vc = &vendorChoice{name: g}
			groups[g] = vc
			names = append(names, g)
		}
		v := c.Items[o.item].Vendor
		if i := sort.SearchInts(vc.vendors, v); i == len(vc.vendors) || vc.vendors[i] != v {
			vc.vendors = append(vc.vendors, 0)
			copy(vc.vendors[i+1:], vc.vendors[i:])
			vc.vendors[i] = v
		}
		optsOf[g] = append(optsOf[g], oi)
	}
	sort.Strings(names)
	for _, g := range names {
		vc := groups[g]
		if len(vc.vendors) < 2 {
			continue // one vendor fits: nothing to choose
		}
		label := g
		if label == "" {
			label = "network"
		}
		colOf := map[int]int{}
		ones := make([]float64, len(vc.vendors))
		for i, v := range vc.vendors {
			j := m.LP.AddIntCol(fmt.Sprintf("w_%s_%s", label, c.Vendors[v].ID), 0, 0, 1)
			vc.col = append(vc.col, j)
			colOf[v] = j
			ones[i] = 1
		}
		m.LP.AddRow("one_vendor_"+label, -lp.Inf, 1, vc.col, ones)
		vc.options = optsOf[g]
		for _, oi := range vc.options {
			o := &m.options[oi]
			it := &c.Items[o.item]
			j := o.col[o.lastOrder]
			up := m.LP.ColUpper[j]
			m.LP.AddRow(fmt.Sprintf("v_%s_%s_%s", c.Links[o.link].ID, it.ID, label), -lp.Inf, 0,
				[]int{j, colOf[it.Vendor]}, []float64{1, -up})
		}
		m.vendorChoices = append(m.vendorChoices, *vc)
	}
}

// chosenVendors returns, for each group with a vendor choice, the vendor
// the plan buys from ("" when it buys nothing there). It reads the plan,
// not the binaries: with no purchases in a group its binary is free.
func (m *Model) chosenVendors(plan []PlanRow) []VendorChoice {
	c := m.Case
	var out []VendorChoice
	for _, vc := range m.vendorChoices {
		ch := VendorChoice{Class: vc.name}
		for _, p := range plan {
			if p.Vendor == "" {
				continue
			}
			if g, ok := c.VendorChoiceGroup(c.Links[c.LinkIndex(p.Link)].Class); ok && g == vc.name {
				ch.Vendor = p.Vendor
				break
			}
		}
		out = append(out, ch)
	}
	return out
}

// setVendorChoice sets the vendor-choice binaries of x to the vendors the
// unit columns of x buy from, for a heuristic point whose units are
// integral. It returns false when some group buys from two vendors (the
// point cannot satisfy the one-vendor rows).
func (m *Model) setVendorChoice(x []float64) bool {
	c := m.Case
	for _, vc := range m.vendorChoices {
		chosen := -1
		for _, oi := range vc.options {
			o := &m.options[oi]
			if x[o.col[o.lastOrder]] < 0.5 {
				continue
			}
			v := c.Items[o.item].Vendor
			if chosen >= 0 && chosen != v {
				return false
			}
			chosen = v
		}
		for i, j := range vc.col {
			x[j] = 0
			if vc.vendors[i] == chosen {
				x[j] = 1
			}
		}
	}
	return true
}
