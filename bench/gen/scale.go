package main

import (
	"fmt"
	"strconv"
	"time"

	"drygrid/grid"
	"drygrid/interp"
)

// scale grids N stations (seed 1, uniform on the sphere, only those
// inside the box widened by the radius kept) onto the box at RES and
// writes the index and band COGs, printing the time taken.
func scale(a []string) error {
	n, err := strconv.Atoi(a[0])
	if err != nil {
		return err
	}
	var f [5]float64
	for i := range f {
		if f[i], err = strconv.ParseFloat(a[1+i], 64); err != nil {
			return err
		}
	}
	spec, err := grid.NewSpec(f[1], f[2], f[3], f[4], f[0])
	if err != nil {
		return err
	}
	pts := points(n, 1)
	p := interp.DefaultParams()
	ip, err := interp.New(pts, p)
	if err != nil {
		return err
	}
	t0 := time.Now()
	valid, err := scaleWrite(ip, spec, a[6])
	if err != nil {
		return err
	}
	fmt.Printf("cells %d stations %d valid %.3f seconds %.3f\n", spec.Len(), n,
		float64(valid)/float64(spec.Len()), time.Since(t0).Seconds())
	return nil
}
