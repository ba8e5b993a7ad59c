//go:build !(linux || darwin || freebsd || netbsd || openbsd || dragonfly)

package main

// limitCore does nothing where core-dump limits are not set this way.
func limitCore() {}
