#!/usr/bin/python3
"""Outside reference checks for drygrid's GeoJSON band layers.

Usage (stdin: JSON, stdout: JSON):
  geojson_ref.py shapely   cases [{name, res, counts{code: n}, fc, simplified, full_area}] -> {checked, problems[]}
      shapely 1.8 (python3-shapely): every geometry valid
      (shapely.validation.explain_validity == "Valid Geometry"), exterior rings
      CCW and holes CW (LinearRing.is_ccw; RFC 7946 section 3.1.6), per-band
      area == count x res^2 (.area, planar), bands pairwise disjoint in area,
      no polygon overlapping another (union area == sum of areas), every
      longitude in [-180, 180] and latitude in [-90, 90] (RFC 7946 3.1.9),
      no "crs" member (RFC 7946 section 4). For simplified layers the per-band area
      check is skipped; full_area > 0 (a raster without no data) asks that the union
      of all bands cover exactly that area: no gaps, no overlaps.
  geojson_ref.py gdal      rasters [{name, cols, rows, west, north, res, nodata, data}]
      -> [{value: {n, area}}] from GDAL's gdal.Polygonize (python3-gdal, default
      4-connectedness, nodata masked), areas by OGR Geometry.GetArea (planar).
  geojson_ref.py polygonize-file RASTER.tif -> {value: {n, area}} likewise, for one file.
  geojson_ref.py raw2tif RAW COLS ROWS WEST NORTH RES OUT.tif
      wraps a raw UInt8 raster (row 0 north) as a GeoTIFF (EPSG:4326, nodata 0) with
      GDAL, for the gdal_polygonize.py side-by-side of the benchmark.
"""
import json
import sys


def shapely_check(cases):
    from shapely.geometry import shape
    from shapely.ops import unary_union
    from shapely.validation import explain_validity

    problems = []
    checked = 0
    for c in cases:
        name, res, counts, fc = c["name"], c["res"], c["counts"], c["fc"]
        checked += 1
        if "crs" in fc:
            problems.append("%s: crs member present" % name)
        geoms = {}
        for f in fc["features"]:
            code = str(f["properties"]["code"])
            g = shape(f["geometry"])
            why = explain_validity(g)
            if why != "Valid Geometry":
                problems.append("%s: band %s invalid: %s" % (name, code, why))
                continue
            for p in g.geoms:
                if not p.exterior.is_ccw:
                    problems.append("%s: band %s exterior not CCW" % (name, code))
                for h in p.interiors:
                    if h.is_ccw:
                        problems.append("%s: band %s hole not CW" % (name, code))
            for ring in f["geometry"]["coordinates"]:
                for part in ring:
                    for x, y in part:
                        if not (-180 <= x <= 180 and -90 <= y <= 90):
                            problems.append("%s: band %s position %r out of range" % (name, code, (x, y)))
            want = counts.get(code, 0) * res * res
            if not c.get("simplified") and abs(g.area - want) > 1e-9 * want:
                problems.append("%s: band %s area %.12g, want %.12g" % (name, code, g.area, want))
            # polygons of one band never overlap: union area == sum of areas
            s = sum(p.area for p in g.geoms)
            u = unary_union(list(g.geoms)).area
            if abs(s - u) > 1e-9 * s:
                problems.append("%s: band %s polygons overlap: sum %.12g union %.12g" % (name, code, s, u))
            geoms[code] = g
        if set(geoms) != set(k for k, v in counts.items() if v > 0) and len(problems) == 0:
            problems.append("%s: bands %s, want %s" % (name, sorted(geoms), sorted(counts)))
        keys = sorted(geoms)
        for i in range(len(keys)):
            for j in range(i + 1, len(keys)):
                a = geoms[keys[i]].intersection(geoms[keys[j]]).area
                if a > 1e-12 * res * res:
                    problems.append("%s: bands %s and %s overlap by %g" % (name, keys[i], keys[j], a))
        full = c.get("full_area", 0)
        if full > 0 and geoms:
            u = unary_union(list(geoms.values())).area
            s = sum(g.area for g in geoms.values())
            if abs(u - full) > 1e-9 * full or abs(s - full) > 1e-9 * full:
                problems.append("%s: union of bands %.12g, sum %.12g, grid %.12g: gap or overlap" % (name, u, s, full))
    return {"checked": checked, "problems": problems}


def gdal_polygonize(ds):
    from osgeo import gdal, ogr, osr

    gdal.UseExceptions()
    band = ds.GetRasterBand(1)
    drv = ogr.GetDriverByName("Memory")
    vds = drv.CreateDataSource("mem")
    srs = osr.SpatialReference()
    srs.ImportFromEPSG(4326)
    layer = vds.CreateLayer("bands", srs=srs)
    layer.CreateField(ogr.FieldDefn("value", ogr.OFTInteger))
    gdal.Polygonize(band, band.GetMaskBand(), layer, 0, [], callback=None)
    out = {}
    for f in layer:
        v = str(f.GetField("value"))
        e = out.setdefault(v, {"n": 0, "area": 0.0})
        e["n"] += 1
        e["area"] += f.GetGeometryRef().GetArea()
    return out


def gdal_check(rasters):
    from osgeo import gdal

    gdal.UseExceptions()
    results = []
    for r in rasters:
        ds = gdal.GetDriverByName("MEM").Create("", r["cols"], r["rows"], 1, gdal.GDT_Byte)
        ds.SetGeoTransform([r["west"], r["res"], 0, r["north"], 0, -r["res"]])
        band = ds.GetRasterBand(1)
        band.SetNoDataValue(r["nodata"])
        band.WriteRaster(0, 0, r["cols"], r["rows"], bytes(r["data"]))
        results.append(gdal_polygonize(ds))
    return results


def main():
    mode = sys.argv[1]
    if mode == "shapely":
        out = shapely_check(json.load(sys.stdin))
    elif mode == "gdal":
        out = gdal_check(json.load(sys.stdin))
    elif mode == "polygonize-file":
        from osgeo import gdal

        gdal.UseExceptions()
        out = gdal_polygonize(gdal.Open(sys.argv[2]))
    elif mode == "raw2tif":
        from osgeo import gdal, osr

        gdal.UseExceptions()
        raw, cols, rows = sys.argv[2], int(sys.argv[3]), int(sys.argv[4])
        west, north, res, dst = float(sys.argv[5]), float(sys.argv[6]), float(sys.argv[7]), sys.argv[8]
        ds = gdal.GetDriverByName("GTiff").Create(dst, cols, rows, 1, gdal.GDT_Byte, ["COMPRESS=DEFLATE", "TILED=YES"])
        ds.SetGeoTransform([west, res, 0, north, 0, -res])
        srs = osr.SpatialReference()
        srs.ImportFromEPSG(4326)
        ds.SetProjection(srs.ExportToWkt())
        band = ds.GetRasterBand(1)
        band.SetNoDataValue(0)
        with open(raw, "rb") as f:
            band.WriteRaster(0, 0, cols, rows, f.read())
        ds = None
        out = {"written": dst}
    else:
        raise SystemExit("unknown mode %r" % mode)
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
