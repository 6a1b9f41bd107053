package main

// Not built yet: answer with a usage error rather than pretending.
func runOpen(e *env, args []string) error { return usagef("open is not available in this build yet") }
