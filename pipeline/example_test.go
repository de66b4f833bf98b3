package pipeline_test

import (
	"context"
	"fmt"
	"log"
	"os"
	"path/filepath"
	"strings"

	"drygrid/pipeline"
)

// Example runs the whole job on the worked example's station SPI: a 0.1 deg
// grid over the stations' extent, the rasters and the band polygons, the
// manifest, published into a new directory.
func Example() {
	dir, err := os.MkdirTemp("", "drygrid-example-")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)

	job := pipeline.NewJob("../testdata/example/spi.csv", filepath.Join(dir, "layers"))
	job.Layers, _ = pipeline.ParseLayers("index,bands,geojson")
	res, err := pipeline.Run(context.Background(), job)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%d stations, %d x %d cells\n", len(res.Values.Stations), res.Spec.Cols, res.Spec.Rows)
	fmt.Printf("in drought: %.0f%% of the covered area\n", res.InDroughtPct)
	fmt.Println(strings.Join(res.Files, " "))
	// Output:
	// 12 stations, 101 x 75 cells
	// in drought: 25% of the covered area
	// bands.geojson bands.tif bands.tif.aux.xml index.tif manifest.json
}
