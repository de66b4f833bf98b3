"""Great-circle distance for the NumPy reference scripts: the haversine
formula on a sphere of radius 6371.0088 km (the mean Earth radius, IUGG),
written independently of drygrid's Go code."""
import numpy as np

R_KM = 6371.0088


def haversine_km(lon1, lat1, lon2, lat2):
    p1, p2 = np.radians(lat1), np.radians(lat2)
    dp = p2 - p1
    dl = np.radians(lon2 - lon1)
    h = np.sin(dp / 2) ** 2 + np.cos(p1) * np.cos(p2) * np.sin(dl / 2) ** 2
    return 2 * R_KM * np.arcsin(np.sqrt(np.clip(h, 0.0, 1.0)))
