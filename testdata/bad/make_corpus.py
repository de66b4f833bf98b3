#!/usr/bin/env python3
"""Writes drygrid's bad-input corpus (testdata/bad). Every file is invented.

Run from this directory: python3 make_corpus.py. The expected message of
each file is in expected.tsv; cmd/drygrid/corpus_test.go runs the real
command on each and checks the exit code and the message.
"""
import gzip, io

def w(name, data):
    if isinstance(data, str):
        data = data.encode("utf-8")
    with open(name, "wb") as f:
        f.write(data)

H = "station,latitude,longitude,spi\n"
ok = "KLV-01,-40.1,-125.2,-1.2\nKLV-02,-40.3,-124.6,0.4\n"

# station value tables (drygrid grid --stations)
w("v_empty.csv", "")
w("v_blank_lines.csv", "\n\n  \n")
w("v_header_only.csv", H)
w("v_bom_bad_lat.csv", "\ufeff" + H + "KLV-01,-40.1,-125.2,-1.2\nKLV-02,95.5,-124.6,0.4\n")
w("v_crlf_bad_value.csv", (H + "KLV-01,-40.1,-125.2,-1.2\nKLV-02,-40.3,-124.6,dry\n").replace("\n", "\r\n"))
w("v_bare_cr.csv", (H + ok).replace("\n", "\r"))
w("v_semicolon_nan.csv", "station;latitude;longitude;spi\nKLV-01;-40,1;-125,2;-1,2\nKLV-02;-40,3;-124,6;NaN\n")
w("v_quoted_comma_inf.csv", H + '"KLV-01, north",-40.1,-125.2,-1.2\n"KLV-02, south",-40.3,-124.6,Inf\n')
w("v_broken_quote.csv", H + 'KLV-01,-40.1,-125.2,-1.2\n"KLV-02,-40.3,-124.6,0.4\nKLV-03,-40.5,-124.1,0.1\n')
w("v_stray_quote.csv", H + 'KLV-01,-40.1,-125.2,-1.2\nKLV"02,-40.3,-124.6,0.4\n')
w("v_nan.csv", H + ok + "KLV-03,-40.5,-124.1,nan\n")
w("v_inf.csv", H + ok + "KLV-03,-40.5,-124.1,-inf\n")
w("v_lat_range.csv", H + "KLV-01,-91,-125.2,-1.2\n")
w("v_lon_range.csv", H + ok + "KLV-03,-40.5,400,0.1\n")
w("v_dup_id.csv", H + ok + "KLV-01,-41.0,-126.0,0.3\n")
w("v_non_utf8.csv", H.encode() + b"KLV-01,-40.1,-125.2,-1.2\nKLV-\xff2,-40.3,-124.6,0.4\n")
w("v_non_utf8_header.csv", b"station,lat\xe9,longitude,spi\nKLV-01,-40.1,-125.2,-1.2\n")
w("v_utf16.csv", (H + ok).encode("utf-16"))
w("v_missing_column.csv", "station,latitude,longitude,percentile\nKLV-01,-40.1,-125.2,12\n")
w("v_short_row.csv", H + "KLV-01,-40.1,-125.2,-1.2\nKLV-02,-40.3\n")
w("v_empty_id.csv", H + "KLV-01,-40.1,-125.2,-1.2\n,-40.3,-124.6,0.4\n")
w("v_text_lat.csv", H + "KLV-01,forty,-125.2,-1.2\n")
full = gzip.compress((H + ok * 200).encode(), mtime=0)
w("v_truncated.csv.gz", full[: len(full) // 2])
w("v_gzip_garbage.csv.gz", b"\x1f\x8b" + b"not really gzip at all\n")
w("v_pct_range.csv", "station,latitude,longitude,percentile\nKLV-01,-40.1,-125.2,50\nKLV-02,-40.3,-124.6,130\n")

# window totals (drygrid index --totals, with testdata/index/stations.csv)
T = "station,year,total_mm\n"
w("t_negative.csv", T + "ST01,1961,31.0\nST01,1962,-4.0\n")
w("t_bad_year.csv", T + "ST01,1961,31.0\nST01,19x2,4.0\n")
w("t_year_range.csv", T + "ST01,961,31.0\n")
w("t_dup_year.csv", T + "ST01,1961,31.0\nST01,1962,4.0\nST01,1961,8.0\n")
w("t_nan.csv", T + "ST01,1961,31.0\nST01,1962,NaN\n")
w("t_header_only.csv", T)
w("t_truncated.csv.gz", gzip.compress((T + "".join("ST01,%d,%d.5\n" % (y, y % 97) for y in range(1000, 3001))).encode(), mtime=0)[:3000])
w("t_missing_year.csv", "station,total_mm\nST01,31.0\n")

# station lists (drygrid index --stations, with testdata/index/totals.csv)
S = "station,name,latitude,longitude\n"
w("s_dup_id.csv", S + "ST01,one,45.1,7.2\nST02,two,-23.5,133.7\nST01,again,45.1,7.2\n")
w("s_lat_range.csv", S + "ST01,one,45.1,7.2\nST02,two,-123.5,133.7\n")
w("s_empty.csv", "")

# regions (drygrid grid --regions)
def fc(*features):
    return '{"type":"FeatureCollection","features":[\n' + ",\n".join(features) + "\n]}\n"
def feat(name, coords, kind="Polygon"):
    return '{"type":"Feature","properties":{"name":"%s"},"geometry":{"type":"%s","coordinates":%s}}' % (name, kind, coords)
sq = "[[[-126,-41],[-124,-41],[-124,-39],[-126,-39],[-126,-41]]]"
w("r_unclosed.geojson", fc(feat("a", sq), feat("b", "[[[-126,-41],[-124,-41],[-124,-39],[-126,-39]]]")))
w("r_self_intersecting.geojson", fc(feat("bowtie", "[[[-126,-41],[-124,-39],[-124,-41],[-126,-39],[-126,-41]]]")))
w("r_too_few.geojson", fc(feat("a", "[[[-126,-41],[-124,-41],[-126,-41]]]")))
w("r_lat_range.geojson", fc(feat("a", sq), feat("b", "[[[-126,-41],[-124,-41],[-124,91],[-126,-41]]]")))
w("r_dup_key.geojson", fc(feat("a", sq), feat("a", sq)))
w("r_point.geojson", fc(feat("a", sq), feat("p", "[-125,-40]", "Point")))
w("r_truncated.geojson", fc(feat("a", sq), feat("b", sq))[:150])
w("r_empty.geojson", "")
w("r_no_features.geojson", '{"type":"FeatureCollection","features":[]}\n')
w("r_nan.geojson", fc(feat("a", "[[[-126,-41],[-124,-41],[-124,NaN],[-126,-41]]]")))
w("r_null_position.geojson", fc(feat("a", sq), feat("b", "[[[-126,-41],[-124,-41],[null,null],[-126,-39],[-126,-41]]]")))
w("r_empty_position.geojson", fc(feat("a", "[[[-126,-41],[-124,-41],[],[-126,-39],[-126,-41]]]")))
w("r_one_number.geojson", fc(feat("a", "[[[-126,-41],[-124],[-124,-39],[-126,-39],[-126,-41]]]")))
w("r_text_position.geojson", fc(feat("a", '[[[-126,-41],[-124,-41],["-124","-39"],[-126,-39],[-126,-41]]]')))
w("r_antimeridian_jump.geojson", fc(feat("fiji", "[[[179.5,-17.5],[-179.5,-17.5],[-179.5,-16.5],[179.5,-16.5],[179.5,-17.5]]]")))
w("r_top_level_array.geojson", "[" + feat("a", sq) + "]\n")
w("r_object_key.geojson", fc('{"type":"Feature","properties":{"name":{"en":"North","fr":"Nord"}},"geometry":{"type":"Polygon","coordinates":%s}}' % sq))
w("r_bom_null_position.geojson", "\ufeff" + fc(feat("a", "[[[-126,-41],[-124,-41],[null,null],[-126,-39],[-126,-41]]]")))
w("r_bom_syntax.geojson", "\ufeff" + "{\"type\": x}\n")

# band schemes (drygrid grid --scheme)
band = lambda k, c, d="false": '[[band]]\nkey = "%s"\nlabel = "%s"\ncolor = "%s"\ndrought = %s\n' % (k, k.title(), c, d)
w("sc_unsorted_cuts.toml", 'cuts = [0.5, -0.5]\ncut_belongs_to = "outer"\n' + band("dry", "#bf812d", "true") + band("mid", "#f5f5f5") + band("wet", "#35978f"))
w("sc_unknown_key.toml", 'cuts = [-0.5, 0.5]\ncut_belongs_to = "outer"\n' + band("dry", "#bf812d", "true") + 'colour = "#000000"\n' + band("mid", "#f5f5f5") + band("wet", "#35978f"))
w("sc_bad_color.toml", 'cuts = [-0.5, 0.5]\ncut_belongs_to = "outer"\n' + band("dry", "#bf812d", "true") + band("mid", "f5f5f5") + band("wet", "#35978f"))
w("sc_syntax.toml", 'cuts = [-0.5, 0.5\ncut_belongs_to = "outer"\n')
w("sc_band_count.toml", 'cuts = [-0.5, 0.5]\ncut_belongs_to = "outer"\n' + band("dry", "#bf812d", "true") + band("wet", "#35978f"))
w("sc_empty.toml", "")

# job files (drygrid run)
J = '[inputs]\nstations = "../example/spi.csv"\n[output]\ndir = "never-written"\n'
w("j_unknown_key.toml", 'window = "30 days"\n' + J + 'layer = ["index"]\n')
w("j_bad_res.toml", J + "[grid]\nres = 0\n")
w("j_syntax.toml", 'window = "30 days\n' + J)
w("j_missing_input.toml", '[inputs]\nstations = "no-such-file.csv"\n[output]\ndir = "never-written"\n')
w("j_bad_values.toml", '[inputs]\nstations = "v_bom_bad_lat.csv"\n[output]\ndir = "never-written"\nlayers = ["index"]\n')
w("j_bad_totals.toml", '[inputs]\nstations = "../index/stations.csv"\ntotals = "t_negative.csv"\n[output]\ndir = "never-written"\nlayers = ["index"]\n')
w("j_bom_unknown.toml", "\ufeff" + J + "[grid]\nresolution = 0.1\n")
w("j_empty.toml", "")
w("j_type.toml", J + "[interpolation]\nneighbors = \"twelve\"\n")

# inputs that look valid but are not (station tables)
TT = T + "".join("ST01,%d,%d.5\n" % (y, 20 + y % 37) for y in range(1961, 2021))
w("t_double_gzip.csv.gz", gzip.compress(gzip.compress(TT.encode(), mtime=0), mtime=0))
bad = bytearray(gzip.compress(TT.encode(), mtime=0))
bad[len(bad) // 2] ^= 0x55  # one byte of the deflate data damaged
w("t_corrupt_gzip.csv.gz", bytes(bad))
w("v_ambiguous_lat.csv", "station,lat,latitude,longitude,spi\nKLV-01,-40.1,-40.1,-125.2,-1.2\n")
w("v_duplicate_column.csv", "station,latitude,longitude,spi,SPI\nKLV-01,-40.1,-125.2,-1.2,0.4\n")
w("t_ambiguous_total.csv", "station,year,total_mm,precip\nST01,1961,31.0,31.0\n")
w("s_ambiguous_id.csv", "station,id,latitude,longitude\nST01,1,45.1,7.2\n")
w("v_fraction_percentiles.csv", "station,latitude,longitude,percentile\nKLV-01,-40.1,-125.2,0.0231\nKLV-02,-40.3,-124.6,0.4712\nKLV-03,-40.5,-124.1,0.1\n")
w("t_absurd_total.csv", T + "ST01,1961,31.0\nST01,1962,1e308\n")
w("j_year_without_totals.toml", 'year = 2030\n[inputs]\nstations = "../index/stations.csv"\ntotals = "../index/totals.csv"\n[output]\ndir = "never-written"\nlayers = ["index"]\n')

# empty maps, an empty layer list, a poor-fit rule not known (issue 17)
w("j_swapped_bbox.toml", J + 'layers = ["index"]\n[grid]\nbbox = [-116.0, -45.0, -128.0, -38.0]\n')
w("j_no_covered_cell.toml", J + 'layers = ["index"]\n[grid]\nres = 0.25\nbbox = [-128.0, -45.0, -116.0, -38.0]\n[interpolation]\nradius_km = 1.0\nmin_stations = 2\n')
w("j_empty_layers.toml", J + "layers = []\n")
w("j_bad_poor_fit.toml", '[inputs]\nstations = "../index/stations.csv"\ntotals = "../index/totals.csv"\n[index]\npoor_fit = "toss"\n[output]\ndir = "never-written"\nlayers = ["index"]\n')
# daily records (drygrid totals --daily FILE) and the job file's daily keys
DH = "station,date,precipitation,flag\n"
w("d_negative.csv", DH + "KLV-01,2021-01-01,0.0,\nKLV-01,2021-01-02,-3.5,\n")
w("d_impossible_date.csv", DH + "KLV-01,2021-01-01,0.0,\nKLV-01,2021-02-30,1.2,\n")
w("d_dup_day.csv", DH + "KLV-01,2021-01-01,0.0,\nKLV-01,2021-01-02,1.0,\nKLV-01,2021-01-01,2.5,\n")
DJ = '[inputs]\nstations = "../index/stations.csv"\ndaily = "d_negative.csv"\n[output]\ndir = "never-written"\nlayers = ["index"]\n'
w("j_date_tomorrow.toml", 'date = "tomorrow"\n' + DJ)
w("j_windows_empty.toml", 'date = "2021-01-31"\n' + DJ.replace('daily = "d_negative.csv"\n', 'daily = "d_negative.csv"\nwindows = []\n'))
w("j_timezone.toml", 'date = "yesterday"\ntimezone = "Mars/Base"\n' + DJ)
w("j_daily_negative.toml", 'date = "2021-01-31"\n' + DJ)

# masks (drygrid grid --mask FILE; issue 18): no polygon, a mask far from the grid, "regions" without regions
w("m_no_polygons.geojson", '{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[-124.5,-40.5]}}]}\n')
w("m_outside.geojson", '{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[40.5,-40.5],[42,-40.5],[42,-39],[40.5,-40.5]]]}}]}\n')
w("j_mask_regions.toml", J + 'layers = ["index"]\n[grid]\nmask = "regions"\n')
# percent of normal and scheme units (issue 18 item 4). Kind "pon" runs
# grid --stations FILE --kind pct-of-normal; "scheme" runs an SPI table.
P = "station,latitude,longitude,pct_of_median\n"
w("p_negative.csv", P + "KLV-01,-40.1,-125.2,62\nKLV-02,-40.3,-124.6,-8\n")
w("p_ratios.csv", P + "KLV-01,-40.1,-125.2,0.62\nKLV-02,-40.3,-124.6,1.35\nKLV-03,-40.5,-124.1,0.9\n")
w("p_absurd.csv", P + "KLV-01,-40.1,-125.2,62\nKLV-02,-40.3,-124.6,250000\n")
BANDS2 = '[[band]]\nkey = "dry"\nlabel = "Dry"\ncolor = "#bf812d"\n[[band]]\nkey = "wet"\nlabel = "Wet"\ncolor = "#80cdc1"\n'
w("sc_unit_percentile_for_spi.toml", 'unit = "percentile"\ncuts = [20]\ncut_belongs_to = "outer"\n' + BANDS2)
w("sc_unit_pon_for_spi.toml", 'unit = "pct-of-normal"\ncuts = [70]\ncut_belongs_to = "outer"\n' + BANDS2)
w("sc_unit_unknown.toml", 'unit = "mm"\ncuts = [20]\ncut_belongs_to = "outer"\n' + BANDS2)
w("sc_unit_percentile_clamp.toml", 'unit = "percentile"\ncuts = [0.05]\ncut_belongs_to = "outer"\n' + BANDS2)
w("p_z_scheme.toml", 'cuts = [-1.0]\ncut_belongs_to = "outer"\n' + BANDS2)
