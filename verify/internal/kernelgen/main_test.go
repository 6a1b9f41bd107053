package main

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
)

// TestKernelsAreUpToDate: the kernels verify compiles are what this
// generator writes now, so a change here cannot be forgotten there (run
// go generate in verify).
func TestKernelsAreUpToDate(t *testing.T) {
	dir := t.TempDir()
	write(filepath.Join(dir, "kernels_scan.go"), writeScanDispatch, writeScan)
	write(filepath.Join(dir, "kernels_leaf.go"), writeLeafDispatch, writeLeaf)
	for _, name := range []string{"kernels_scan.go", "kernels_leaf.go"} {
		want, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		got, err := os.ReadFile(filepath.Join("..", "..", name))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, want) {
			t.Errorf("verify/%s differs from what kernelgen writes: run go generate ./verify", name)
		}
	}
}
