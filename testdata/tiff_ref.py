#!/usr/bin/env python3
"""Reference reader for drygrid's GeoTIFF writer (geotiff/*_test.go).

Reads a GeoTIFF with GDAL (python3-gdal, Debian's GDAL 3.6) and reports, as
JSON on stdout, what GDAL sees: driver, size, data type, block size, CRS
(EPSG via osr AutoIdentifyEPSG and the AUTHORITY node), geotransform,
no-data value, colour table, category names, metadata, and GDAL's own COG
validator (osgeo_utils.samples.validate_cloud_optimized_geotiff, full check).

It also compares pixels: the expected full-resolution raster is read raw
(little-endian float32 or uint8, row-major) from the file given, compared
with GDAL's full read, and every overview GDAL reads back is compared with
an overview computed here independently with NumPy:
  index: mean of the valid (not no-data, not NaN) cells of each 2^k x 2^k
         block, in float64, rounded to float32; no-data when none is valid;
  bands: most frequent code other than no data, the lowest code on a tie
         (numpy.argmax returns the first maximum), no data only when the
         whole block is no data.
Blocks on the right and bottom edges cover only the cells inside the image.

usage: tiff_ref.py FILE.tif EXPECTED.raw index|bands NODATA
"""
import json
import sys

import numpy as np
from osgeo import gdal, osr
from osgeo_utils.samples import validate_cloud_optimized_geotiff as cogval

gdal.UseExceptions()


def pad(a, f, fill):
    rows, cols = a.shape
    pr, pc = -rows % f, -cols % f
    return np.pad(a, ((0, pr), (0, pc)), constant_values=fill)


def mean_overview(full, f, nodata):
    a = pad(full.astype(np.float64), f, np.nan)
    valid = ~np.isnan(a) & (a != nodata)
    oh, ow = a.shape[0] // f, a.shape[1] // f
    s = np.where(valid, a, 0.0).reshape(oh, f, ow, f).sum(axis=(1, 3))
    n = valid.reshape(oh, f, ow, f).sum(axis=(1, 3))
    with np.errstate(invalid="ignore", divide="ignore"):
        m = np.where(n > 0, s / np.maximum(n, 1), nodata)
    return m.astype(np.float32)


def mode_overview(full, f, nodata):
    a = pad(full, f, nodata)
    oh, ow = a.shape[0] // f, a.shape[1] // f
    blocks = a.reshape(oh, f, ow, f).transpose(0, 2, 1, 3).reshape(oh, ow, f * f)
    codes = [int(c) for c in np.unique(a) if c != nodata]  # ascending
    if not codes:
        return np.full((oh, ow), nodata, dtype=np.uint8)
    counts = np.stack([(blocks == c).sum(axis=2) for c in codes])
    best = np.array(codes, dtype=np.uint8)[np.argmax(counts, axis=0)]
    return np.where(counts.max(axis=0) > 0, best, nodata).astype(np.uint8)


def ulps(a, b):
    """Distance in float32 units in the last place (sign-magnitude order)."""
    ia = a.astype(np.float32).view(np.int32).astype(np.int64)
    ib = b.astype(np.float32).view(np.int32).astype(np.int64)
    ia = np.where(ia < 0, -(ia & 0x7FFFFFFF), ia)
    ib = np.where(ib < 0, -(ib & 0x7FFFFFFF), ib)
    return np.abs(ia - ib)


def compare(got, want, kind):
    if kind == "bands":
        return {"mismatches": int((got != want).sum()), "max_ulps": 0}
    gn, wn = np.isnan(got), np.isnan(want)
    same = (got == want) | (gn & wn)
    d = np.where(gn | wn, 0, ulps(got, want))
    return {"mismatches": int((~same).sum()), "max_ulps": int(d.max()) if d.size else 0,
            "nan_mismatches": int((gn != wn).sum())}


def main():
    path, raw, kind, nodata = sys.argv[1], sys.argv[2], sys.argv[3], float(sys.argv[4])
    ds = gdal.Open(path)
    band = ds.GetRasterBand(1)
    out = {
        "driver": ds.GetDriver().ShortName,
        "size": [ds.RasterXSize, ds.RasterYSize],
        "bands": ds.RasterCount,
        "datatype": gdal.GetDataTypeName(band.DataType),
        "block": band.GetBlockSize(),
        "geotransform": list(ds.GetGeoTransform()),
        "nodata": band.GetNoDataValue(),
        "metadata": ds.GetMetadata(),
        "image_structure": ds.GetMetadata("IMAGE_STRUCTURE"),
        "categories": band.GetCategoryNames(),
    }
    srs = ds.GetSpatialRef()
    out["epsg_auto"] = None
    out["authority"] = None
    if srs is not None:
        s2 = srs.Clone()
        if s2.AutoIdentifyEPSG() == 0:
            out["epsg_auto"] = s2.GetAuthorityCode(None)
        out["authority"] = [srs.GetAuthorityName(None), srs.GetAuthorityCode(None)]
        out["is_geographic"] = bool(srs.IsGeographic())
    ct = band.GetColorTable()
    out["colortable"] = None if ct is None else [list(ct.GetColorEntry(i)) for i in range(ct.GetCount())]
    out["color_interp"] = gdal.GetColorInterpretationName(band.GetColorInterpretation())

    dtype = np.float32 if kind == "index" else np.uint8
    want = np.fromfile(raw, dtype="<f4" if kind == "index" else "u1").reshape(ds.RasterYSize, ds.RasterXSize)
    got = band.ReadAsArray().astype(dtype)
    out["full"] = compare(got, want, kind)

    ovs = []
    for i in range(band.GetOverviewCount()):
        ob = band.GetOverview(i)
        f = 2 ** (i + 1)
        exp = mean_overview(want, f, nodata) if kind == "index" else mode_overview(want, f, np.uint8(nodata))
        g = ob.ReadAsArray().astype(dtype)
        item = {"size": [ob.XSize, ob.YSize], "factor": f, "expected_size": [exp.shape[1], exp.shape[0]],
                "nodata": ob.GetNoDataValue()}
        if g.shape == exp.shape:
            item.update(compare(g, exp, kind))
            item["valid"] = int((exp != nodata).sum())
        ovs.append(item)
    out["overviews"] = ovs

    warnings, errors, details = cogval.validate(path, full_check=True)
    out["cog"] = {"warnings": warnings, "errors": errors, "details": details}
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
