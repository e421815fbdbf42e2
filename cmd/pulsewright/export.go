package main

func (e *env) export(args []string) error { return usageError{"export: not yet"} }
