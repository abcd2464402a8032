package scenario

import (
	"fmt"
	"math"
	"sort"
)

// Report is the result of a whole sweep: the JSON of `sweep --json` and
// what the terminal tables show.
type Report struct {
	Case string   `json:"case"`
	Vary []Factor `json:"vary"`
	// Settings are the solve settings the sweep ran with.
	Settings   string `json:"settings"`
	RegretNote string `json:"regret_note"`
	// Base is the base point's record.
	Base Record `json:"base"`
	// Scenarios are the grid points in grid order.
	Scenarios []Record `json:"scenarios"`
	// Tornado has one bar per factor with two or more values, widest swing
	// first.
	Tornado []TornadoBar `json:"tornado"`
	// BudgetFrontier is set when the sweep varies the budget.
	BudgetFrontier []FrontierPoint `json:"budget_frontier"`
	// References are the reference points off the grid (tornado and
	// frontier points), for completeness.
	References []Record `json:"references"`
}

// TornadoBar is one factor moved alone from its lowest to its highest value,
// the others at base.
type TornadoBar struct {
	Factor string  `json:"factor"`
	Low    float64 `json:"low"`
	High   float64 `json:"high"`
	// LowNPV and HighNPV are nil where that scenario has no plan.
	LowNPV  *float64 `json:"low_npv"`
	HighNPV *float64 `json:"high_npv"`
	BaseNPV *float64 `json:"base_npv"`
	// Swing is |HighNPV − LowNPV|; nil when an end has no plan (such bars
	// sort first: losing the plan is the largest swing).
	Swing *float64 `json:"swing"`
	// LowStatus and HighStatus are the statuses of the two ends' solves
	// (a plans.Status, or StatusError): why an end has no NPV.
	LowStatus  string `json:"low_status"`
	HighStatus string `json:"high_status"`
}

// newTornadoBar is the bar of factor name from the records of its low end,
// its high end and the base.
func newTornadoBar(name string, lo, hi float64, rl, rh, base *Record) TornadoBar {
	bar := TornadoBar{Factor: name, Low: lo, High: hi, LowNPV: rl.Objective, HighNPV: rh.Objective, BaseNPV: base.Objective,
		LowStatus: rl.Status, HighStatus: rh.Status}
	if rl.Objective != nil && rh.Objective != nil {
		s := math.Abs(*rh.Objective - *rl.Objective)
		bar.Swing = &s
	}
	return bar
}

// sortTornado puts the widest swing first, bars with an end without a plan
// before all others; ties keep their order.
func sortTornado(bars []TornadoBar) {
	sort.SliceStable(bars, func(a, b int) bool {
		sa, sb := bars[a].Swing, bars[b].Swing
		if sa == nil || sb == nil {
			return sa == nil && sb != nil
		}
		return *sa > *sb
	})
}

// FrontierPoint is the sweep's base point with the budget at one multiplier.
type FrontierPoint struct {
	Multiplier float64  `json:"multiplier"`
	Cap        *float64 `json:"cap"` // total capex cap over the horizon; nil when uncapped
	NPV        *float64 `json:"npv"`
	Capex      float64  `json:"capex"`
	// PerMillion is what one more million of cap buys: the NPV gained per
	// 1,000,000 of extra cap since the previous (smaller) budget; nil for
	// the first point or where either point has no plan or no cap.
	PerMillion *float64 `json:"npv_per_million"`
}

// BuildReport builds the report of a complete sweep (an unsharded Output
// or the result of Merge).
func BuildReport(out *Output) (*Report, error) {
	h := out.Header
	if h.Shards > 1 {
		return nil, fmt.Errorf("scenario: shard %d/%d is only part of the sweep: merge the shards first", h.Shard, h.Shards)
	}
	if len(out.Records) != h.GridSize+h.References {
		return nil, fmt.Errorf("scenario: sweep has %d scenarios, want %d", len(out.Records), h.GridSize+h.References)
	}
	rep := &Report{Case: h.Case, Vary: h.Vary, Settings: h.Settings, RegretNote: RegretNote,
		Scenarios: []Record{}, References: []Record{}, Tornado: []TornadoBar{}, BudgetFrontier: []FrontierPoint{}}
	find := func(p Point) *Record {
		for i := range out.Records {
			if out.Records[i].Factors.Equal(p) {
				return &out.Records[i]
			}
		}
		return nil
	}
	for i, r := range out.Records {
		if r.Index != i {
			return nil, fmt.Errorf("scenario: records out of order at %d", i)
		}
		if i < h.GridSize {
			rep.Scenarios = append(rep.Scenarios, r)
		} else {
			rep.References = append(rep.References, r)
		}
	}
	base := find(h.Base)
	if base == nil {
		return nil, fmt.Errorf("scenario: the base point %s is missing", h.Base)
	}
	rep.Base = *base
	at := func(k int, v float64) *Record {
		p := append(Point(nil), h.Base...)
		p[k].Value = v
		return find(p)
	}
	for k, f := range h.Vary {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, v := range f.Values {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		if lo == hi {
			continue
		}
		rl, rh := at(k, lo), at(k, hi)
		if rl == nil || rh == nil {
			return nil, fmt.Errorf("scenario: tornado point of %s is missing", f.Name)
		}
		rep.Tornado = append(rep.Tornado, newTornadoBar(f.Name, lo, hi, rl, rh, base))
	}
	sortTornado(rep.Tornado)
	for k, f := range h.Vary {
		if f.Name != Budget {
			continue
		}
		values := append([]float64(nil), f.Values...)
		sort.Float64s(values)
		var prev *FrontierPoint
		for i, v := range values {
			if i > 0 && v == values[i-1] {
				continue
			}
			r := at(k, v)
			if r == nil {
				return nil, fmt.Errorf("scenario: budget frontier point %g is missing", v)
			}
			fp := FrontierPoint{Multiplier: v, Cap: r.BudgetCap, NPV: r.Objective, Capex: r.Capex}
			if prev != nil && prev.NPV != nil && fp.NPV != nil && prev.Cap != nil && fp.Cap != nil && *fp.Cap > *prev.Cap {
				m := (*fp.NPV - *prev.NPV) / (*fp.Cap - *prev.Cap) * 1e6
				fp.PerMillion = &m
			}
			rep.BudgetFrontier = append(rep.BudgetFrontier, fp)
			prev = &fp
		}
	}
	return rep, nil
}
