package geotiff

import (
	"fmt"
	"time"

	"drygrid/internal/pool"

	"github.com/klauspost/compress/zlib"
)

// Options controls the GeoTIFF writer. The zero value is usable: every
// field left at zero takes the default that DefaultOptions documents,
// except Overviews, which is false in the zero value.
type Options struct {
	// TileSize is the tile width and height in pixels; 256 when 0. It must be
	// a multiple of 16 (TIFF 6.0 section 15) and at most 4096.
	TileSize int
	// Level is the DEFLATE level, 1 (fastest) to 9 (smallest); 0 means
	// DefaultLevel.
	Level int
	// Overviews adds internal overviews, halving until the smallest fits in
	// 512 x 512, in the Cloud Optimized GeoTIFF layout (OGC 21-026).
	Overviews bool
	// Workers is the number of goroutines compressing tiles; 0 means
	// runtime.GOMAXPROCS(0). The output bytes do not depend on it.
	Workers int
	// BigTIFF: 0 writes BigTIFF only when a classic TIFF would pass 4 GiB,
	// 1 always writes BigTIFF, -1 never does (an error if it would be needed).
	BigTIFF int
	// Software is written as TIFFTAG_SOFTWARE (tag 305) when not empty.
	Software string
	// DateTime, when not zero, is written as TIFFTAG_DATETIME (tag 306,
	// "YYYY:MM:DD HH:MM:SS", TIFF 6.0 section 8), in the time's own zone:
	// the date the raster describes.
	DateTime time.Time
	// Description and Units, when not empty, are the band's description
	// and unit, written as GDAL_METADATA band items (roles description and
	// unittype), where GDAL reads them as the band description and unit
	// type.
	Description, Units string
	// BandsDescription, when not empty, is the description of band rasters
	// in place of Description. Band rasters get no unit: their values are
	// band codes.
	BandsDescription string
	// SpillDir, when not empty, is where the row encoders
	// (EncodeIndexRows, EncodeIndexBandsRows) keep the compressed
	// tiles beyond the first 32 MiB until the header can be written: a
	// temporary file, removed at the end, instead of memory. The
	// Write...Rows functions spill next to their output when it is empty.
	// The whole-raster encoders ignore it. The output bytes do not depend
	// on it.
	SpillDir string
	// Metadata items are written to the GDAL_METADATA tag (42112), in key
	// order, where gdalinfo lists them (for example a caution line).
	Metadata map[string]string
}

// DefaultLevel is the DEFLATE level used when Options.Level is 0:
// klauspost/compress level 2, a fast level. On the global benchmark field
// (BenchmarkEncodeIndexTIFFGlobal) it gives 18,988,349 bytes, 6.6 % more than
// gdal_translate -of COG with DEFLATE and predictor 3 (17,818,644; GDAL's
// default level 6 with libdeflate), at about a third of GDAL's CPU time.
// Level 1 is a little faster for 0.6 % more bytes (7.2 % over GDAL, too
// close to the 10 % bound); level 6 costs about 40 % more CPU for 4 % fewer.
// (An encoder of byte runs only was twice as fast but 7 % larger on this
// field, 14 % over GDAL: BENCHMARKS.md.)
const DefaultLevel = 2

// Caution is the caution line written into every GeoTIFF by
// DefaultOptions (GDAL_METADATA item CAUTION).
const Caution = "Interpolated estimate from station values, not an official drought declaration; " +
	"defer to the national meteorological or hydrological service and local rules."

// DefaultOptions is the writer's configuration for drygrid's layers:
// 256 x 256 tiles, DefaultLevel, internal overviews (Cloud Optimized),
// all cores, BigTIFF only when needed, Software "drygrid" and the caution.
func DefaultOptions() Options {
	return Options{
		TileSize:  256,
		Level:     DefaultLevel,
		Overviews: true,
		Software:  "drygrid",
		Metadata:  map[string]string{"CAUTION": Caution},
	}
}

// tiffNormalize fills defaults and checks the options.
func tiffNormalize(opt Options) (Options, error) {
	if opt.TileSize == 0 {
		opt.TileSize = 256
	}
	if opt.TileSize < 16 || opt.TileSize > 4096 || opt.TileSize%16 != 0 {
		return opt, fmt.Errorf("geotiff: tile size %d must be a multiple of 16 between 16 and 4096", opt.TileSize)
	}
	if opt.Level == 0 {
		opt.Level = DefaultLevel
	}
	if opt.Level < zlib.BestSpeed || opt.Level > zlib.BestCompression {
		return opt, fmt.Errorf("geotiff: deflate level %d must be between 1 and 9", opt.Level)
	}
	opt.Workers = pool.Workers(opt.Workers)
	if opt.BigTIFF < -1 || opt.BigTIFF > 1 {
		return opt, fmt.Errorf("geotiff: BigTIFF %d must be -1, 0 or 1", opt.BigTIFF)
	}
	return opt, nil
}
