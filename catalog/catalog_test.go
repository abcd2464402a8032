package catalog

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const goodCatalog = `# a small valid catalog
[[vendors]]
id = "acme"
name = "Acme Optical"
quote = "Q-1"
valid_until = 2027-06-30
currency = "EUR"

[[items]]
id = "acme-100g"
vendor = "acme"
kind = "module"
classes = ["metro", "core"]
gbps = 100
capex = 40000
capex_per_km = 10
opex = 2000
lead_months = 3
book_life = 7
max_units = 4
erosion = 0.15

[[items]]
id = "acme-wave"
vendor = "acme"
kind = "lease"
classes = ["metro"]
gbps = 10
opex = 12000

[[tiers]]
vendor = "acme"
basis = "spend"
threshold = 200000
discount = 0.05
`

func TestDecodeGood(t *testing.T) {
	c, warns, err := Decode("good.toml", []byte(goodCatalog))
	if err != nil {
		t.Fatalf("Decode: %v", err)
	}
	if len(warns) != 0 {
		t.Errorf("warnings: got %v, want none", warns)
	}
	if got, want := len(c.Items), 2; got != want {
		t.Fatalf("items: got %d, want %d", got, want)
	}
	m := c.Items[0]
	if m.Kind != KindModule || m.Gbps != 100 || m.Capex != 40000 || m.CapexPerKM != 10 || m.LeadMonths != 3 || m.BookLife != 7 || m.MaxUnits != 4 || m.SlotsPerUnit != 1 || m.Erosion != 0.15 {
		t.Errorf("module: got %+v", m)
	}
	if m.Pos.Line != 9 || m.Pos.Col != 1 {
		t.Errorf("module position: got %d:%d, want 9:1", m.Pos.Line, m.Pos.Col)
	}
	l := c.Items[1]
	if l.Kind != KindLease || l.MaxUnits != 1 || l.Opex != 12000 {
		t.Errorf("lease: got %+v (defaults: max_units 1)", l)
	}
	v := c.Vendors[0]
	if v.ValidUntil.Format("2006-01-02") != "2027-06-30" || v.Currency != "EUR" || v.Name != "Acme Optical" {
		t.Errorf("vendor: got %+v", v)
	}
	if len(c.Tiers) != 1 || c.Tiers[0].Basis != BasisSpend || c.Tiers[0].Discount != 0.05 {
		t.Errorf("tiers: got %+v", c.Tiers)
	}
}

// lineCol returns the 1-based line and column of the nth (from 0)
// occurrence of marker in text, found by plain text search: an independent
// check of the positions the decoder reports.
func lineCol(t *testing.T, text, marker string, nth int) (int, int) {
	t.Helper()
	off := 0
	for i := 0; ; i++ {
		j := strings.Index(text[off:], marker)
		if j < 0 {
			t.Fatalf("marker %q (occurrence %d) not in input", marker, nth)
		}
		if i == nth {
			off += j
			break
		}
		off += j + len(marker)
	}
	line := strings.Count(text[:off], "\n") + 1
	col := off - strings.LastIndex(text[:off], "\n")
	return line, col
}

func TestDecodeErrors(t *testing.T) {
	tests := []struct {
		name     string
		old, new string // replacement applied to goodCatalog
		want     string // message fragment
		sentinel error
		at       string // marker of the expected position in the edited text
		nth      int
	}{
		{"syntax", `gbps = 100`, `gbps = = 100`, "syntax error", ErrSyntax, "= 100", 0},
		{"unknown key with suggestion", `book_life = 7`, `book_lfe = 7`, `did you mean "book_life"`, ErrUnknownKey, "book_lfe", 0},
		{"unknown key without suggestion", `max_units = 4`, `max_units = 4` + "\ncolour = \"red\"", "allowed: ", ErrUnknownKey, "colour", 0},
		{"wrong type", `gbps = 100`, `gbps = "100"`, "want a number, got string", ErrType, "gbps", 0},
		{"unknown vendor", `vendor = "acme"` + "\nkind = \"lease\"", `vendor = "acne"` + "\nkind = \"lease\"", `vendor "acne" is not defined in this catalog (did you mean "acme"?)`, ErrReference, `vendor = "acne"`, 0},
		{"unknown kind", `kind = "lease"`, `kind = "rent"`, `"rent" is not an item kind`, ErrRange, `kind = "rent"`, 0},
		{"negative capex", `capex = 40000`, `capex = -1`, "must be ≥ 0, got -1", ErrRange, "capex = -1", 0},
		{"non-finite gbps", `gbps = 100`, `gbps = nan`, "not a finite number", ErrRange, "gbps = nan", 0},
		{"zero gbps", "gbps = 10\n", "gbps = 0\n", "capacity per unit must be > 0", ErrRange, "gbps = 0", 0},
		{"duplicate vendor", `[[items]]`, "[[vendors]]\nid = \"acme\"\ncurrency = \"EUR\"\n\n[[items]]", `vendor "acme" is defined twice`, ErrDuplicate, `id = "acme"`, 1},
		{"duplicate item", `id = "acme-wave"`, `id = "acme-100g"`, `item "acme-100g" of vendor "acme" is defined twice`, ErrDuplicate, `id = "acme-100g"`, 1},
		{"bad currency", `currency = "EUR"`, `currency = "euro"`, "not a three-letter currency code", ErrRange, `currency = "euro"`, 0},
		{"lease with capex", "kind = \"lease\"\nclasses = [\"metro\"]\ngbps = 10", "kind = \"lease\"\nclasses = [\"metro\"]\ngbps = 10\ncapex = 5", "a lease has no capex", ErrRange, "capex = 5", 0},
		{"erosion out of range", `erosion = 0.15`, `erosion = 1.5`, "erosion must be between -1 and 1", ErrRange, "erosion = 1.5", 0},
		{"tier discount out of range", `discount = 0.05`, `discount = 5`, "discount must be a fraction between 0 and 1", ErrRange, "discount = 5", 0},
		{"tier basis", `basis = "spend"`, `basis = "volume"`, `"volume" is not a tier basis`, ErrRange, `basis = "volume"`, 0},
		{"missing book life", `book_life = 7`, ``, "a module needs a book life", ErrMissing, "[[items]]", 0},
		{"missing gbps", "gbps = 10\n", "", `missing key "gbps"`, ErrMissing, "[[items]]", 1},
		{"empty classes", `classes = ["metro"]`, `classes = []`, "must fit at least one link class", ErrRange, "classes = []", 0},
		{"class not a string", `classes = ["metro"]`, `classes = ["metro", 7]`, "element 2: want a string, got integer", ErrType, "7]", 0},
		{"negative lead time", `lead_months = 3`, `lead_months = -3`, "lead time must be ≥ 0 months", ErrRange, "lead_months = -3", 0},
		{"bad date", `valid_until = 2027-06-30`, `valid_until = "June 2027"`, "want a date like", ErrType, "valid_until", 0},
		{"whole number", `max_units = 4`, `max_units = 2.5`, "want a whole number, got 2.5", ErrType, "max_units", 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if !strings.Contains(goodCatalog, tc.old) {
				t.Fatalf("test input: %q not in the good catalog", tc.old)
			}
			text := strings.Replace(goodCatalog, tc.old, tc.new, 1)
			_, _, err := Decode("bad.toml", []byte(text))
			var list ErrorList
			if !errors.As(err, &list) {
				t.Fatalf("got error %v, want an ErrorList", err)
			}
			line, col := lineCol(t, text, tc.at, tc.nth)
			for _, e := range list {
				if strings.Contains(e.Error(), tc.want) {
					if e.Line != line || e.Col != col {
						t.Errorf("position: got %d:%d, want %d:%d (%v)", e.Line, e.Col, line, col, e)
					}
					if !errors.Is(e, tc.sentinel) {
						t.Errorf("got %v, want it to wrap %v", e, tc.sentinel)
					}
					if e.File != "bad.toml" {
						t.Errorf("file: got %q, want bad.toml", e.File)
					}
					return
				}
			}
			t.Errorf("got %v, want a message containing %q", err, tc.want)
		})
	}
}

func TestSyntaxErrorSnippet(t *testing.T) {
	text := "[[vendors]]\nid = \"x\"\ncurrency = EUR\n"
	_, _, err := Decode("s.toml", []byte(text))
	var list ErrorList
	if !errors.As(err, &list) || len(list) != 1 {
		t.Fatalf("got %v, want one error", err)
	}
	e := list[0]
	if e.Line != 3 {
		t.Errorf("line: got %d, want 3", e.Line)
	}
	lines := strings.Split(e.Snippet, "\n")
	if len(lines) != 2 || !strings.Contains(lines[0], "currency = EUR") || !strings.Contains(lines[1], "^") {
		t.Fatalf("snippet: got %q, want the offending line and a caret", e.Snippet)
	}
	// The caret sits under the reported column of the offending line.
	caret := strings.Index(lines[1], "^")
	src := strings.Index(lines[0], "currency")
	if caret-src != e.Col-1 {
		t.Errorf("caret at offset %d from line start, want column %d", caret-src, e.Col)
	}
}

// TestCaretSnippet checks the snippet renderer on tabs, a position past
// the end of the line, lines that do not exist, and the two-byte input
// `"\` on which the TOML decoder's own rendering panics (found by
// FuzzDecode).
func TestCaretSnippet(t *testing.T) {
	for _, tc := range []struct {
		text             string
		line, col, width int
		want             string
	}{
		{"a = 1\nb = = 2\n", 2, 5, 1, "      2 | b = = 2\n              ^"},
		{"\tx = ?", 1, 6, 1, "      1 |         x = ?\n                      ^"},
		{"x = 1\r\n", 1, 9, 2, "      1 | x = 1\n               ^^"},
		{"x", 0, 1, 1, ""},
		{"x", 3, 1, 1, ""},
	} {
		if got := caretSnippet(tc.text, tc.line, tc.col, tc.width); got != tc.want {
			t.Errorf("caretSnippet(%q, %d, %d, %d):\n got %q\nwant %q", tc.text, tc.line, tc.col, tc.width, got, tc.want)
		}
	}
	_, _, err := Decode("q.toml", []byte(`"\`))
	var list ErrorList
	if !errors.As(err, &list) || len(list) != 1 || !errors.Is(list[0], ErrSyntax) {
		t.Fatalf("got %v, want one syntax error", err)
	}
}

func TestAllErrorsInOneRun(t *testing.T) {
	text := strings.NewReplacer(`gbps = 100`, `gbps = -1`, `book_life = 7`, `book_lyfe = 7`, `discount = 0.05`, `discount = 2`).Replace(goodCatalog)
	_, _, err := Decode("bad.toml", []byte(text))
	var list ErrorList
	if !errors.As(err, &list) {
		t.Fatalf("got %v, want an ErrorList", err)
	}
	// gbps ≤ 0, unknown book_lyfe, missing book life, discount ≥ 1.
	if len(list) != 4 {
		t.Fatalf("got %d errors, want 4:\n%v", len(list), err)
	}
	for i := 1; i < len(list); i++ {
		if list[i].Line < list[i-1].Line {
			t.Errorf("errors not sorted by line: %v", err)
		}
	}
}

func TestWarnings(t *testing.T) {
	text := strings.Replace(goodCatalog, "opex = 12000", "opex = 0", 1) + `
[[tiers]]
vendor = "acme"
basis = "spend"
threshold = 400000
discount = 0.02
`
	_, warns, err := Decode("w.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	var msgs []string
	for _, w := range warns {
		msgs = append(msgs, w.String())
	}
	all := strings.Join(msgs, "\n")
	for _, want := range []string{"lease with no yearly fee", "larger spend threshold should give a larger discount"} {
		if !strings.Contains(all, want) {
			t.Errorf("warnings %q: want one containing %q", all, want)
		}
	}
}

func TestSuggest(t *testing.T) {
	allowed := []string{"book_life", "capex", "capex_per_km", "gbps", "id", "kind"}
	tests := []struct{ word, want string }{
		{"book_lfe", "book_life"},
		{"capx", "capex"},
		{"Gbps", "gbps"},
		{"colour", ""},
		{"d", "id"}, // one edit is always close enough
		{"kid", "id"},
	}
	for _, tc := range tests {
		if got := Suggest(tc.word, allowed); got != tc.want {
			t.Errorf("Suggest(%q): got %q, want %q", tc.word, got, tc.want)
		}
	}
}

func TestEditDistance(t *testing.T) {
	// source: the Levenshtein distance of kitten/sitting is 3, a textbook
	// example (from memory); with transpositions (optimal string alignment)
	// "ca"/"abc" is 3 and "metor"/"metro" is 1 (from memory).
	tests := []struct {
		a, b string
		want int
	}{{"kitten", "sitting", 3}, {"", "abc", 3}, {"flaw", "lawn", 2}, {"same", "same", 0}, {"ca", "abc", 3}, {"metor", "metro", 1}}
	for _, tc := range tests {
		if got := editDistance(tc.a, tc.b); got != tc.want {
			t.Errorf("editDistance(%q, %q): got %d, want %d", tc.a, tc.b, got, tc.want)
		}
	}
}

func TestScanKeyPositions(t *testing.T) {
	text := `title = "a # not a comment"   # comment
multi = """
[[not]]
key = 1
"""
list = [
  1,   # one
  2,
]
[case.exchange_rates]
USD = 0.9
[[links]]
id = "x"
on_order = [{ gbps = 10, year = 2028 }, {gbps=20,year=2029}]
[[links]]
"quoted key" = 1
a.b = 2
[[links.sub]]
k = 1
`
	pos := scanKeyPositions(text)
	tests := []struct {
		path   string
		marker string
		nth    int
	}{
		{"title", "title", 0},
		{"multi", "multi", 0},
		{"list", "list", 0},
		{"list[1]", "2,", 0},
		{"case.exchange_rates", "[case.exchange_rates]", 0},
		{"case.exchange_rates.USD", "USD", 0},
		{"links[0].id", `id = "x"`, 0},
		{"links[0].on_order[0].gbps", "gbps = 10", 0},
		{"links[0].on_order[1].year", "year=2029", 0},
		{"links[1]", "[[links]]", 1},
		{"links[1].quoted key", `"quoted key"`, 0},
		{"links[1].a.b", "a.b", 0},
		{"links[1].sub[0].k", "k = 1", 0},
	}
	for _, tc := range tests {
		line, col := lineCol(t, text, tc.marker, tc.nth)
		got, ok := pos[tc.path]
		if !ok {
			t.Errorf("%s: no position", tc.path)
			continue
		}
		if got.Line != line || got.Col != col {
			t.Errorf("%s: got %d:%d, want %d:%d", tc.path, got.Line, got.Col, line, col)
		}
	}
	if _, ok := pos["not"]; ok {
		t.Errorf("a header inside a multi-line string was taken for a table")
	}
	if _, ok := pos["key"]; ok {
		t.Errorf("a key inside a multi-line string was taken for a key")
	}
}

// TestDemoCatalogs decodes every catalog file shipped with the demo: they
// must stay valid.
func TestDemoCatalogs(t *testing.T) {
	files, _ := filepath.Glob("../plans/demo/catalogs/*.toml")
	if len(files) == 0 {
		t.Fatal("no demo catalogs found")
	}
	for _, f := range files {
		if _, _, err := ReadFile(f); err != nil {
			t.Errorf("%s: %v", f, err)
		}
	}
}

func FuzzDecode(f *testing.F) {
	f.Add([]byte(goodCatalog))
	files, _ := filepath.Glob("../plans/demo/catalogs/*.toml")
	for _, p := range files {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	f.Add([]byte("[[items]]\nid = 1\n[[items]]\nclasses = [[1], {a=1}]\n"))
	f.Add([]byte("a = [[[[[[[[1]]]]]]]]\nb = { c = { d = [1, {e = 2}] } }\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		c, _, err := Decode("fuzz.toml", data)
		if err == nil && c == nil {
			t.Fatal("nil catalog without an error")
		}
		var list ErrorList
		if err != nil && !errors.As(err, &list) {
			t.Fatalf("error is not an ErrorList: %v", err)
		}
		for _, e := range list {
			if e.Line < 0 || e.Col < 0 || e.Err == nil {
				t.Fatalf("malformed error %#v", e)
			}
		}
	})
}
