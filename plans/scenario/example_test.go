package scenario_test

import (
	"fmt"

	"netstage/plans/scenario"
)

// The grid runs the values in the order given, the first factor outermost;
// scenario j belongs to shard j mod n.
func ExampleGrid() {
	growth, _ := scenario.ParseVary("growth=0.5,1.5")
	tariff, _ := scenario.ParseVary("tariff=0.8,1,1.2")
	grid, err := scenario.NewGrid([]scenario.Factor{growth, tariff})
	if err != nil {
		fmt.Println(err)
		return
	}
	shard, _ := scenario.ParseShard("1/2")
	for j := 0; j < grid.Size(); j++ {
		fmt.Println(j, grid.Point(j), shard.Owns(j))
	}
	// Output:
	// 0 growth=0.5 tariff=0.8 false
	// 1 growth=0.5 tariff=1 true
	// 2 growth=0.5 tariff=1.2 false
	// 3 growth=1.5 tariff=0.8 true
	// 4 growth=1.5 tariff=1 false
	// 5 growth=1.5 tariff=1.2 true
}
