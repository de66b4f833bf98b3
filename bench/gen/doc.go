// Command gen makes the inputs of bench/run and runs drygrid's side of the
// work items that have no command of their own. Everything it writes is
// invented: station ids are S0000001..., places are drawn uniformly on the
// sphere from a fixed seed, values come from a smooth made-up field plus
// noise. It is a benchmark helper, not part of drygrid.
//
//	gen stations N SEED OUT.csv      N stations: station,latitude,longitude,spi
//	                                 (also OUT.csvt and OUT.vrt for gdal_grid)
//	gen totals N YEARS DIR           DIR/stations.csv and DIR/totals.csv
//	                                 (N stations x YEARS yearly totals)
//	gen polygonize BANDS.tif OUT     read a band GeoTIFF, write band GeoJSON
//	gen raw INDEX.tif OUT.f32        the index raster as raw float32 (+ OUT.vrt)
//	gen cog IN OUT.tif               an index GeoTIFF or raw .f32 as a COG
//	gen index STATIONS TOTALS OUT    what drygrid index does (for profiles)
//	gen scale N RES W S E N OUT.tif  N stations (seed 1) in the box, streamed
//	                                 into index and bands COGs OUT.tif and
//	                                 OUT.bands.tif in row blocks
//
// The performance targets it serves are in docs/design.md.
package main
