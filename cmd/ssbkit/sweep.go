package main

import "errors"

func runSweep(e *env, args []string) error {
	return errors.New("not built yet in this version")
}
