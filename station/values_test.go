package station

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
)

func parseV(t *testing.T, data string, opt ValueOptions) (*Values, error) {
	t.Helper()
	return ParseValues("v.csv", strings.NewReader(data), opt)
}

// Every validation rule of value tables with the message it gives; each
// message names file, line, column number and header name.
func TestValuesValidationErrors(t *testing.T) {
	const h = "station,lat,lon,spi\n"
	cases := []struct {
		name string
		data string
		opt  ValueOptions
		want string // exact error text
	}{
		{"lat above 90", h + "A,90.5,0,1\n", ValueOptions{}, "v.csv line 2 column 2 (lat): latitude 90.5 outside [-90, 90]"},
		{"lat below -90", h + "A,1,0,1\nB,-91,0,1\n", ValueOptions{}, "v.csv line 3 column 2 (lat): latitude -91 outside [-90, 90]"},
		{"lon 360", h + "A,1,360,1\n", ValueOptions{}, "v.csv line 2 column 3 (lon): longitude 360 outside [-180, 360)"},
		{"lon 400", h + "A,1,400,1\n", ValueOptions{}, "v.csv line 2 column 3 (lon): longitude 400 outside [-180, 360)"},
		{"lon below -180", h + "A,1,-180.5,1\n", ValueOptions{}, "v.csv line 2 column 3 (lon): longitude -180.5 outside [-180, 360)"},
		{"NaN value", h + "A,1,2,NaN\n", ValueOptions{}, "v.csv line 2 column 4 (spi): spi NaN is not a finite number"},
		{"Inf value", h + "A,1,2,-Inf\n", ValueOptions{}, "v.csv line 2 column 4 (spi): spi -Inf is not a finite number"},
		{"NaN latitude", h + "A,nan,2,1\n", ValueOptions{}, "v.csv line 2 column 2 (lat): latitude nan is not a finite number"},
		{"spi above 5", h + "A,1,2,5.01\n", ValueOptions{}, "v.csv line 2 column 4 (spi): spi 5.01 outside [-5, 5], implausible"},
		{"spi below -5", h + "A,1,2,-7\n", ValueOptions{}, "v.csv line 2 column 4 (spi): spi -7 outside [-5, 5], implausible"},
		{"percentile above 100", "id,latitude,longitude,percentile\nA,1,2,100.1\n", ValueOptions{Kind: KindPercentile}, "v.csv line 2 column 4 (percentile): percentile 100.1 outside [0, 100]"},
		{"percentile below 0", "id,latitude,longitude,pct\nA,1,2,-1\n", ValueOptions{Kind: KindPercentile}, "v.csv line 2 column 4 (pct): percentile -1 outside [0, 100]"},
		{"not a number", h + "A,1,2,dry\n", ValueOptions{}, `v.csv line 2 column 4 (spi): spi "dry" is not a number`},
		{"missing id", h + ",1,2,1\n", ValueOptions{}, "v.csv line 2 column 1 (station): missing station id"},
		{"missing lat", h + "A,,2,1\n", ValueOptions{}, "v.csv line 2 column 2 (lat): missing latitude"},
		{"NA lon", h + "A,1,NA,1\n", ValueOptions{}, "v.csv line 2 column 3 (lon): missing longitude"},
		{"hex lon", h + "A,1,0x10,1\n", ValueOptions{}, `v.csv line 2 column 3 (lon): longitude "0x10" is not a decimal number`},
		{"duplicate id other place names both lines", h + "A,1,2,1\nB,3,4,0\nA,1,2.5,1\n", ValueOptions{}, "v.csv line 4 column 3 (lon): station A is at 1, 2.5 here but at 1, 2 on line 2"},
		{"duplicate id other lat", h + "A,1,2,1\nA,1.5,2,1\n", ValueOptions{}, "v.csv line 3 column 2 (lat): station A is at 1.5, 2 here but at 1, 2 on line 2"},
		{"duplicate id same place other value", h + "A,1,2,1\nA,1,2,1.5\n", ValueOptions{}, `v.csv line 3 column 4 (spi): station A has spi "1.5" here but another value on line 2`},
		{"duplicate id value vs empty", h + "A,1,2,\nA,1,2,1.5\n", ValueOptions{}, `v.csv line 3 column 4 (spi): station A has spi "1.5" here but another value on line 2`},
		{"no value column lists header", "station,lat,lon,total\nA,1,2,3\n", ValueOptions{Kind: KindSPI}, "v.csv line 1: no spi value column (looked for spi); the header has: station, lat, lon, total"},
		{"named value column absent", h, ValueOptions{ValueColumn: "z"}, `v.csv line 1: no spi value column named "z"; the header has: station, lat, lon, spi`},
		{"no id column", "name,lat,lon,spi\n", ValueOptions{}, "v.csv line 1: no station id column (looked for station|id|station_id|site); the header has: name, lat, lon, spi"},
		{"no lat column", "id,y,lon,spi\n", ValueOptions{}, "v.csv line 1: no latitude column (looked for latitude|lat); the header has: id, y, lon, spi"},
		{"no lon column", "id,lat,x,spi\n", ValueOptions{}, "v.csv line 1: no longitude column (looked for longitude|lon|long|lng); the header has: id, lat, x, spi"},
		{"unknown kind", h, ValueOptions{Kind: "spei"}, `v.csv: unknown value kind "spei" (want spi, percentile or pct-of-normal)`},
		{"table error passes through", h + "A,1,2\n", ValueOptions{}, "v.csv line 2: 3 fields, but the header (line 1) has 4"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			v, err := parseV(t, c.data, c.opt)
			if err == nil {
				t.Fatalf("no error (got %d stations), want %q", len(v.Stations), c.want)
			}
			if err.Error() != c.want {
				t.Fatalf("error\n got %q\nwant %q", err, c.want)
			}
		})
	}
}

// Longitudes in 0-360 are normalised to [-180, 180) (common practice; RFC 7946
// section 4 uses [-180, 180]); boundary values stay inside.
func TestValuesLongitudeNormalisation(t *testing.T) {
	cases := []struct{ in, want float64 }{
		{0, 0}, {179.5, 179.5}, {180, -180}, {181.25, -178.75}, {359.999, -0.001}, {-180, -180}, {-0.5, -0.5},
	}
	var b strings.Builder
	b.WriteString("id,lat,lon,spi\n")
	for i, c := range cases {
		b.WriteString(strings.Join([]string{"S" + string(rune('a'+i)), strconv.Itoa(i), ftoa(c.in), "0.5"}, ",") + "\n")
	}
	v, err := parseV(t, b.String(), ValueOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(v.Stations) != len(cases) {
		t.Fatalf("%d stations, want %d", len(v.Stations), len(cases))
	}
	for i, c := range cases {
		if got := v.Stations[i].Lon; math.Abs(got-c.want) > 1e-12 {
			t.Errorf("lon %v -> %v, want %v", c.in, got, c.want)
		}
	}
}

func ftoa(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

func TestValuesColumnsAndKinds(t *testing.T) {
	cases := []struct {
		name     string
		data     string
		opt      ValueOptions
		kind     Kind
		col      string
		id       string
		lat, lon float64
		value, z float64
	}{
		// Header names in any case and with aliases.
		{"aliases and case", "Station_ID;LAT;Lng;SPI\nK1;-40;-120;-1,5\n", ValueOptions{}, KindSPI, "SPI", "K1", -40, -120, -1.5, -1.5},
		{"site/latitude/long", "site\tlatitude\tlong\tspi\nK1\t-40\t240\t0.25\n", ValueOptions{}, KindSPI, "spi", "K1", -40, -120, 0.25, 0.25},
		// Percentile 97.5 -> z = 1.959964 (Abramowitz and Stegun 1964, table 26.1,
		// from memory of the handbook table: Phi^-1(0.975) = 1.959964).
		{"percentile", "id,lat,lon,percentile\nK1,1,2,97.5\n", ValueOptions{Kind: KindPercentile}, KindPercentile, "percentile", "K1", 1, 2, 97.5, 1.959964},
		// Phi(1) = 0.8413447 (A&S 1964 table 26.1, from memory): percentile 84.13447 -> z 1.
		{"percent alias", "id,lat,lon,Percent\nK1,1,2,84.13447\n", ValueOptions{Kind: KindPercentile}, KindPercentile, "Percent", "K1", 1, 2, 84.13447, 1.0},
		// Clamp to 99.9: Phi^-1(0.999) = 3.090232 (A&S 1964 table 26.5, from memory).
		{"percentile 100 clamped", "id,lat,lon,pct\nK1,1,2,100\n", ValueOptions{Kind: KindPercentile}, KindPercentile, "pct", "K1", 1, 2, 100, 3.090232},
		{"percentile 0 clamped", "id,lat,lon,pct\nK1,1,2,0\n", ValueOptions{Kind: KindPercentile}, KindPercentile, "pct", "K1", 1, 2, 0, -3.090232},
		{"kind inferred from a percentile column", "id,lat,lon,percentile\nK1,1,2,50\n", ValueOptions{}, KindPercentile, "percentile", "K1", 1, 2, 50, 0},
		{"value column by name", "id,lat,lon,spi,spi3\nK1,1,2,0.1,-2\n", ValueOptions{ValueColumn: "SPI3"}, KindSPI, "spi3", "K1", 1, 2, -2, -2},
		{"id/lat/lon columns by name", "code,station,y,x,lat,lon,spi\nK9,zz,5,6,0,0,1\n", ValueOptions{IDColumn: "code", LatColumn: "y", LonColumn: "x"}, KindSPI, "spi", "K9", 5, 6, 1, 1},
		{"spi at the limit is accepted", "id,lat,lon,spi\nK1,90,-180,-5\n", ValueOptions{}, KindSPI, "spi", "K1", 90, -180, -5, -5},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			v, err := parseV(t, c.data, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			if v.Kind != c.kind || v.Column != c.col || v.Read != 1 || len(v.Stations) != 1 {
				t.Fatalf("kind %q column %q read %d stations %d", v.Kind, v.Column, v.Read, len(v.Stations))
			}
			s := v.Stations[0]
			if s.ID != c.id || s.Lat != c.lat || s.Lon != c.lon || math.Abs(s.Value-c.value) > 1e-12 || math.Abs(s.Z-c.z) > 5e-7 {
				t.Fatalf("got %+v, want id %s lat %v lon %v value %v z %v", s, c.id, c.lat, c.lon, c.value, c.z)
			}
		})
	}
}

// The table written by `drygrid index` has empty spi/percentile and
// a note for stations without enough data; it must read as it is.
func TestValuesIndexOutputNoValue(t *testing.T) {
	data := "station,latitude,longitude,year,total,years,zeros,percentile,spi,pct_of_median,gamma_shape,gamma_scale,fit_ok,note\n" +
		"K1,-40,-120,2025,12.5,65,0,10.2,-1.27,55,3.1,9.8,true,\n" +
		"K2,-41,-121,2025,,20,0,,,,,,,\"only 20 years, need 30\"\n" +
		"K3,-42,-122,2025,30,65,1,NA,NA,,,,false,no target-year total\n" +
		"K4,-43,-123,2025,5,65,0,3,-1.9,20,2,4,true,\n"
	v, err := parseV(t, data, ValueOptions{Kind: KindSPI})
	if err != nil {
		t.Fatal(err)
	}
	if v.Read != 4 || len(v.Stations) != 2 || v.Stations[0].ID != "K1" || v.Stations[1].ID != "K4" {
		t.Fatalf("read %d stations %+v", v.Read, v.Stations)
	}
	want := []Rejection{{3, "K2", ReasonNoValue}, {4, "K3", ReasonNoValue}}
	if !reflect.DeepEqual(v.Rejected, want) {
		t.Fatalf("rejected %+v, want %+v", v.Rejected, want)
	}
	if got := v.RejectedByReason(); !reflect.DeepEqual(got, map[string]int{"no value": 2}) {
		t.Fatalf("by reason %v", got)
	}
	// The same table as percentiles: K4's percentile 3 -> Phi^-1(0.03).
	p, err := parseV(t, data, ValueOptions{Kind: KindPercentile})
	if err != nil {
		t.Fatal(err)
	}
	// Phi^-1(0.03) = -1.880794 (A&S 1964 table 26.5, from memory).
	if len(p.Stations) != 2 || math.Abs(p.Stations[1].Z-(-1.880794)) > 5e-6 {
		t.Fatalf("percentile stations %+v", p.Stations)
	}
}

func TestValuesDuplicatesAndColocated(t *testing.T) {
	data := "station,lat,lon,spi,name\n" +
		"A,-40,-120,-1.0,one\n" + // line 2
		"B,-41,-121,0.5,two\n" + // line 3
		"A,-40,240,-1.0,one again\n" + // line 4: exact duplicate (240 == -120 after normalisation)
		"C,-40,-120,-2.0,three\n" + // line 5: same point as A -> averaged
		"D,-40.0000000001,-119.9999999999,-3.0,four\n" + // line 6: same point to 1e-9 -> averaged
		"E,-40.00001,-120,1,five\n" + // line 7: 1e-5 deg away: its own site
		"F,-41,239,,six\n" // line 8: no value, not merged
	v, err := parseV(t, data, ValueOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if v.Read != 7 {
		t.Errorf("read %d, want 7", v.Read)
	}
	if len(v.Stations) != 3 {
		t.Fatalf("stations %+v", v.Stations)
	}
	a := v.Stations[0]
	if a.ID != "A" || a.Line != 2 || !reflect.DeepEqual(a.Merged, []string{"C", "D"}) ||
		math.Abs(a.Z-(-2.0)) > 1e-12 || math.Abs(a.Value-(-2.0)) > 1e-12 {
		t.Errorf("merged site %+v, want A with C, D and mean -2", a)
	}
	if v.Stations[1].ID != "B" || v.Stations[2].ID != "E" {
		t.Errorf("order %s %s", v.Stations[1].ID, v.Stations[2].ID)
	}
	if !reflect.DeepEqual(v.Rejected, []Rejection{{8, "F", "no value"}}) {
		t.Errorf("rejected %+v", v.Rejected)
	}
	wantW := []string{
		"v.csv line 4: repeats station A of line 2 exactly; kept once",
		"v.csv line 5: station C is at the same point as A (line 2); their values are averaged into one site",
		"v.csv line 6: station D is at the same point as A (line 2); their values are averaged into one site",
	}
	if !reflect.DeepEqual(v.Warnings, wantW) {
		t.Errorf("warnings\n%q\nwant\n%q", v.Warnings, wantW)
	}
}

// Percentile sites at one point average their z, not their percentiles
// (percentiles are interpolated as z).
func TestValuesColocatedPercentileMeanZ(t *testing.T) {
	v, err := parseV(t, "id,lat,lon,percentile\nA,0,0,97.5\nB,0,0,50\n", ValueOptions{Kind: KindPercentile})
	if err != nil {
		t.Fatal(err)
	}
	// (1.959964 + 0) / 2, A&S 1964 table 26.1 from memory.
	if len(v.Stations) != 1 || math.Abs(v.Stations[0].Z-0.979982) > 1e-6 || v.Stations[0].Value != 73.75 {
		t.Fatalf("%+v", v.Stations)
	}
}

func TestValuesSeamAndPole(t *testing.T) {
	// -180 and 180 (normalised to -180) and 179.9999999999 are one point; at
	// a pole every longitude is the same point (geometry, common practice).
	v, err := parseV(t, "id,lat,lon,spi\nA,10,-180,1\nB,10,180,2\nC,10,179.9999999999,3\nP,90,0,1\nQ,90,45,-1\n", ValueOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(v.Stations) != 2 || !reflect.DeepEqual(v.Stations[0].Merged, []string{"B", "C"}) || !reflect.DeepEqual(v.Stations[1].Merged, []string{"Q"}) {
		t.Fatalf("%+v", v.Stations)
	}
	if v.Stations[0].Z != 2 || v.Stations[1].Z != 0 {
		t.Fatalf("means %v %v", v.Stations[0].Z, v.Stations[1].Z)
	}
}

func TestReadValuesFile(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "st.tsv.gz")
	if err := os.WriteFile(p, gz(t, []byte("\ufeffID\tLat\tLon\tSPI\r\nK1\t-40\t232\t-2.25\r\n")), 0o644); err != nil {
		t.Fatal(err)
	}
	v, err := ReadValues(p, ValueOptions{Kind: KindSPI})
	if err != nil {
		t.Fatal(err)
	}
	if v.Path != p || len(v.Stations) != 1 || v.Stations[0].Lon != -128 || v.Stations[0].Z != -2.25 {
		t.Fatalf("%+v", v)
	}
	if _, err := ReadValues(filepath.Join(dir, "none.csv"), ValueOptions{}); err == nil || !strings.Contains(err.Error(), "none.csv") {
		t.Fatalf("error %v", err)
	}
}

func TestValuesFixtures(t *testing.T) {
	cases := []struct {
		file     string
		opt      ValueOptions
		stations int
		rejected int
		warnings int
		err      string
	}{
		{"good.csv", ValueOptions{Kind: KindSPI}, 5, 1, 0, ""},
		{"percentiles.tsv", ValueOptions{Kind: KindPercentile}, 4, 0, 1, ""},
		{"percentiles.tsv.gz", ValueOptions{Kind: KindPercentile}, 4, 0, 1, ""},
		{"semicolon.csv", ValueOptions{}, 3, 0, 0, ""},
		{"bad_lon.csv", ValueOptions{}, 0, 0, 0, "bad_lon.csv line 4 column 3 (lon): longitude 400 outside [-180, 360)"},
		{"dup_id.csv", ValueOptions{}, 0, 0, 0, "dup_id.csv line 5 column 2 (latitude): station KLV-0002 is at -40.5, -125 here but at -41, -125 on line 3"},
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			v, err := ReadValues(filepath.Join("..", "testdata", "stations", c.file), c.opt)
			if c.err != "" {
				if err == nil || !strings.HasSuffix(err.Error(), c.err) {
					t.Fatalf("error %v, want suffix %q", err, c.err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if len(v.Stations) != c.stations || len(v.Rejected) != c.rejected || len(v.Warnings) != c.warnings {
				t.Fatalf("stations %d rejected %d warnings %d: %+v", len(v.Stations), len(v.Rejected), len(v.Warnings), v)
			}
		})
	}
}

// FuzzParseValues: arbitrary bytes never panic; an accepted table satisfies
// the validation rules.
func FuzzParseValues(f *testing.F) {
	f.Add([]byte("station,lat,lon,spi\nA,1,2,-1\nB,1,2,\nA,1,362,-1\n"), false)
	f.Add([]byte("id\tlatitude\tlongitude\tpercentile\nA\t-90\t359.9\t100\n"), true)
	f.Add([]byte("id;lat;lon;pct\nA;1,5;2;50\nB;1,5;2;NaN\n"), true)
	f.Fuzz(func(t *testing.T, data []byte, pct bool) {
		opt := ValueOptions{Kind: KindSPI}
		if pct {
			opt.Kind = KindPercentile
		}
		v, err := ParseValues("fz.csv", strings.NewReader(string(data)), opt)
		if err != nil {
			if !strings.Contains(err.Error(), "fz.csv") {
				t.Fatalf("error without file name: %v", err)
			}
			return
		}
		for _, s := range v.Stations {
			if !(s.Lat >= -90 && s.Lat <= 90 && s.Lon >= -180 && s.Lon < 180) {
				t.Fatalf("station out of range: %+v", s)
			}
			if math.IsNaN(s.Z) || math.IsInf(s.Z, 0) || math.IsNaN(s.Value) {
				t.Fatalf("non-finite: %+v", s)
			}
			if !pct && math.Abs(s.Value) > SPILimit {
				t.Fatalf("implausible spi accepted: %+v", s)
			}
			if pct && (s.Value < 0 || s.Value > 100 || math.Abs(s.Z) > 3.1) {
				t.Fatalf("bad percentile: %+v", s)
			}
		}
		if len(v.Stations)+len(v.Rejected) > v.Read {
			t.Fatalf("more sites than rows")
		}
	})
}

func TestParseKind(t *testing.T) {
	for in, want := range map[string]Kind{"spi": KindSPI, " SPI ": KindSPI, "Percentile": KindPercentile} {
		if k, err := ParseKind(in); err != nil || k != want {
			t.Errorf("ParseKind(%q) = %q, %v", in, k, err)
		}
	}
	for _, in := range []string{"", "pct", "spei"} {
		if _, err := ParseKind(in); err == nil {
			t.Errorf("ParseKind(%q) accepted", in)
		}
	}
}

// BenchmarkParseValues20k reads a 20,000-station SPI table (the size of the
// gridding benchmark of docs/design.md).
func BenchmarkParseValues20k(b *testing.B) {
	var buf strings.Builder
	buf.WriteString("station,latitude,longitude,spi\n")
	for i := 0; i < 20000; i++ {
		lat := -89.5 + float64(i%179)
		lon := -180 + float64(i/179)*1.6
		buf.WriteString("S" + strconv.Itoa(i) + "," + ftoa(lat) + "," + ftoa(lon) + "," + ftoa(float64(i%97)/20-2.4) + "\n")
	}
	data := buf.String()
	b.SetBytes(int64(len(data)))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		v, err := ParseValues("bench.csv", strings.NewReader(data), ValueOptions{Kind: KindSPI})
		if err != nil || len(v.Stations) != 20000 {
			b.Fatal(err, len(v.Stations))
		}
	}
}

func TestValuesWarningsCapped(t *testing.T) {
	var b strings.Builder
	b.WriteString("id,lat,lon,spi\n")
	for i := 0; i < 151; i++ {
		b.WriteString("A,1,2,0.5\n")
	}
	v, err := parseV(t, b.String(), ValueOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(v.Stations) != 1 || v.Read != 151 || len(v.Warnings) != 101 || v.Warnings[100] != "v.csv: 50 more warnings not shown" {
		t.Fatalf("stations %d read %d warnings %d last %q", len(v.Stations), v.Read, len(v.Warnings), v.Warnings[len(v.Warnings)-1])
	}
}

// TestValuesErrorsInFileOrder: the rows are read a batch ahead of the
// checks between rows (valuesReader), yet the first bad row of the file is
// the one reported, whichever check finds it, across batches; duplicates
// are found across batches and every row is counted.
func TestValuesErrorsInFileOrder(t *testing.T) {
	table := func(n int, edit map[int]string) string {
		var b strings.Builder
		b.WriteString("station,latitude,longitude,spi\n")
		for i := range n {
			row, ok := edit[i]
			if !ok {
				row = fmt.Sprintf("S%d,%d.5,%d.25,0.5", i, i%170-85, i%350-175)
			}
			b.WriteString(row + "\n")
		}
		return b.String()
	}
	moved := "S3,10.5,10.25,0.5" // S3 again, somewhere else: found against row 3
	badLat := "S9999,95,10,0.5"  // found alone
	cases := []struct {
		name string
		edit map[int]string
		want string // line of the error reported (header = line 1)
	}{
		{"between rows first", map[int]string{3 * valuesBatchRows / 2: moved, 2*valuesBatchRows + 7: badLat}, fmt.Sprintf("line %d", 3*valuesBatchRows/2+2)},
		{"alone first", map[int]string{3 * valuesBatchRows / 2: badLat, 2*valuesBatchRows + 7: moved}, fmt.Sprintf("line %d", 3*valuesBatchRows/2+2)},
		{"same batch", map[int]string{valuesBatchRows + 1: moved, valuesBatchRows + 2: badLat}, fmt.Sprintf("line %d", valuesBatchRows+3)},
	}
	n := 3 * valuesBatchRows
	for _, c := range cases {
		_, err := ParseValues("order.csv", strings.NewReader(table(n, c.edit)), ValueOptions{Kind: KindSPI})
		if err == nil || !strings.Contains(err.Error(), "order.csv "+c.want+" ") {
			t.Errorf("%s: error %v, want one at %s", c.name, err, c.want)
		}
	}
	// S5 repeated exactly two batches on: kept once, with a warning.
	v, err := ParseValues("order.csv", strings.NewReader(table(n, map[int]string{2*valuesBatchRows + 5: "S5,-80.5,-170.25,0.5"})), ValueOptions{Kind: KindSPI})
	if err != nil {
		t.Fatal(err)
	}
	if v.Read != n || len(v.Stations) != n-1 || len(v.Warnings) != 1 || !strings.Contains(v.Warnings[0], "repeats station S5 of line 7") {
		t.Errorf("read %d, %d stations, warnings %q; want %d, %d and the repeat of S5", v.Read, len(v.Stations), v.Warnings, n, n-1)
	}
}

// Percent of normal: found by the index step's column name, kept as it is
// (Z is the value: it has no z), refused below 0, above MaxPctOfNormal and
// when every value looks like a ratio to normal.
func TestValuesPctOfNormal(t *testing.T) {
	for _, col := range PctOfNormalAliases {
		v, err := ParseValues("p.csv", strings.NewReader("station,lat,lon,"+col+"\nA,1,2,62.5\nB,1,3,140\n"), ValueOptions{Kind: KindPctOfNormal})
		if err != nil {
			t.Fatalf("%s: %v", col, err)
		}
		if v.Kind != KindPctOfNormal || v.Stations[0].Value != 62.5 || v.Stations[0].Z != 62.5 || v.Stations[1].Z != 140 {
			t.Errorf("%s: %+v", col, v.Stations)
		}
	}
	for _, c := range []struct{ body, want string }{
		{"A,1,2,-1\n", "percent of normal -1 outside [0, 10000]"},
		{"A,1,2,10001\n", "percent of normal 10001 outside [0, 10000]"},
		{"A,1,2,0.8\nB,1,3,1.2\n", "look like ratios to normal"},
	} {
		_, err := ParseValues("p.csv", strings.NewReader("station,lat,lon,pct_of_median\n"+c.body), ValueOptions{Kind: KindPctOfNormal})
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: %v, want %q", c.body, err, c.want)
		}
	}
	if k, err := ParseKind(" Percent-of-Normal "); err != nil || k != KindPctOfNormal {
		t.Errorf("ParseKind: %v %v", k, err)
	}
}
