package main

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime/pprof"
	"strconv"
	"strings"

	"drygrid/bands"
	"drygrid/geotiff"
	"drygrid/grid"
	"drygrid/interp"
	"drygrid/layer/geojson"
	"drygrid/publish"
	"drygrid/station"
)

func main() {
	// DRYGRID_CPUPROFILE=FILE writes a pprof CPU profile of the run.
	if path := os.Getenv("DRYGRID_CPUPROFILE"); path != "" {
		f, err := os.Create(path)
		if err == nil && pprof.StartCPUProfile(f) == nil {
			defer f.Close()
			defer pprof.StopCPUProfile()
		}
	}
	if err := run(os.Args[1:]); err != nil {
		pprof.StopCPUProfile()
		fmt.Fprintln(os.Stderr, "gen:", err)
		os.Exit(1)
	}
}

func run(a []string) error {
	if len(a) == 0 {
		return fmt.Errorf("usage: gen stations|totals|polygonize|cog|scale ...")
	}
	switch {
	case a[0] == "stations" && len(a) == 4:
		n, err := strconv.Atoi(a[1])
		if err != nil {
			return err
		}
		seed, err := strconv.ParseUint(a[2], 10, 64)
		if err != nil {
			return err
		}
		return genStations(n, seed, a[3])
	case a[0] == "totals" && len(a) == 4:
		n, err := strconv.Atoi(a[1])
		if err != nil {
			return err
		}
		years, err := strconv.Atoi(a[2])
		if err != nil {
			return err
		}
		return genTotals(n, years, a[3])
	case a[0] == "polygonize" && len(a) == 3:
		return polygonize(a[1], a[2])
	case a[0] == "raw" && len(a) == 3:
		return raw(a[1], a[2])
	case a[0] == "cog" && len(a) == 3:
		return cog(a[1], a[2])
	case a[0] == "index" && len(a) == 4:
		res, err := station.ComputeIndex(a[1], a[2], station.IndexOptions{})
		if err != nil {
			return err
		}
		return publish.WriteFile(a[3], func(w *bufio.Writer) error { return station.WriteIndexCSV(w, res) })
	case a[0] == "scale" && len(a) == 8:
		return scale(a[1:])
	}
	return fmt.Errorf("bad arguments %q", a)
}

// field is the invented smooth SPI field, in about [-2.5, 2.5].
func field(lon, lat float64) float64 {
	d := math.Pi / 180
	return 1.6*math.Sin(3*lon*d)*math.Cos(2*lat*d) + 0.8*math.Sin(5*lat*d+lon*d)
}

// points draws n stations uniformly on the sphere (longitude uniform, sine
// of latitude uniform) with the field plus noise as value.
func points(n int, seed uint64) []interp.Point {
	r := rand.New(rand.NewPCG(seed, 8))
	pts := make([]interp.Point, n)
	for i := range pts {
		lon := r.Float64()*360 - 180
		lat := math.Asin(2*r.Float64()-1) * 180 / math.Pi
		z := field(lon, lat) + 0.4*r.NormFloat64()
		pts[i] = interp.Point{Lon: lon, Lat: lat, Z: max(-3, min(3, z))}
	}
	return pts
}

func genStations(n int, seed uint64, out string) error {
	pts := points(n, seed)
	err := writeFile(out, func(w *bufio.Writer) error {
		w.WriteString("station,latitude,longitude,spi\n")
		for i, p := range pts {
			fmt.Fprintf(w, "S%07d,%.5f,%.5f,%.3f\n", i+1, p.Lat, p.Lon, p.Z)
		}
		return nil
	})
	if err != nil {
		return err
	}
	csvt := out[:len(out)-len(filepath.Ext(out))] + ".csvt"
	if err := os.WriteFile(csvt, []byte("String,Real,Real,Real\n"), 0o644); err != nil {
		return err
	}
	layer := filepath.Base(out[:len(out)-len(filepath.Ext(out))])
	vrt := fmt.Sprintf(`<OGRVRTDataSource>
  <OGRVRTLayer name="%s">
    <SrcDataSource relativeToVRT="1">%s</SrcDataSource>
    <GeometryType>wkbPoint</GeometryType>
    <LayerSRS>EPSG:4326</LayerSRS>
    <GeometryField encoding="PointFromColumns" x="longitude" y="latitude"/>
  </OGRVRTLayer>
</OGRVRTDataSource>
`, layer, filepath.Base(out))
	return os.WriteFile(out[:len(out)-len(filepath.Ext(out))]+".vrt", []byte(vrt), 0o644)
}

func genTotals(n, years int, dir string) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	pts := points(n, 2)
	err := writeFile(filepath.Join(dir, "stations.csv"), func(w *bufio.Writer) error {
		w.WriteString("station,latitude,longitude\n")
		for i, p := range pts {
			fmt.Fprintf(w, "S%07d,%.5f,%.5f\n", i+1, p.Lat, p.Lon)
		}
		return nil
	})
	if err != nil {
		return err
	}
	r := rand.New(rand.NewPCG(3, 8))
	return writeFile(filepath.Join(dir, "totals.csv"), func(w *bufio.Writer) error {
		w.WriteString("station,year,total\n")
		b := make([]byte, 0, 64)
		for i := range pts {
			shape := 0.5 + 8*r.Float64()
			sc := 10 + 50*r.Float64()
			for y := range years {
				x := 0.0
				if r.Float64() >= 0.05 {
					x = gammaDraw(r, shape) * sc
				}
				b = b[:0]
				b = fmt.Appendf(b, "S%07d,%d,", i+1, 2025-years+1+y)
				b = strconv.AppendFloat(b, math.Round(x*10)/10, 'f', 1, 64)
				b = append(b, '\n')
				w.Write(b)
			}
		}
		return nil
	})
}

// gammaDraw is a Gamma(shape, 1) variate by Marsaglia and Tsang (2000),
// with the shape < 1 boost x * U^(1/shape).
func gammaDraw(r *rand.Rand, shape float64) float64 {
	boost := 1.0
	if shape < 1 {
		boost = math.Pow(r.Float64(), 1/shape)
		shape++
	}
	d := shape - 1.0/3
	c := 1 / math.Sqrt(9*d)
	for {
		x := r.NormFloat64()
		v := 1 + c*x
		if v <= 0 {
			continue
		}
		v = v * v * v
		u := r.Float64()
		if math.Log(u) < 0.5*x*x+d-d*v+d*math.Log(v) {
			return d * v * boost
		}
	}
}

func polygonize(in, out string) error {
	r, err := geotiff.ReadBands(in)
	if err != nil {
		return err
	}
	return writeFile(out, func(w *bufio.Writer) error {
		return geojson.EncodeBands(w, r, bands.Default(), geojson.Options{})
	})
}

// cog writes an index raster as a COG: from a GeoTIFF, or from the raw
// little-endian float32 file IN.f32 that gen raw made (its grid in IN.f32.spec).
func cog(in, out string) error {
	var r *grid.Float32
	var err error
	if strings.HasSuffix(in, ".f32") {
		r, err = readRaw(in)
	} else {
		r, err = geotiff.ReadIndex(in)
	}
	if err != nil {
		return err
	}
	return geotiff.WriteIndex(out, r, geotiff.DefaultOptions())
}

// raw writes the index GeoTIFF in as raw float32 OUT.f32, its grid as
// OUT.f32.spec and a GDAL VRT OUT.vrt over the raw file (so that GDAL and
// drygrid both encode from the same uncompressed pixels).
func raw(in, out string) error {
	r, err := geotiff.ReadIndex(in)
	if err != nil {
		return err
	}
	b := make([]byte, 4*len(r.Data))
	for i, v := range r.Data {
		binary.LittleEndian.PutUint32(b[4*i:], math.Float32bits(v))
	}
	if err := os.WriteFile(out, b, 0o644); err != nil {
		return err
	}
	s := r.Spec
	spec := fmt.Sprintf("%d %d %.17g %.17g %.17g\n", s.Cols, s.Rows, s.West, s.North, s.Res)
	if err := os.WriteFile(out+".spec", []byte(spec), 0o644); err != nil {
		return err
	}
	vrt := fmt.Sprintf(`<VRTDataset rasterXSize="%d" rasterYSize="%d">
  <SRS>EPSG:4326</SRS>
  <GeoTransform>%.17g, %.17g, 0, %.17g, 0, %.17g</GeoTransform>
  <VRTRasterBand dataType="Float32" band="1" subClass="VRTRawRasterBand">
    <NoDataValue>-9999</NoDataValue>
    <SourceFilename relativeToVRT="1">%s</SourceFilename>
    <ImageOffset>0</ImageOffset>
    <PixelOffset>4</PixelOffset>
    <LineOffset>%d</LineOffset>
    <ByteOrder>LSB</ByteOrder>
  </VRTRasterBand>
</VRTDataset>
`, s.Cols, s.Rows, s.West, s.Res, s.North, -s.Res, filepath.Base(out), 4*s.Cols)
	return os.WriteFile(strings.TrimSuffix(out, ".f32")+".vrt", []byte(vrt), 0o644)
}

func readRaw(path string) (*grid.Float32, error) {
	sp, err := os.ReadFile(path + ".spec")
	if err != nil {
		return nil, err
	}
	var s grid.Spec
	if _, err := fmt.Sscan(string(sp), &s.Cols, &s.Rows, &s.West, &s.North, &s.Res); err != nil {
		return nil, fmt.Errorf("%s.spec: %w", path, err)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	if len(b) != 4*s.Len() {
		return nil, fmt.Errorf("%s: %d bytes for a %d x %d grid", path, len(b), s.Cols, s.Rows)
	}
	r := grid.NewFloat32(s, grid.NoDataIndex)
	for i := range r.Data {
		r.Data[i] = math.Float32frombits(binary.LittleEndian.Uint32(b[4*i:]))
	}
	return r, nil
}

func writeFile(path string, fn func(w *bufio.Writer) error) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := bufio.NewWriterSize(f, 1<<20)
	if err := fn(w); err != nil {
		f.Close()
		return err
	}
	if err := w.Flush(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}
