package history

import "ergostock/inventory"

// The constructors of the candidate distributions, as interface values.

func newPoisson(m float64) (inventory.Distribution, error) {
	d, err := inventory.NewPoisson(m)
	if err != nil {
		return nil, err
	}
	return d, nil
}

func newNegBin(m, v float64) (inventory.Distribution, error) {
	d, err := inventory.NewNegBin(m, v)
	if err != nil {
		return nil, err
	}
	return d, nil
}

func newNormal(m, sd float64) (inventory.Distribution, error) {
	d, err := inventory.NewNormal(m, sd)
	if err != nil {
		return nil, err
	}
	return d, nil
}

func newGamma(m, sd float64) (inventory.Distribution, error) {
	d, err := inventory.NewGamma(m, sd)
	if err != nil {
		return nil, err
	}
	return d, nil
}

func newPMF(p []float64) (inventory.Distribution, error) {
	d, err := inventory.NewPMF(p)
	if err != nil {
		return nil, err
	}
	return d, nil
}
