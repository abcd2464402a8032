package plans

import (
	"fmt"
	"strings"
	"testing"
)

// TestQuoteValidity checks which order years a quote's valid_until allows
// (DESIGN.md §2: orders are placed on 1 January of their year, so a year is
// orderable when 1 January is on or before valid_until). The base case runs
// 2030–2032; with lead_months = 2 and ready_by_month 9 an order serves in its
// own year, so InService is [0, 1, 2] where the year is orderable and the
// horizon (3) where it is not. Expected vectors are worked out by hand.
func TestQuoteValidity(t *testing.T) {
	tests := []struct {
		name        string
		validUntil  string
		rollForward bool
		orderable   []bool
		inService   []int
		warn        string // fragment of the expected warning, "" for none
	}{
		{"valid over the horizon", "2032-01-01", false, []bool{true, true, true}, []int{0, 1, 2}, ""},
		{"expires mid 2031", "2031-06-30", false, []bool{true, true, false}, []int{0, 1, 3},
			`quote "q" of vendor "v" is valid until 2031-06-30: its items cannot be ordered from 2032 on`},
		{"valid on 1 January 2031 only", "2031-01-01", false, []bool{true, true, false}, []int{0, 1, 3},
			"cannot be ordered from 2032 on"},
		{"expires end of the first year", "2030-12-31", false, []bool{true, false, false}, []int{0, 3, 3},
			"cannot be ordered from 2031 on"},
		{"valid on 1 January 2030 only", "2030-01-01", false, []bool{true, false, false}, []int{0, 3, 3},
			"cannot be ordered from 2031 on"},
		{"expires, rolled forward", "2030-12-31", true, []bool{true, true, true}, []int{0, 1, 2},
			"valid until 2030-12-31: orders from 2031 on use its prices rolled forward"},
		{"expired before the first year, rolled forward", "2029-06-30", true, []bool{true, true, true}, []int{0, 1, 2},
			"expired on 2029-06-30, before the first year 2030; its prices are rolled forward"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			caseText := baseCase
			if tc.rollForward {
				caseText = strings.Replace(caseText, "discount_rate = 0.1", "discount_rate = 0.1\nprices_roll_forward = true", 1)
			}
			cat := strings.NewReplacer(
				"valid_until = 2035-12-31", "quote = \"q\"\nvalid_until = "+tc.validUntil,
				"lead_months = 12", "lead_months = 2",
			).Replace(baseCatalog)
			c, warns, err := decodeTexts(caseText, map[string]string{"cat.toml": cat})
			if err != nil {
				t.Fatalf("Decode: %v", err)
			}
			it := c.Items[0]
			if fmt.Sprint(it.Orderable) != fmt.Sprint(tc.orderable) {
				t.Errorf("Orderable: got %v, want %v", it.Orderable, tc.orderable)
			}
			if fmt.Sprint(it.InService) != fmt.Sprint(tc.inService) {
				t.Errorf("InService: got %v, want %v", it.InService, tc.inService)
			}
			var quoteWarns []string
			for _, w := range warns {
				if w.Key == "vendors.valid_until" {
					quoteWarns = append(quoteWarns, w.String())
				}
			}
			switch {
			case tc.warn == "" && len(quoteWarns) != 0:
				t.Errorf("got quote warnings %v, want none", quoteWarns)
			case tc.warn != "" && (len(quoteWarns) != 1 || !strings.Contains(quoteWarns[0], tc.warn)):
				t.Errorf("got quote warnings %v, want one containing %q", quoteWarns, tc.warn)
			case tc.warn != "" && !strings.HasPrefix(quoteWarns[0], "cat.toml:5:1: "):
				t.Errorf("warning %q: want it at the valid_until line, cat.toml:5:1", quoteWarns[0])
			}
		})
	}
}

// TestQuoteValidityInModel checks that the model offers no order column for
// a year the quote does not cover, without any change to the model: the
// loader sets InService to the horizon for such years.
func TestQuoteValidityInModel(t *testing.T) {
	cat := strings.NewReplacer("valid_until = 2035-12-31", "valid_until = 2031-06-30", "lead_months = 12", "lead_months = 2").Replace(baseCatalog)
	c, _, err := decodeTexts(baseCase, map[string]string{"cat.toml": cat})
	if err != nil {
		t.Fatal(err)
	}
	m, err := BuildModel(c, BuildOptions{})
	if err != nil {
		t.Fatal(err)
	}
	years := map[string]bool{}
	for _, name := range m.LP.ColName {
		for _, y := range []string{"2030", "2031", "2032"} {
			if strings.HasPrefix(name, "y_AB_m_"+y) {
				years[y] = true
			}
		}
	}
	if !years["2030"] || !years["2031"] || years["2032"] {
		t.Errorf("order columns of item m on AB by year: got %v, want 2030 and 2031 only", years)
	}
}

// vendorCatalog is the base catalog with a second vendor "w" whose item
// "n" fits metro and core links.
var vendorCatalog = baseCatalog + `
[[vendors]]
id = "w"
currency = "EUR"

[[items]]
id = "n"
vendor = "w"
kind = "module"
classes = ["metro", "core"]
gbps = 10
capex = 900
lead_months = 2
book_life = 5
`

// TestVendorRestriction checks [case] vendor and [case.class_vendor]: the
// items left on each link, that the class entry wins, and the warnings.
// Link AB is metro and BC is made core; item m (vendor v) fits metro only,
// item n (vendor w) fits both.
func TestVendorRestriction(t *testing.T) {
	tests := []struct {
		name    string
		keys    string // added to [case]
		classes string // [case.class_vendor] lines
		ab, bc  []int  // Link.Items
		warn    string // expected warning fragment, "" for no warning at all
	}{
		{"no restriction", "", "", []int{0, 1}, []int{1}, ""},
		{"whole network on w", `vendor = "w"`, "", []int{1}, []int{1}, ""},
		{"whole network on v", `vendor = "v"`, "", []int{0}, nil,
			`no item of vendor "v" fits link "BC" (class "core"), the only vendor the case allows there`},
		{"metro on v", "", `metro = "v"`, []int{0}, []int{1}, ""},
		{"class entry wins over vendor", `vendor = "v"`, `core = "w"`, []int{0}, []int{1}, ""},
		{"class entry wins, other way", `vendor = "w"`, `metro = "v"`, []int{0}, []int{1}, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			caseText := strings.Replace(baseCase, "km = 20\ncapacity_gbps = 10\nclass = \"metro\"", "km = 20\ncapacity_gbps = 10\nclass = \"core\"", 1)
			if tc.keys != "" {
				caseText = strings.Replace(caseText, "discount_rate = 0.1", "discount_rate = 0.1\n"+tc.keys, 1)
			}
			if tc.classes != "" {
				caseText = strings.Replace(caseText, "[budget]", "[case.class_vendor]\n"+tc.classes+"\n\n[budget]", 1)
			}
			c, warns, err := decodeTexts(caseText, map[string]string{"cat.toml": vendorCatalog})
			if err != nil {
				t.Fatalf("Decode: %v", err)
			}
			if c.Links[1].Class != "core" {
				t.Fatalf("test input: link BC has class %q, want core", c.Links[1].Class)
			}
			if fmt.Sprint(c.Links[0].Items) != fmt.Sprint(tc.ab) || fmt.Sprint(c.Links[1].Items) != fmt.Sprint(tc.bc) {
				t.Errorf("items: AB %v, BC %v; want %v, %v", c.Links[0].Items, c.Links[1].Items, tc.ab, tc.bc)
			}
			if len(c.Items) != 2 {
				t.Errorf("Case.Items: got %d, want both items kept (only Link.Items is filtered)", len(c.Items))
			}
			switch {
			case tc.warn == "" && len(warns) != 0:
				t.Errorf("got warnings %v, want none (an item left out by the restriction is not suspicious)", warns)
			case tc.warn != "" && (len(warns) != 1 || !strings.Contains(warns[0].String(), tc.warn)):
				t.Errorf("got warnings %v, want one containing %q", warns, tc.warn)
			}
		})
	}
}

// TestVendorRestrictionKeepsCatalogCheck checks that an item whose classes
// match no link is still an error when a restriction also leaves it out:
// the restriction hides no catalog mistake.
func TestVendorRestrictionKeepsCatalogCheck(t *testing.T) {
	caseText := strings.Replace(baseCase, "discount_rate = 0.1", "discount_rate = 0.1\nvendor = \"w\"", 1)
	cat := strings.Replace(vendorCatalog, `classes = ["metro"]`, `classes = ["backhaul"]`, 1)
	_, _, err := decodeTexts(caseText, map[string]string{"cat.toml": cat})
	if err == nil || !strings.Contains(err.Error(), `item "m" fits no link`) {
		t.Errorf("got %v, want the error that item m fits no link", err)
	}
}

// TestVendorRestrictionUnreadCatalog checks that a vendor id is not called
// unknown when a catalog could not be read: it may be defined there.
func TestVendorRestrictionUnreadCatalog(t *testing.T) {
	caseText := strings.NewReplacer(
		"discount_rate = 0.1", "discount_rate = 0.1\nvendor = \"x\"",
		`catalogs = ["cat.toml"]`, `catalogs = ["cat.toml", "gone.toml"]`,
	).Replace(baseCase)
	_, _, err := decodeTexts(caseText, map[string]string{"cat.toml": baseCatalog})
	if err == nil {
		t.Fatal("got no error for a missing catalog")
	}
	if strings.Contains(err.Error(), `vendor "x"`) {
		t.Errorf("got %v, want only the unreadable catalog reported", err)
	}
}
