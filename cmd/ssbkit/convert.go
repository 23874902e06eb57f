package main

import "errors"

func runConvert(e *env, args []string) error {
	return errors.New("not built yet in this version")
}
