package scenario

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"strconv"
	"strings"
)

// Point is one scenario: each varied factor at one value, in the grid's
// factor order. In JSON it is an object whose keys keep that order.
type Point []Setting

// Value returns the value of factor name in p and whether p sets it.
func (p Point) Value(name string) (float64, bool) {
	for _, s := range p {
		if s.Name == name {
			return s.Value, true
		}
	}
	return 0, false
}

// Equal reports whether p and q set the same factors to the same values.
func (p Point) Equal(q Point) bool {
	if len(p) != len(q) {
		return false
	}
	for i := range p {
		if p[i] != q[i] {
			return false
		}
	}
	return true
}

// String formats p as "growth=0.5 tariff=1".
func (p Point) String() string {
	parts := make([]string, len(p))
	for i, s := range p {
		parts[i] = s.Name + "=" + strconv.FormatFloat(s.Value, 'g', -1, 64)
	}
	return strings.Join(parts, " ")
}

// MarshalJSON writes p as an object with its factors in order.
func (p Point) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, s := range p {
		if i > 0 {
			b.WriteByte(',')
		}
		k, _ := json.Marshal(s.Name)
		v, err := json.Marshal(s.Value)
		if err != nil {
			return nil, fmt.Errorf("scenario: factor %s: %w", s.Name, err)
		}
		b.Write(k)
		b.WriteByte(':')
		b.Write(v)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// UnmarshalJSON reads an object written by MarshalJSON, keeping key order.
func (p *Point) UnmarshalJSON(data []byte) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	tok, err := dec.Token()
	if err != nil {
		return err
	}
	if d, ok := tok.(json.Delim); !ok || d != '{' {
		return fmt.Errorf("scenario: factors: want an object")
	}
	var out Point
	for dec.More() {
		tok, err := dec.Token()
		if err != nil {
			return err
		}
		name, _ := tok.(string)
		var v float64
		if err := dec.Decode(&v); err != nil {
			return fmt.Errorf("scenario: factor %s: %w", name, err)
		}
		out = append(out, Setting{Name: name, Value: v})
	}
	if _, err := dec.Token(); err != nil {
		return err
	}
	*p = out
	return nil
}

// Grid is the product of its factors' values, the first factor outermost.
type Grid struct {
	Factors []Factor
}

// NewGrid checks the factors (known names, each at most once, at least one
// value) and returns their grid.
func NewGrid(factors []Factor) (Grid, error) {
	seen := map[string]bool{}
	for _, f := range factors {
		if !knownFactor(f.Name) {
			return Grid{}, fmt.Errorf("scenario: %w %q", ErrUnknownFactor, f.Name)
		}
		if seen[f.Name] {
			return Grid{}, fmt.Errorf("scenario: factor %s is varied twice: give all its values in one --vary", f.Name)
		}
		seen[f.Name] = true
		if len(f.Values) == 0 {
			return Grid{}, fmt.Errorf("scenario: factor %s has no values", f.Name)
		}
		for _, v := range f.Values {
			if err := checkValue(f.Name, v); err != nil {
				return Grid{}, err
			}
		}
	}
	return Grid{Factors: factors}, nil
}

// DefaultMaxScenarios is the largest grid a sweep solves unless told
// otherwise (Options.MaxScenarios, `sweep --max-scenarios`): ten thousand
// solves of even a small case take hours, and a grid grows as the product
// of its value lists, so a larger one is far more often a slip than a plan.
const DefaultMaxScenarios = 10000

// ErrGridTooLarge is wrapped by CheckSize's error.
var ErrGridTooLarge = errors.New("scenario: the grid is too large")

// CheckSize returns an error wrapping ErrGridTooLarge when the grid has more
// than limit points, saying how large it is and how that size comes about.
// limit ≤ 0 means DefaultMaxScenarios. The cap counts the whole grid, not a
// shard's share: every shard must agree on the grid, and merging the shares
// builds the whole grid's report. Cost O(len(Factors)).
func (g Grid) CheckSize(limit int) error {
	if limit <= 0 {
		limit = DefaultMaxScenarios
	}
	// The product in floating point: exact far beyond any cap, and it
	// cannot overflow as an int product of long value lists could.
	size := 1.0
	parts := make([]string, len(g.Factors))
	for k, f := range g.Factors {
		size *= float64(len(f.Values))
		parts[k] = fmt.Sprintf("%s %d", f.Name, len(f.Values))
	}
	if size <= float64(limit) {
		return nil
	}
	return fmt.Errorf("%w: %s scenarios (the product of the value counts: %s), over the cap of %s: "+
		"give fewer values, or raise the cap with --max-scenarios %s; the cap counts the whole grid, "+
		"also when --shard spreads it over machines", ErrGridTooLarge,
		countText(size), strings.Join(parts, " × "), countText(float64(limit)), strconv.FormatFloat(size, 'f', 0, 64))
}

// countText formats a count with thousands separators (1e18 and more in
// scientific notation).
func countText(v float64) string {
	if v >= 1e18 {
		return strconv.FormatFloat(v, 'g', 3, 64)
	}
	s := strconv.FormatInt(int64(v), 10)
	var b strings.Builder
	for i, r := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteRune(r)
	}
	return b.String()
}

// Size returns the number of grid points (1 for a grid with no factor).
func (g Grid) Size() int {
	n := 1
	for _, f := range g.Factors {
		n *= len(f.Values)
	}
	return n
}

// Point returns grid point j, 0 ≤ j < Size(): the last factor changes
// fastest. Cost O(len(Factors)).
func (g Grid) Point(j int) Point {
	if j < 0 || j >= g.Size() {
		panic(fmt.Sprintf("scenario: grid point %d out of range [0, %d)", j, g.Size()))
	}
	p := make(Point, len(g.Factors))
	for k := len(g.Factors) - 1; k >= 0; k-- {
		f := g.Factors[k]
		n := len(f.Values)
		p[k] = Setting{Name: f.Name, Value: f.Values[j%n]}
		j /= n
	}
	return p
}

// Index returns the index of p in the grid, or −1.
func (g Grid) Index(p Point) int {
	if len(p) != len(g.Factors) {
		return -1
	}
	j := 0
	for k, f := range g.Factors {
		if p[k].Name != f.Name {
			return -1
		}
		pos := -1
		for i, v := range f.Values {
			if v == p[k].Value {
				pos = i
				break
			}
		}
		if pos < 0 {
			return -1
		}
		j = j*len(f.Values) + pos
	}
	return j
}

// Base returns the point with every factor at its base value, given those
// values in factor order.
func (g Grid) base(baseValues []float64) Point {
	p := make(Point, len(g.Factors))
	for k, f := range g.Factors {
		p[k] = Setting{Name: f.Name, Value: baseValues[k]}
	}
	return p
}

// References returns the reference points that are not grid points, in a
// fixed order: the base first, then for each factor in order each of its
// values with the other factors at base. Each appears once.
func (g Grid) references(baseValues []float64) []Point {
	var out []Point
	add := func(p Point) {
		if g.Index(p) >= 0 {
			return
		}
		for _, q := range out {
			if q.Equal(p) {
				return
			}
		}
		out = append(out, p)
	}
	base := g.base(baseValues)
	add(base)
	for k, f := range g.Factors {
		for _, v := range f.Values {
			p := append(Point(nil), base...)
			p[k].Value = v
			add(p)
		}
	}
	return out
}

// Shard selects a share of a sweep's scenarios: scenario j belongs to shard
// j mod Of. The zero value selects everything.
type Shard struct {
	Index, Of int
}

// ParseShard parses "i/n" with 0 ≤ i < n.
func ParseShard(s string) (Shard, error) {
	a, b, ok := strings.Cut(s, "/")
	i, err1 := strconv.Atoi(strings.TrimSpace(a))
	n, err2 := strconv.Atoi(strings.TrimSpace(b))
	if !ok || err1 != nil || err2 != nil || n < 1 || i < 0 || i >= n {
		return Shard{}, fmt.Errorf("scenario: shard %q: want i/n with 0 ≤ i < n (i counts from 0)", s)
	}
	return Shard{Index: i, Of: n}, nil
}

// Owns reports whether scenario j belongs to the shard.
func (s Shard) Owns(j int) bool {
	if s.Of <= 1 {
		return true
	}
	return j%s.Of == s.Index
}

// String formats s as "i/n".
func (s Shard) String() string { return fmt.Sprintf("%d/%d", s.Index, s.Of) }
