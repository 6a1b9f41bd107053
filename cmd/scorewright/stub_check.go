package main

// Not built yet: answer with a usage error rather than pretending.
func runCheck(e *env, args []string) error { return usagef("check is not available in this build yet") }
