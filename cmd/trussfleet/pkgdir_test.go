package main

import (
	"os"
)

// pkgDir is this package's folder, read before any test changes directory.
var pkgDir = func() string {
	wd, _ := os.Getwd()
	return wd
}()
