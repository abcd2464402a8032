package main

// The --json output of solve: the plans.Result schema (DESIGN.md §4) with
// keys sorted, lists never null, and every number in a fixed format chosen
// by its key (see output_format.go), so that the same plan always prints the
// same bytes.

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"

	"netstage/plans"
)

// jsonDecimals gives the number of decimals of each numeric key. A key not
// listed here is an integer (years, units, counts) and printed as such;
// jsonScientific keys are printed in scientific notation.
var jsonDecimals = map[string]int{
	// money of the whole plan
	"objective":       objectiveDecimals,
	"bound":           objectiveDecimals,
	"baseline_npv":    objectiveDecimals,
	"incremental_npv": objectiveDecimals,
	"mps_objective":   objectiveDecimals,
	"total_capex":     moneyDecimals,
	// money per row
	"revenue": moneyDecimals, "opex": moneyDecimals, "capex": moneyDecimals,
	"list_capex": moneyDecimals, "depreciation": moneyDecimals, "tax": moneyDecimals,
	"penalty": moneyDecimals, "salvage": moneyDecimals, "net": moneyDecimals,
	"pv": moneyDecimals, "cumulative_pv": moneyDecimals, "budget": moneyDecimals,
	"budget_used": moneyDecimals, "incremental": moneyDecimals,
	"revenue_at_risk": moneyDecimals, "shadow_value": moneyDecimals,
	// traffic and capacity
	"gbps": gbpsDecimals, "capacity_before": gbpsDecimals, "capacity_after": gbpsDecimals,
	"forecast": gbpsDecimals, "served": gbpsDecimals, "committed": gbpsDecimals,
	"unserved": gbpsDecimals, "carried": gbpsDecimals, "shortfall": gbpsDecimals,
	// fractions
	"irr": fractionDecimals, "profitability_index": fractionDecimals,
	"discount_factor": fractionDecimals, "utilisation_before": fractionDecimals,
	"utilisation_after": fractionDecimals, "ceiling": fractionDecimals,
	"seconds": secondsDecimals,
}

// jsonScientific lists keys printed as %.6e (relative gaps span many orders
// of magnitude).
var jsonScientific = map[string]bool{"gap": true}

// jsonListKeys are printed as [] rather than null when empty.
var jsonListKeys = map[string]bool{
	"plan": true, "cashflow": true, "baseline_cashflow": true, "links": true,
	"demands": true, "baseline_shortfall": true, "infeasibility": true, "warnings": true,
}

// jsonAmountDecimals is the precision of InfeasibilityRow.Amount, which is
// Gbps or money depending on the row: enough for both.
const jsonAmountDecimals = gbpsDecimals

// jsonOptions tune the JSON output. The zero value prints everything.
type jsonOptions struct {
	// hideEffort prints 0 for every solver figure (model size, nodes,
	// iterations, seconds): golden tests compare the plan, and these vary
	// with the machine and with every change of the model or solver.
	hideEffort bool
}

// writeJSON prints r as one indented JSON object followed by a newline.
func writeJSON(w io.Writer, r *plans.Result, opts jsonOptions) error {
	raw, err := json.Marshal(r)
	if err != nil {
		return fmt.Errorf("encode result: %w", err)
	}
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.UseNumber()
	var tree map[string]any
	if err := dec.Decode(&tree); err != nil {
		return fmt.Errorf("re-read result: %w", err)
	}
	tree["notice"] = decisionSupportNote
	// The caution printed under the staged plan ("" when no purchase
	// enters service in the horizon's last year).
	tree["horizon_end_note"] = r.HorizonEndNote()
	if opts.hideEffort {
		if s, ok := tree["solver"].(map[string]any); ok {
			for _, k := range []string{"seconds", "nodes", "iterations", "rows", "columns", "integers"} {
				s[k] = json.Number("0")
			}
		}
	}
	if err := formatJSONTree(tree); err != nil {
		return err
	}
	// encoding/json prints map keys sorted, and json.Number verbatim.
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(tree)
}

// formatJSONTree rewrites every number of the object m in place in its
// key's fixed format, recursing into objects and lists.
func formatJSONTree(m map[string]any) error {
	for k, v := range m {
		switch x := v.(type) {
		case nil:
			if jsonListKeys[k] {
				m[k] = []any{}
			}
		case json.Number:
			s, err := formatJSONNumber(k, x)
			if err != nil {
				return err
			}
			m[k] = s
		case map[string]any:
			if err := formatJSONTree(x); err != nil {
				return err
			}
		case []any:
			for _, e := range x {
				if o, ok := e.(map[string]any); ok {
					if err := formatJSONTree(o); err != nil {
						return err
					}
				}
			}
		}
	}
	return nil
}

func formatJSONNumber(key string, n json.Number) (json.Number, error) {
	f, err := n.Float64()
	if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
		return "", fmt.Errorf("result field %q is not a finite number: %s", key, n)
	}
	if jsonScientific[key] {
		return json.Number(fmt.Sprintf("%.6e", f)), nil
	}
	if key == "amount" {
		return json.Number(fixed(f, jsonAmountDecimals)), nil
	}
	if d, ok := jsonDecimals[key]; ok {
		return json.Number(fixed(f, d)), nil
	}
	if f != math.Trunc(f) {
		return "", fmt.Errorf("result field %q has no fixed format for %s", key, n)
	}
	return json.Number(fixed(f, 0)), nil
}
