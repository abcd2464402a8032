package plans

import "testing"

// TestSearchSettings checks the settings Solve gives the search: c-MIR
// cuts from cmirMinHorizon years on and not below (the rule that
// cmirMinHorizon's comment measures; the CBC cross-check of a
// cmirMinHorizon-year case checks only that the answer is right, not
// that the cuts were on), and the rounding and the cut-set separation
// unless the options turn them off.
func TestSearchSettings(t *testing.T) {
	for _, years := range []int{cmirMinHorizon - 1, cmirMinHorizon} {
		c, err := loadSynthetic(t, 4, years, 3)
		if err != nil {
			t.Fatal(err)
		}
		m, err := BuildModel(c, BuildOptions{})
		if err != nil {
			t.Fatal(err)
		}
		set := searchSettings(m, SolveOptions{Gap: 1e-6, NodeLimit: 7})
		if want := years >= cmirMinHorizon; set.CMIR != want {
			t.Errorf("%d years: CMIR %v, want %v", years, set.CMIR, want)
		}
		if set.RelGap != 1e-6 || set.NodeLimit != 7 {
			t.Errorf("%d years: gap %g and node limit %d, want the options' 1e-6 and 7", years, set.RelGap, set.NodeLimit)
		}
		if set.Heuristic == nil || set.Separate == nil {
			t.Errorf("%d years: rounding or cut-set separation missing", years)
		}
		if len(set.Priority) != m.LP.NumCols() {
			t.Errorf("%d years: %d branching priorities for %d columns", years, len(set.Priority), m.LP.NumCols())
		}
		set = searchSettings(m, SolveOptions{NoHeuristic: true, NoSeparation: true})
		if set.Heuristic != nil || set.Separate != nil {
			t.Errorf("%d years: rounding or separation on although the options turn them off", years)
		}
	}
}
