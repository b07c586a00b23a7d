package engine

import (
	"fmt"

	"tally/blocks/link"
)

// checkVariants is checkInstances for a paired link (link.Paired): each variant of the two
// links is checked as a link of its own, its further instances taken from new builds.
func checkVariants(s Spec, first, second *link.Link) error {
	a, b := first.Variants(), second.Variants()
	names := first.VariantNames()
	if len(a) != len(b) {
		return fmt.Errorf("the Link function built %d and %d variants for %s: it must build the same link every time", len(a), len(b), s.name())
	}
	for v := range a {
		sub := s
		sub.Label = s.Label + ", variant " + names[v]
		sub.Build = func() (*link.Link, error) {
			l, err := s.Build()
			if err != nil {
				return nil, err
			}
			if len(l.Variants()) != len(a) {
				return nil, fmt.Errorf("the Link function built links of different lengths for %s: it must build the same link every time", s.name())
			}
			return l.Variants()[v], nil
		}
		if err := checkInstances(sub, a[v], b[v]); err != nil {
			return err
		}
	}
	return nil
}
