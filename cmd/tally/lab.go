package main

import "tally/runtime/lab"

func init() {
	register(command{name: "plan", args: "-ber B [flags]", help: "bits (and time) a BER tester must run to claim BER ≤ B", run: lab.Plan})
	register(command{name: "interval", args: "-errors k -bits n", help: "estimate, two-sided interval and one-sided limit for a measured count; with -ber, the verdict", run: lab.Interval})
}
