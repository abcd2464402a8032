package plans

import (
	"strings"
	"testing"
)

// TestModelSize checks the column and row counts documented on Model and
// in doc_model.go against a synthetic case: flows |S|·(A − arcs into the
// source)·T, conservation |S|·(n − 1)·T, capacity A·T, served K·T, and at
// most (links × fitting items)·T unit columns.
func TestModelSize(t *testing.T) {
	c, err := loadSynthetic(t, 6, 4, 3)
	if err != nil {
		t.Fatal(err)
	}
	m, err := BuildModel(c, BuildOptions{})
	if err != nil {
		t.Fatal(err)
	}
	count := func(names []string, prefix string) int {
		n := 0
		for _, s := range names {
			if strings.HasPrefix(s, prefix) {
				n++
			}
		}
		return n
	}
	T, A := c.Horizon, 2*len(c.Links)
	src := map[int]bool{}
	for _, d := range c.Demands {
		src[d.A], src[d.B] = true, true
	}
	wantFlows := 0
	for s := range src {
		into := 0
		for _, l := range c.Links {
			if l.A == s || l.B == s {
				into++
			}
		}
		wantFlows += (A - into) * T
	}
	units := 0
	for _, l := range c.Links {
		units += len(l.Items) * T
	}
	for _, tc := range []struct {
		what      string
		got, want int
		atMost    bool
	}{
		{"flow columns", count(m.LP.ColName, "f_"), wantFlows, false},
		{"served columns", count(m.LP.ColName, "x_"), len(c.Demands) * T, false},
		{"conservation rows", count(m.LP.RowName, "c_"), len(src) * (len(c.Sites) - 1) * T, false},
		{"capacity rows", count(m.LP.RowName, "cap_"), A * T, false},
		{"unit columns", count(m.LP.ColName, "y_"), units, true},
		{"cut-set rows", count(m.LP.RowName, "cut_"), 6 * (3*len(c.Sites) + len(c.Links)) * T, true},
	} {
		if tc.atMost && tc.got > tc.want || !tc.atMost && tc.got != tc.want {
			t.Errorf("%s: %d, want %s%d", tc.what, tc.got, map[bool]string{true: "at most ", false: ""}[tc.atMost], tc.want)
		}
	}
}
