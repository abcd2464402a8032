package catalog_test

import (
	"errors"
	"fmt"

	"netstage/catalog"
)

func ExampleDecode() {
	src := `
[[vendors]]
id = "acme"
currency = "EUR"

[[items]]
id = "acme-100g"
vendor = "acme"
kind = "module"
classes = ["metro"]
gbps = 100
capex = 40000
book_life = 7
lead_monts = 3
`
	_, _, err := catalog.Decode("acme.toml", []byte(src))
	var list catalog.ErrorList
	if errors.As(err, &list) {
		for _, e := range list {
			fmt.Println(e)
			fmt.Println(errors.Is(e, catalog.ErrUnknownKey))
		}
	}
	// Output:
	// acme.toml:14:1: items.lead_monts: unknown key: "lead_monts" (did you mean "lead_months"?)
	// true
}

func ExampleSuggest() {
	fmt.Println(catalog.Suggest("capx", []string{"capex", "capex_per_km", "opex"}))
	// Output: capex
}

func ExampleParse() {
	src, root, err := catalog.Parse("t.toml", []byte("[case]\nname = \"x\"\nhorizon = \"five\"\n"))
	if err != nil {
		panic(err)
	}
	c, _ := root.Sub("case")
	name, _ := c.String("name")
	c.Int("horizon")
	c.Done()
	root.Done()
	fmt.Println(name)
	fmt.Println(src.Errs)
	// Output:
	// x
	// t.toml:3:1: case.horizon: wrong type: want an integer, got string
}
