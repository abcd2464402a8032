package plans

import (
	"math"
	"slices"
	"strings"
)

// Route is one path a demand's traffic takes in one year, in the direction
// from its From site to its To site (the other direction takes its own
// routes, as full-duplex links carry each direction separately; in the
// plans netstage computes the two usually mirror each other).
type Route struct {
	Demand string   `json:"demand"`
	Year   int      `json:"year"`
	From   string   `json:"from"`
	To     string   `json:"to"`
	Links  []string `json:"links"` // link ids from From to To
	Gbps   float64  `json:"gbps"`
}

// routes splits the source-aggregated flows of x into paths, one list per
// demand and year, for the demand's direction from A to B (commodity A).
// The flows come from the LP that minimises Gbps·km at the plan's NPV, so
// they carry no loops of positive length; the stripping still guards
// against a loop of zero-length links by marking visited sites. Paths
// below valueTol Gbps are dropped. Cost O(demands·T·paths·arcs).
func (m *Model) routes(x []float64) []Route {
	c := m.Case
	nArcs := 2 * len(c.Links)
	var out []Route
	for t := 0; t < c.Horizon; t++ {
		for si, s := range m.sources {
			left := make([]float64, nArcs)
			for a := range nArcs {
				if j := m.flow[si][a][t]; j >= 0 {
					left[a] = x[j]
				}
			}
			for k, d := range c.Demands {
				if d.A != s {
					continue
				}
				need := x[m.served[k][t]]
				for need > valueTol {
					path, gbps := m.stripPath(left, s, d.B)
					if path == nil {
						break // the flows do not add up: leave the rest unrouted
					}
					gbps = math.Min(gbps, need)
					ids := make([]string, len(path))
					for i, a := range path {
						left[a] -= gbps
						ids[i] = c.Links[a/2].ID
					}
					need -= gbps
					out = append(out, Route{Demand: d.ID, Year: c.Year(t), From: c.Sites[d.A].ID, To: c.Sites[d.B].ID, Links: ids, Gbps: gbps})
				}
			}
		}
	}
	// Per demand and year, the widest path first.
	slices.SortStableFunc(out, func(a, b Route) int {
		if a.Demand != b.Demand {
			return strings.Compare(a.Demand, b.Demand)
		}
		if a.Year != b.Year {
			return a.Year - b.Year
		}
		switch {
		case a.Gbps > b.Gbps:
			return -1
		case a.Gbps < b.Gbps:
			return 1
		}
		return 0
	})
	return out
}

// stripPath finds a path from s to v over arcs with more than valueTol
// Gbps left, by depth-first search preferring the fullest arc, and
// returns its arcs and its bottleneck (nil when there is none).
func (m *Model) stripPath(left []float64, s, v int) ([]int, float64) {
	c := m.Case
	visited := make([]bool, len(c.Sites))
	var path []int
	var dfs func(u int) bool
	dfs = func(u int) bool {
		if u == v {
			return true
		}
		visited[u] = true
		for {
			best := -1
			for a := range left {
				from, to := m.arcEnds(a)
				if from == u && !visited[to] && left[a] > valueTol && (best < 0 || left[a] > left[best]) {
					best = a
				}
			}
			if best < 0 {
				return false
			}
			_, to := m.arcEnds(best)
			path = append(path, best)
			if dfs(to) {
				return true
			}
			path = path[:len(path)-1]
			visited[to] = true // a dead end: do not try it again
		}
	}
	if !dfs(s) {
		return nil, 0
	}
	gbps := math.Inf(1)
	for _, a := range path {
		gbps = math.Min(gbps, left[a])
	}
	return path, gbps
}
