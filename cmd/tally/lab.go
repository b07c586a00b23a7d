package main

import "tally/runtime/lab"

func init() {
	register(command{name: "plan", args: "-ber B [flags]", help: "bits (and time) a BER tester must run to claim BER ≤ B", run: lab.Plan})
	register(command{name: "interval", args: "-errors k -bits n", help: "estimate and confidence interval for a measured count", run: lab.Interval})
}
