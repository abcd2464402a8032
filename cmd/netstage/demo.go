package main

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"sort"
	"strings"

	"github.com/spf13/cobra"

	"netstage/plans/demo"
)

func init() { registerCommand(newDemoCmd) }

// demoOptions are the inputs of `netstage demo`.
type demoOptions struct {
	dir   string
	force bool
}

// demoHook lets another file of this package offer a different demo case
// (the synthetic generator adds --sites, --years and --seed this way)
// without editing this one. flags adds its flags to the command; write runs
// first and returns handled = false when its flags were not used, so that
// the embedded demo is written instead. A hook should write through
// writeDemoFiles to keep the no-overwrite and rename-into-place rules.
type demoHook struct {
	flags func(cmd *cobra.Command)
	write func(env *cmdEnv, dir string, force bool) (handled bool, err error)
}

var demoHooks []demoHook

// registerDemoHook adds a hook; call it from an init function.
func registerDemoHook(h demoHook) { demoHooks = append(demoHooks, h) }

func newDemoCmd(env *cmdEnv) *cobra.Command {
	opts := &demoOptions{}
	cmd := &cobra.Command{
		Use:   "demo [DIR]",
		Short: "Write the demo case and its catalogs to a directory for editing",
		Long: `Demo writes the embedded demo case (case.toml) and the catalogs it names
(catalogs/*.toml) into DIR (default: the current directory), creating DIR
if needed. It refuses to overwrite existing files unless --force is given.

The demo is an invented regional operator: every name and number in it is
made up. Any command also reads it directly with --demo.`,
		Example: `  netstage demo mycase
  netstage check mycase/case.toml`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.dir = "."
			if len(args) == 1 {
				opts.dir = args[0]
			}
			return runDemo(env, opts)
		},
	}
	cmd.Flags().BoolVar(&opts.force, "force", false, "overwrite existing files")
	for _, h := range demoHooks {
		if h.flags != nil {
			h.flags(cmd)
		}
	}
	return cmd
}

func runDemo(env *cmdEnv, opts *demoOptions) error {
	for _, h := range demoHooks {
		handled, err := h.write(env, opts.dir, opts.force)
		if err != nil || handled {
			return err
		}
	}
	files, err := embeddedDemoFiles()
	if err != nil {
		return withCode(exitFailure, err)
	}
	written, err := writeDemoFiles(opts.dir, files, opts.force)
	if err != nil {
		return err
	}
	for _, p := range written {
		fmt.Fprintln(env.stdout, "wrote", p)
	}
	fmt.Fprintf(env.stdout, "next: netstage check %s\n", filepath.Join(opts.dir, demo.CaseFile))
	return nil
}

// embeddedDemoFiles returns the demo files by slash-separated relative path.
func embeddedDemoFiles() (map[string][]byte, error) {
	files := map[string][]byte{}
	err := fs.WalkDir(demo.Files, ".", func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := fs.ReadFile(demo.Files, p)
		files[p] = b
		return err
	})
	return files, err
}

// writeDemoFiles writes files (slash-separated paths relative to dir) under
// dir, creating directories as needed. Unless force is set it first checks
// that none of them exists and writes nothing if one does (exit code 2).
// Each file goes to a temporary name and is renamed into place. It returns
// the paths written, sorted.
func writeDemoFiles(dir string, files map[string][]byte, force bool) ([]string, error) {
	names := make([]string, 0, len(files))
	for p := range files {
		if !fs.ValidPath(p) {
			return nil, withCode(exitFailure, fmt.Errorf("demo: invalid file name %q", p))
		}
		names = append(names, p)
	}
	sort.Strings(names)
	if !force {
		var existing []string
		for _, p := range names {
			full := filepath.Join(dir, filepath.FromSlash(p))
			if _, err := os.Lstat(full); err == nil {
				existing = append(existing, full)
			} else if !errors.Is(err, fs.ErrNotExist) {
				return nil, withCode(exitFailure, fmt.Errorf("demo: %w", err))
			}
		}
		if len(existing) > 0 {
			return nil, withCode(exitBadInput, fmt.Errorf("demo: not overwriting %s (use --force to replace)", strings.Join(existing, ", ")))
		}
	}
	var written []string
	for _, p := range names {
		full := filepath.Join(dir, filepath.FromSlash(p))
		if err := os.MkdirAll(filepath.Join(dir, filepath.FromSlash(path.Dir(p))), 0o755); err != nil {
			return written, withCode(exitFailure, fmt.Errorf("demo: %w", err))
		}
		if err := writeFileReplacing(full, files[p]); err != nil {
			return written, withCode(exitFailure, fmt.Errorf("demo: %w", err))
		}
		written = append(written, full)
	}
	return written, nil
}
