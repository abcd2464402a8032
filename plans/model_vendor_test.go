package plans

import (
	"context"
	"fmt"
	"math"
	"os"
	"path"
	"strings"
	"testing"

	"netstage/plans/demo"
)

// loadSyntheticWith loads a synthetic case with extra lines added to its
// [case] table.
func loadSyntheticWith(t *testing.T, sites, years int, seed int64, caseLines string) *Case {
	t.Helper()
	path := writeSynthetic(t, sites, years, seed)
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	text := string(data)
	if !strings.Contains(text, "\n[budget]") {
		t.Fatal("test input: no [budget] table after [case] in the synthetic case")
	}
	text = strings.Replace(text, "\n[budget]", "\n"+caseLines+"\n\n[budget]", 1)
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	c, _, err := Load(path)
	if err != nil {
		t.Fatalf("%s: %v", caseLines, err)
	}
	return c
}

func solveExact(t *testing.T, c *Case) *Result {
	t.Helper()
	res, err := Solve(context.Background(), c, SolveOptions{Gap: 1e-9})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != StatusOptimal {
		t.Fatalf("status %s, want optimal", res.Status)
	}
	return res
}

// TestOneVendorByHand: sites A–B–C, link L1 (class std) and L2 (class
// far), 10 Gbps to carry on each at 50 a Gbps-month, nothing installed.
// Vendor V1 sells the std module at 1000 and the far one at 5000, V2 at
// 3000 and 2000. Free choice buys V1 on L1 and V2 on L2 (3000); one vendor
// for the network must take V2 on both (5000 < 6000); one vendor per class
// is the free choice again. Each module is ordered in year 1 and serves
// both years; its present cost is price·(DF1 − 0.6·DF2), the book value
// after 2 of 5 years being 3/5 of the price (straight line, DESIGN.md §2).
// solveBoth also checks each model against brute-force enumeration.
func TestOneVendorByHand(t *testing.T) {
	const T, tariff = 2, 50.0
	build := func(policy string) *Case {
		c := newCase(T, fpRate, "A", "B", "C")
		c.testLink("L1", "A", "B", 10, 0, 1)
		c.testLink("L2", "B", "C", 10, 0, 1).Class = "far"
		c.testDemand("A", "B", 10, 0, tariff)
		c.testDemand("B", "C", 10, 0, tariff)
		c.testVendor("V1")
		c.testVendor("V2")
		for _, it := range []struct {
			id, vendor, class string
			capex             float64
		}{{"V1std", "V1", "std", 1000}, {"V1far", "V1", "far", 5000}, {"V2std", "V2", "std", 3000}, {"V2far", "V2", "far", 2000}} {
			c.testItem(testItem{id: it.id, vendor: it.vendor, gbps: 10, capex: it.capex, life: 5, maxUnits: 1})
			c.Items[len(c.Items)-1].Classes = []string{it.class}
		}
		for l := range c.Links { // the items that fit each link, as load does
			c.Links[l].Items = nil
			for i, it := range c.Items {
				if it.Fits(c.Links[l].Class) {
					c.Links[l].Items = append(c.Links[l].Items, i)
				}
			}
		}
		c.OneVendor = policy
		return c
	}
	revenue := 2 * 12 * tariff * 10 * (df(fpRate, 1) + df(fpRate, 2))
	unitPV := df(fpRate, 1) - 0.6*df(fpRate, 2)
	for _, tc := range []struct {
		policy  string
		capex   float64
		vendors []VendorChoice
	}{
		{"", 3000, nil},
		{OneVendorNetwork, 5000, []VendorChoice{{"", "V2"}}},
		{OneVendorPerClass, 3000, []VendorChoice{{"far", "V2"}, {"std", "V1"}}},
	} {
		t.Run("policy="+tc.policy, func(t *testing.T) {
			res := solveBoth(t, build(tc.policy))
			want := revenue - tc.capex*unitPV
			if !near(*res.Objective, want, 1e-7) {
				t.Errorf("NPV %.4f, want %.4f", *res.Objective, want)
			}
			if fmt.Sprint(res.VendorChoice) != fmt.Sprint(tc.vendors) {
				t.Errorf("vendor choice %v, want %v", res.VendorChoice, tc.vendors)
			}
		})
	}
}

// TestOneVendorIsBestNamedVendor checks [case] one_vendor against brute
// force over the planner-named restrictions it chooses among: letting the
// optimiser pick one vendor per class (or one for the network) must give
// exactly the best NPV over every assignment of a vendor to each class
// (or every single vendor), each solved with [case.class_vendor] (or
// [case] vendor), whose restricted plans are the one-vendor plans. On the
// demo the free mix (brightwave and polaris) is worth more than any one
// vendor, so the policies bind; on the synthetic cases (classes metro and
// longhaul; alpha, beta and gamma, the last with metro leases only) the
// best plans happen to buy from one vendor already. A vendor named for a
// class it has no item for leaves that class unupgradable, which
// one_vendor also allows by buying nothing there.
func TestOneVendorIsBestNamedVendor(t *testing.T) {
	type namedCase struct {
		name             string
		load             func(caseLines string) *Case
		classes, vendors []string
		binds            bool // the free mix beats every one-vendor plan
	}
	cases := []namedCase{{"synthetic-4-3-seed-1", func(l string) *Case { return loadSyntheticWith(t, 4, 3, 1, l) },
		[]string{"longhaul", "metro"}, []string{"alpha", "beta", "gamma"}, false}}
	if !testing.Short() {
		cases = append(cases,
			namedCase{"synthetic-4-3-seed-2", func(l string) *Case { return loadSyntheticWith(t, 4, 3, 2, l) },
				[]string{"longhaul", "metro"}, []string{"alpha", "beta", "gamma"}, false},
			namedCase{"demo", func(l string) *Case { return loadDemoWith(t, l) },
				[]string{"core", "metro"}, []string{"brightwave", "polaris"}, true})
	}
	for _, nc := range cases {
		t.Run(nc.name, func(t *testing.T) {
			free := solveExact(t, nc.load(""))

			network := solveExact(t, nc.load(`one_vendor = "network"`))
			best, bestVendor := math.Inf(-1), ""
			for _, v := range nc.vendors {
				r := solveExact(t, nc.load(fmt.Sprintf("vendor = %q", v)))
				if *r.Objective > best {
					best, bestVendor = *r.Objective, v
				}
			}
			if !near(*network.Objective, best, 1e-7) {
				t.Errorf("one_vendor = network: NPV %.4f, best single vendor (%s) %.4f", *network.Objective, bestVendor, best)
			}
			checkOneVendor(t, network, func(string) string { return "" })

			perClass := solveExact(t, nc.load(`one_vendor = "per_class"`))
			best, bestVendor = math.Inf(-1), ""
			// every assignment of a vendor to each class
			assign := make([]int, len(nc.classes))
			for {
				lines := "[case.class_vendor]"
				name := ""
				for k, cl := range nc.classes {
					lines += fmt.Sprintf("\n%s = %q", cl, nc.vendors[assign[k]])
					name += cl + ":" + nc.vendors[assign[k]] + " "
				}
				r := solveExact(t, nc.load(lines))
				if *r.Objective > best {
					best, bestVendor = *r.Objective, name
				}
				k := 0
				for k < len(assign) && assign[k] == len(nc.vendors)-1 {
					assign[k] = 0
					k++
				}
				if k == len(assign) {
					break
				}
				assign[k]++
			}
			if !near(*perClass.Objective, best, 1e-7) {
				t.Errorf("one_vendor = per_class: NPV %.4f, best assignment (%s) %.4f", *perClass.Objective, bestVendor, best)
			}
			checkOneVendor(t, perClass, func(class string) string { return class })

			// Each restriction can only lose value against the free choice;
			// one vendor per class allows at least what one for the network does.
			tol := 1e-7 * max(1, abs(*free.Objective))
			if *network.Objective > *perClass.Objective+tol || *perClass.Objective > *free.Objective+tol {
				t.Errorf("NPV network %.4f ≤ per class %.4f ≤ free %.4f does not hold", *network.Objective, *perClass.Objective, *free.Objective)
			}
			if nc.binds && *perClass.Objective > *free.Objective-1 {
				t.Errorf("test input: the free mix (%.0f) should beat one vendor per class (%.0f)", *free.Objective, *perClass.Objective)
			}
			t.Logf("NPV free %.0f, per class %.0f, network %.0f", *free.Objective, *perClass.Objective, *network.Objective)
		})
	}
}

// loadDemoWith loads the embedded demo with extra lines added to its
// [case] table (after its catalogs line).
func loadDemoWith(t *testing.T, caseLines string) *Case {
	t.Helper()
	data, err := demo.Files.ReadFile(demo.CaseFile)
	if err != nil {
		t.Fatal(err)
	}
	text := string(data)
	i := strings.Index(text, "\ncatalogs = ")
	if i < 0 {
		t.Fatal("test input: no catalogs line in the demo case")
	}
	end := i + 1 + strings.Index(text[i+1:], "\n")
	text = text[:end] + "\n" + caseLines + text[end:]
	read := func(rel string) (string, []byte, error) {
		b, err := demo.Files.ReadFile(path.Join(path.Dir(demo.CaseFile), rel))
		return rel, b, err
	}
	c, _, err := Decode("case.toml", []byte(text), read)
	if err != nil {
		t.Fatalf("%s: %v", caseLines, err)
	}
	return c
}

// checkOneVendor checks that the plan buys from at most one vendor in each
// group (group maps a link class to its group) and that VendorChoice
// names that vendor.
func checkOneVendor(t *testing.T, res *Result, group func(class string) string) {
	t.Helper()
	c := res.model.Case
	used := map[string]string{}
	for _, p := range res.Plan {
		if p.Vendor == "" {
			continue
		}
		g := group(c.Links[c.LinkIndex(p.Link)].Class)
		if v, ok := used[g]; ok && v != p.Vendor {
			t.Errorf("group %q buys from %s and %s", g, v, p.Vendor)
		}
		used[g] = p.Vendor
	}
	for _, ch := range res.VendorChoice {
		if used[ch.Class] != ch.Vendor {
			t.Errorf("VendorChoice %q = %q, the plan buys from %q", ch.Class, ch.Vendor, used[ch.Class])
		}
	}
}

// TestSetVendorChoice: the heuristic's repair sets the binaries of a point
// buying from one vendor per group, and refuses a point buying from two.
func TestSetVendorChoice(t *testing.T) {
	c := loadSyntheticWith(t, 5, 4, 4, `one_vendor = "network"`)
	m, err := BuildModel(c, BuildOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(m.vendorChoices) != 1 || len(m.vendorChoices[0].vendors) < 2 {
		t.Fatalf("test input: want one network group with two vendors or more, got %+v", m.vendorChoices)
	}
	byVendor := map[int]int{} // vendor → an option of it
	for oi, o := range m.options {
		byVendor[c.Items[o.item].Vendor] = oi
	}
	vc := m.vendorChoices[0]
	one, other := byVendor[vc.vendors[0]], byVendor[vc.vendors[1]]
	x := make([]float64, m.LP.NumCols())
	x[m.options[one].col[m.options[one].lastOrder]] = 1
	if !m.setVendorChoice(x) {
		t.Fatal("one vendor refused")
	}
	if x[vc.col[0]] != 1 || x[vc.col[1]] != 0 {
		t.Errorf("binaries %v %v, want 1 0", x[vc.col[0]], x[vc.col[1]])
	}
	x[m.options[other].col[m.options[other].lastOrder]] = 1
	if m.setVendorChoice(x) {
		t.Error("two vendors in one group accepted")
	}
}

func TestVendorPolicyText(t *testing.T) {
	tests := []struct {
		name string
		c    Case
		want string
	}{
		{"none", Case{}, ""},
		{"named", Case{VendorOnly: "v"}, "only v"},
		{"classes", Case{ClassVendor: map[string]string{"metro": "a", "core": "b"}}, "core links only b; metro links only a"},
		{"per class", Case{OneVendor: OneVendorPerClass}, "one vendor per link class, chosen by netstage"},
		{"network with a class named", Case{OneVendor: OneVendorNetwork, ClassVendor: map[string]string{"metro": "a"}},
			"metro links only a; one vendor for the other classes, chosen by netstage"},
		{"named wins", Case{OneVendor: OneVendorNetwork, VendorOnly: "v"}, "only v"},
	}
	for _, tc := range tests {
		if got := tc.c.VendorPolicy(); got != tc.want {
			t.Errorf("%s: %q, want %q", tc.name, got, tc.want)
		}
	}
	r := &Result{VendorChoice: []VendorChoice{{"core", "b"}, {"metro", ""}}}
	if got, want := r.VendorChoiceText(), "core: b; metro: none bought (one vendor per link class)"; got != want {
		t.Errorf("VendorChoiceText %q, want %q", got, want)
	}
	r = &Result{VendorChoice: []VendorChoice{{"", "a"}}}
	if got, want := r.VendorChoiceText(), "a (one vendor for the whole network)"; got != want {
		t.Errorf("VendorChoiceText %q, want %q", got, want)
	}
}
