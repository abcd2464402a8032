package main

import (
	"io"

	"github.com/spf13/cobra"
)

// commandConstructors is filled by each command's file in an init function,
// so that commands can be added without touching this file.
var commandConstructors []func(env *cmdEnv) *cobra.Command

// cmdEnv is what every command needs from its surroundings.
type cmdEnv struct {
	stdout io.Writer // results
	stderr io.Writer // diagnostics, warnings and progress
}

func registerCommand(f func(env *cmdEnv) *cobra.Command) {
	commandConstructors = append(commandConstructors, f)
}

func newRootCmd(stdout, stderr io.Writer) *cobra.Command {
	env := &cmdEnv{stdout: stdout, stderr: stderr}
	root := &cobra.Command{
		Use:   "netstage",
		Short: "Plan staged link upgrades that maximise a network's NPV",
		Long: `netstage turns a network, a multi-year traffic forecast with tariffs, a
finance policy and vendor cost catalogs into a staged capex plan: which link
upgrades to buy, on which link, in which year, from which vendor, within the
yearly budget, with the NPV breakdown that justifies it.

Results are decision support: forecasts are uncertain, and capex decisions
need review by finance and engineering under the operator's own policies.`,
		Version:       version,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.SetOut(stdout)
	root.SetErr(stderr)
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return withCode(exitBadInput, err)
	})
	for _, f := range commandConstructors {
		root.AddCommand(f(env))
	}
	return root
}
