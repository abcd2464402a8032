package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"netstage/plans/demo"
)

// TestCheckVendorRestriction runs check on the demo with its commented-out
// [case.class_vendor] metro = "polaris" switched on. The demo has 10 core
// and 8 metro links: bw-100g (core and metro) is then allowed on the 10 core
// links only, px-100g still on all 18.
func TestCheckVendorRestriction(t *testing.T) {
	dir := t.TempDir()
	if err := os.CopyFS(dir, demo.Files); err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(dir, demo.CaseFile)
	b, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(b), "# [case.class_vendor]\n# metro = \"polaris\"", "[case.class_vendor]\nmetro = \"polaris\"", 1)
	if text == string(b) {
		t.Fatal("test input: the demo case no longer has the commented [case.class_vendor] lines")
	}
	if err := os.WriteFile(file, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errOut := runCLI("check", file)
	if code != exitOK {
		t.Fatalf("exit code: got %d, want %d\n%s", code, exitOK, errOut)
	}
	for _, want := range []string{
		"vendors      metro links only polaris",
		"bw-100g  module  100 Gbps  capex 36,000 + 60/km    opex 1,500/yr  lead 2 mo  fits 10/18 links",
		"fits 18/18 links", // px-100g
		"valid until 2029-12-31 (no orders from 2030)",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
}
