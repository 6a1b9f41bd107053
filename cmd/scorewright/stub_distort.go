package main

// Not built yet: answer with a usage error rather than pretending.
func runDistort(e *env, args []string) error {
	return usagef("distort is not available in this build yet")
}
