"""Reads what GDAL (Debian's python3-gdal) sees of a GeoTIFF's date and its
band's description and unit: prints one JSON object with the dataset's
TIFFTAG_DATETIME metadata item, band 1's description and unit type, and
the dataset metadata items (the default domain)."""
import json
import sys

from osgeo import gdal

ds = gdal.Open(sys.argv[1])
band = ds.GetRasterBand(1)
print(json.dumps({
    "datetime": ds.GetMetadataItem("TIFFTAG_DATETIME"),
    "description": band.GetDescription(),
    "units": band.GetUnitType(),
    "metadata": ds.GetMetadata(),
}))
