// drygrid map page, the far-cell layer (only on a page that carries one):
// the cells whose nearest station is farther than the chosen distance,
// drawn over the bands with a thin diagonal hatch that keeps its spacing
// on screen at any zoom. Runs after the page's own script.
(function () {
  "use strict";
  var svg = document.getElementById("map");
  var layer = document.getElementById("layer-far");
  var pat = document.getElementById("far-hatch");
  var view = document.getElementById("view");
  var src = document.getElementById("drygrid-far");
  var metaEl = document.getElementById("drygrid-meta");
  if (!svg || !layer || !pat || !view || !src || !metaEl) return;
  var meta = JSON.parse(metaEl.textContent.trim() || "{}") || {};
  var doc = JSON.parse(src.textContent.trim() || "null");
  var bb = meta.bbox || [-180, -90, 180, 90];
  var W = bb[0], S = bb[1], E = bb[2], N = bb[3];
  var crossing = E > 180 + 1e-9;
  var kx = Math.max(Math.cos((N + S) / 2 * Math.PI / 180), 0.25);
  function num(v) { return typeof v === "number" && isFinite(v); }
  function wx(lon) { if (crossing && lon < W - 1e-9) lon += 360; return (lon - W) * kx; }
  function wy(lat) { return N - lat; }
  function r4(v) { return Math.round(v * 1e4) / 1e4; }
  var feats = doc && doc.type === "FeatureCollection" && Array.isArray(doc.features) ? doc.features : [];
  var n = 0;
  feats.forEach(function (f) {
    var g = f && f.geometry;
    var polys = !g || !Array.isArray(g.coordinates) ? [] : g.type === "Polygon" ? [g.coordinates] : g.type === "MultiPolygon" ? g.coordinates : [];
    var d = "";
    polys.forEach(function (poly) {
      (Array.isArray(poly) ? poly : []).forEach(function (ring) {
        var s = "";
        (Array.isArray(ring) ? ring : []).forEach(function (p) {
          if (!Array.isArray(p) || !num(p[0]) || !num(p[1])) return;
          s += (s ? "L" : "M") + r4(wx(p[0])) + " " + r4(wy(p[1]));
        });
        if (s) d += s + "Z";
      });
    });
    if (!d) return;
    var e = document.createElementNS(svg.namespaceURI, "path");
    e.setAttribute("d", d);
    e.setAttribute("fill", "url(#far-hatch)");
    e.setAttribute("fill-rule", "evenodd");
    e.setAttribute("stroke", "none");
    e.setAttribute("pointer-events", "none");
    e.setAttribute("class", "far");
    layer.appendChild(e);
    n++;
  });
  // The pattern is in world units (degrees): scale it by the view's zoom so
  // that its lines stay 6 px apart and 1 px wide on screen.
  function fit() {
    var m = /matrix\(\s*([-+0-9.eE]+)/.exec(view.getAttribute("transform") || "");
    var s = m ? parseFloat(m[1]) : 1;
    if (!(s > 0) || !isFinite(s)) return;
    pat.setAttribute("patternTransform", "scale(" + (1 / s) + ") rotate(-45)");
  }
  fit();
  new MutationObserver(fit).observe(view, { attributes: true, attributeFilter: ["transform"] });
  document.body.setAttribute("data-far-drawn", String(n));
})();
