package main

// The synthetic half of the demo command: `netstage demo --sites N
// [--years T] [--seed S] DIR` writes an invented case of that size
// (plans.Synthetic) instead of the embedded demo.

import (
	"errors"
	"fmt"
	"path/filepath"

	"github.com/spf13/cobra"

	"netstage/plans"
)

// Defaults of the synthetic demo's size flags.
const (
	defaultSynthYears = 5
	defaultSynthSeed  = 1
)

func init() {
	var (
		cmd   *cobra.Command
		sites int
		years int
		seed  int64
	)
	registerDemoHook(demoHook{
		flags: func(c *cobra.Command) {
			cmd = c
			f := c.Flags()
			f.IntVar(&sites, "sites", 0, "write a synthetic case with `N` sites instead of the demo (random network, gravity-model demands; benchmark sizes: 10, 25, 50 sites over 5, 7, 10 years)")
			f.IntVar(&years, "years", defaultSynthYears, "horizon of the synthetic case: `T` years (with --sites)")
			f.Int64Var(&seed, "seed", defaultSynthSeed, "random seed `S` of the synthetic case (with --sites); same seed, same case")
		},
		write: func(env *cmdEnv, dir string, force bool) (bool, error) {
			f := cmd.Flags()
			if !f.Changed("sites") {
				if f.Changed("years") || f.Changed("seed") {
					return true, withCode(exitBadInput, errors.New("--years and --seed need --sites N (a synthetic case)"))
				}
				return false, nil
			}
			return true, writeSyntheticDemo(env, dir, sites, years, seed, force)
		},
	})
}

// writeSyntheticDemo generates the synthetic case and writes its files into
// dir under the demo command's rules (no overwrite without force, temporary
// names renamed into place).
func writeSyntheticDemo(env *cmdEnv, dir string, sites, years int, seed int64, force bool) error {
	generated, err := plans.Synthetic(sites, years, seed)
	if err != nil {
		return withCode(exitBadInput, err)
	}
	files := make(map[string][]byte, len(generated))
	for _, f := range generated {
		files[f.Name] = f.Data
	}
	written, err := writeDemoFiles(dir, files, force)
	if err != nil {
		return err
	}
	for _, p := range written {
		fmt.Fprintln(env.stdout, "wrote", p)
	}
	fmt.Fprintf(env.stdout, "next: netstage check %s\n", filepath.Join(dir, generated[0].Name))
	return nil
}
