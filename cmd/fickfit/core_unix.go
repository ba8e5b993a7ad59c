//go:build linux || darwin || freebsd || netbsd || openbsd || dragonfly

package main

import "syscall"

// limitCore turns core dumps off: a crash of a process holding gigabytes
// must not write a core file of that size into the user's (data) folder.
func limitCore() {
	var lim syscall.Rlimit
	if syscall.Getrlimit(syscall.RLIMIT_CORE, &lim) == nil && lim.Cur != 0 {
		lim.Cur = 0
		_ = syscall.Setrlimit(syscall.RLIMIT_CORE, &lim)
	}
}
