// drygrid map page: draws the inline GeoJSON layers as SVG, with pan, zoom,
// tooltips and a sortable region table. Plain JavaScript, no library, no
// network: the page's Content-Security-Policy forbids every load.
(function () {
  "use strict";
  var body = document.body;
  var nErr = 0, nCsp = 0;
  function noteError(msg) {
    nErr++;
    body.setAttribute("data-errors", String(nErr));
    body.setAttribute("data-last-error", String(msg).slice(0, 300));
  }
  window.addEventListener("error", function (e) { noteError(e.message || "error"); });
  window.addEventListener("unhandledrejection", function (e) {
    noteError("unhandled rejection: " + (e.reason && e.reason.message ? e.reason.message : e.reason));
  });
  document.addEventListener("securitypolicyviolation", function (e) {
    nCsp++;
    body.setAttribute("data-csp-violations", String(nCsp));
    body.setAttribute("data-last-violation", e.violatedDirective + " " + e.blockedURI);
  });

  var svg = document.getElementById("map");
  var SVGNS = svg.namespaceURI;
  var view = document.getElementById("view");
  var layerBands = document.getElementById("layer-bands");
  var layerGrat = document.getElementById("layer-graticule");
  var layerRegions = document.getElementById("layer-regions");
  var layerStations = document.getElementById("layer-stations");
  var labels = document.getElementById("labels");
  var frame = document.getElementById("frame");
  var wrap = document.getElementById("map-wrap");
  var tip = document.getElementById("tooltip");
  var STEPS = [0.1, 0.2, 0.5, 1, 2, 5, 10, 15, 30];

  function el(name, attrs, parent) {
    var e = document.createElementNS(SVGNS, name);
    for (var k in attrs) {
      if (Object.prototype.hasOwnProperty.call(attrs, k)) e.setAttribute(k, String(attrs[k]));
    }
    if (parent) parent.appendChild(e);
    return e;
  }
  function html(name, text, parent, cls) {
    var e = document.createElement(name);
    if (text !== undefined && text !== null) e.textContent = text;
    if (cls) e.className = cls;
    if (parent) parent.appendChild(e);
    return e;
  }
  function readJSON(id) {
    var n = document.getElementById(id);
    var t = n ? n.textContent.trim() : "";
    return t ? JSON.parse(t) : null;
  }
  function features(doc) {
    if (!doc || typeof doc !== "object") return [];
    if (doc.type === "FeatureCollection" && Array.isArray(doc.features)) return doc.features;
    if (doc.type === "Feature") return [doc];
    return [];
  }
  function polygonsOf(g) {
    if (!g || !Array.isArray(g.coordinates) && g.type !== "GeometryCollection") return [];
    if (g.type === "Polygon") return [g.coordinates];
    if (g.type === "MultiPolygon") return g.coordinates;
    if (g.type === "GeometryCollection" && Array.isArray(g.geometries)) {
      return g.geometries.reduce(function (a, x) { return a.concat(polygonsOf(x)); }, []);
    }
    return [];
  }
  function pointsOf(g) {
    if (!g || !Array.isArray(g.coordinates)) return [];
    if (g.type === "Point") return [g.coordinates];
    if (g.type === "MultiPoint") return g.coordinates;
    return [];
  }
  function num(v) { return typeof v === "number" && isFinite(v); }
  function fmt(v, d) { return num(v) ? v.toFixed(d) : "–"; }
  function safeColor(c) { return typeof c === "string" && /^#[0-9a-fA-F]{6}$/.test(c) ? c : null; }

  var meta = readJSON("drygrid-meta") || {};
  var bb = meta.bbox || [-180, -90, 180, 90];
  var W = bb[0], S = bb[1], E = bb[2], N = bb[3];
  var crossing = E > 180 + 1e-9;
  var kx = Math.max(Math.cos((N + S) / 2 * Math.PI / 180), 0.25);
  var worldW = (E - W) * kx, worldH = N - S;
  // Equirectangular, true scale at the middle latitude. On a grid crossing
  // the antimeridian, longitudes west of it run on past 180.
  function wx(lon) { if (crossing && lon < W - 1e-9) lon += 360; return (lon - W) * kx; }
  function wy(lat) { return N - lat; }
  function r4(v) { return Math.round(v * 1e4) / 1e4; }
  function polysPath(polys) {
    var out = [];
    polys.forEach(function (poly) {
      (Array.isArray(poly) ? poly : []).forEach(function (ring) {
        var s = "";
        (Array.isArray(ring) ? ring : []).forEach(function (p) {
          if (!Array.isArray(p) || !num(p[0]) || !num(p[1])) return;
          s += (s ? "L" : "M") + r4(wx(p[0])) + " " + r4(wy(p[1]));
        });
        if (s) out.push(s + "Z");
      });
    });
    return out.join("");
  }

  var bandByKey = {}, bandByCode = {};
  (meta.bands || []).forEach(function (b) { bandByKey[b.key] = b; bandByCode[b.code] = b; });
  function bandOf(p) { return bandByKey[p.key] || bandByCode[p.code] || null; }

  // Layers.
  var ext = document.getElementById("extent");
  var nBands = 0, nStations = 0, nRegions = 0;
  features(readJSON("drygrid-bands")).forEach(function (f) {
    var p = f.properties || {};
    var d = polysPath(polygonsOf(f.geometry));
    if (!d) return;
    var b = bandOf(p);
    var c = safeColor(p.color) || (b && b.color) || "#999999";
    var path = el("path", { d: d, fill: c, stroke: c, "stroke-width": 0.6, "vector-effect": "non-scaling-stroke", "fill-rule": "evenodd" }, layerBands);
    path.drygridBand = { label: p.label || (b && b.label) || String(p.key || p.code), range: b ? b.range : "", color: c };
    nBands++;
  });

  var stationEls = [];
  features(readJSON("drygrid-stations")).forEach(function (f) {
    var p = f.properties || {};
    pointsOf(f.geometry).forEach(function (c) {
      if (!Array.isArray(c) || !num(c[0]) || !num(c[1])) return;
      var out = p.in_grid === false;
      var e = el("circle", { cx: r4(wx(c[0])), cy: r4(wy(c[1])), r: 0.1, fill: out ? "#ffffff" : "#1a1a1a", stroke: out ? "#1a1a1a" : "#ffffff", "stroke-width": 1.5, "vector-effect": "non-scaling-stroke", "class": "station" }, layerStations);
      e.drygridStation = p;
      stationEls.push(e);
      nStations++;
    });
  });

  var rows = Array.isArray(meta.regions) ? meta.regions : [];
  var rowByName = {};
  rows.forEach(function (r) { rowByName[r.name] = r; });
  function regionName(p) {
    var keys = ["name", "region", "NAME", "Name", "id"], k, v;
    for (var i = 0; i < keys.length; i++) {
      v = p[keys[i]];
      if (v !== undefined && v !== null && rowByName[String(v)]) return String(v);
    }
    for (k in p) {
      if (Object.prototype.hasOwnProperty.call(p, k) && p[k] !== null && rowByName[String(p[k])]) return String(p[k]);
    }
    for (i = 0; i < keys.length; i++) if (typeof p[keys[i]] === "string") return p[keys[i]];
    return "";
  }
  features(readJSON("drygrid-regions")).forEach(function (f) {
    var p = f.properties || {};
    var d = polysPath(polygonsOf(f.geometry));
    if (!d) return;
    el("path", { d: d, fill: "none", stroke: "#ffffff", "stroke-opacity": 0.75, "stroke-width": 3.5, "stroke-linejoin": "round", "vector-effect": "non-scaling-stroke" }, layerRegions);
    var name = regionName(p);
    var e = el("path", { d: d, fill: "#000000", "fill-opacity": 0, "fill-rule": "evenodd", stroke: "#1a1a1a", "stroke-width": 1.4, "stroke-linejoin": "round", "vector-effect": "non-scaling-stroke", "class": "region-line region-hit" }, layerRegions);
    e.drygridRegion = { name: name, row: rowByName[name] || null };
    nRegions++;
  });

  // View: screen = world * s + (tx, ty).
  var st = { s: 1, tx: 0, ty: 0 }, fitS = 1, vw = 0, vh = 0, pending = false;
  function measure() { var r = svg.getBoundingClientRect(); vw = r.width || 800; vh = r.height || 500; }
  function fitHeight() {
    // The map box takes the grid's shape, within [320 px, 75 % of the window].
    var w = svg.getBoundingClientRect().width || 800;
    var h = Math.min(Math.max(w * 0.92 * worldH / worldW + 40, 320), Math.max(320, window.innerHeight * 0.75));
    svg.style.height = Math.round(h) + "px";
  }
  function resetView() {
    fitHeight();
    measure();
    fitS = Math.min(vw / worldW, vh / worldH) * 0.92;
    st.s = fitS;
    st.tx = (vw - worldW * fitS) / 2;
    st.ty = (vh - worldH * fitS) / 2;
    apply();
  }
  function zoomAt(f, cx, cy) {
    var ns = Math.min(Math.max(st.s * f, fitS * 0.5), fitS * 500);
    f = ns / st.s;
    st.tx = cx - (cx - st.tx) * f;
    st.ty = cy - (cy - st.ty) * f;
    st.s = ns;
    schedule();
  }
  function schedule() {
    if (pending) return;
    pending = true;
    window.requestAnimationFrame(function () { pending = false; apply(); });
  }
  function apply() {
    view.setAttribute("transform", "matrix(" + st.s + " 0 0 " + st.s + " " + st.tx + " " + st.ty + ")");
    var r = 4 / st.s;
    for (var i = 0; i < stationEls.length; i++) stationEls[i].setAttribute("r", r);
    [frame, ext].forEach(function (r) {
      r.setAttribute("x", st.tx);
      r.setAttribute("y", st.ty);
      r.setAttribute("width", worldW * st.s);
      r.setAttribute("height", worldH * st.s);
    });
    graticule();
  }
  function decimals(step) { for (var d = 0; d < 4; d++) if (Math.abs(step * Math.pow(10, d) - Math.round(step * Math.pow(10, d))) < 1e-9) return d; return 4; }
  function lonLabel(lon, d) {
    while (lon > 180 + 1e-9) lon -= 360;
    while (lon <= -180 + 1e-9) lon += 360;
    var a = Math.abs(lon), s = a.toFixed(d) + "°";
    if (a < 1e-9 || Math.abs(a - 180) < 1e-9) return s;
    return s + (lon < 0 ? "W" : "E");
  }
  function latLabel(lat, d) {
    var a = Math.abs(lat), s = a.toFixed(d) + "°";
    return a < 1e-9 ? s : s + (lat < 0 ? "S" : "N");
  }
  function graticule() {
    while (layerGrat.firstChild) layerGrat.removeChild(layerGrat.firstChild);
    while (labels.firstChild) labels.removeChild(labels.firstChild);
    var x0 = Math.max(0, -st.tx / st.s), x1 = Math.min(worldW, (vw - st.tx) / st.s);
    var y0 = Math.max(0, -st.ty / st.s), y1 = Math.min(worldH, (vh - st.ty) / st.s);
    if (!(x1 > x0 && y1 > y0)) return;
    var step = STEPS[STEPS.length - 1];
    for (var i = 0; i < STEPS.length; i++) {
      if (STEPS[i] * kx * st.s >= 80 && STEPS[i] * st.s >= 45) { step = STEPS[i]; break; }
    }
    var d = decimals(step), v, k, x, y, t;
    var lonA = W + x0 / kx, lonB = W + x1 / kx, latA = N - y1, latB = N - y0;
    var yLab = Math.min(st.ty + worldH * st.s + 15, vh - 6);
    var xLab = Math.max(st.tx, 0) + 5;
    for (k = Math.ceil(lonA / step - 1e-9); k * step <= lonB + 1e-9; k++) {
      v = Math.round(k * step * 1e6) / 1e6;
      x = (v - W) * kx;
      el("line", { x1: x, y1: y0, x2: x, y2: y1, stroke: "#141414", "stroke-opacity": 0.28, "stroke-width": 1, "vector-effect": "non-scaling-stroke" }, layerGrat);
      t = el("text", { x: x * st.s + st.tx, y: yLab, "text-anchor": "middle", "class": "grat-label" }, labels);
      t.textContent = lonLabel(v, d);
    }
    for (k = Math.ceil(latA / step - 1e-9); k * step <= latB + 1e-9; k++) {
      v = Math.round(k * step * 1e6) / 1e6;
      y = N - v;
      el("line", { x1: x0, y1: y, x2: x1, y2: y, stroke: "#141414", "stroke-opacity": 0.28, "stroke-width": 1, "vector-effect": "non-scaling-stroke" }, layerGrat);
      t = el("text", { x: xLab, y: y * st.s + st.ty - 4, "class": "grat-label" }, labels);
      t.textContent = latLabel(v, d);
    }
  }

  // Tooltip.
  var hlRow = null, hlPath = null;
  function swatch(color, parent) {
    var s = el("svg", { width: 12, height: 12, "aria-hidden": "true" }, parent);
    el("rect", { x: 0.5, y: 0.5, width: 11, height: 11, fill: color, stroke: "#808080" }, s);
    return s;
  }
  function hideTip() { tip.hidden = true; highlight(null); }
  function highlight(reg) {
    if (hlPath && (!reg || hlPath !== reg.el)) { hlPath.classList.remove("hl"); hlPath = null; }
    if (hlRow) { hlRow.classList.remove("hl"); hlRow = null; }
    if (!reg) return;
    hlPath = reg.el;
    hlPath.classList.add("hl");
    var tb = document.querySelector("#regions-table tbody");
    if (!tb) return;
    for (var i = 0; i < tb.rows.length; i++) {
      if (tb.rows[i].cells[0].getAttribute("data-v") === reg.name) { hlRow = tb.rows[i]; hlRow.classList.add("hl"); break; }
    }
  }
  function hover(e) {
    var stack = document.elementsFromPoint(e.clientX, e.clientY);
    var stn = null, reg = null, band = null, inExt = false;
    for (var i = 0; i < stack.length; i++) {
      var n = stack[i];
      if (!stn && n.drygridStation) stn = n.drygridStation;
      if (!reg && n.drygridRegion) reg = { name: n.drygridRegion.name, row: n.drygridRegion.row, el: n };
      if (!band && n.drygridBand) band = n.drygridBand;
      if (n === ext) inExt = true;
    }
    if (!stn && !reg && !band && !inExt) { hideTip(); return; }
    while (tip.firstChild) tip.removeChild(tip.firstChild);
    if (stn) {
      html("h3", "Station " + (stn.id !== undefined ? stn.id : ""), tip);
      var b = bandOf(stn);
      html("p", "Value: " + (num(stn.value) ? String(stn.value) : (stn.value === undefined || stn.value === null ? "–" : String(stn.value))), tip);
      html("p", "z: " + fmt(stn.z, 2), tip);
      var pb = html("p", null, tip);
      if (b) { swatch(b.color, pb); pb.appendChild(document.createTextNode(" " + b.label + " (" + b.range + ")")); } else pb.textContent = "Band: –";
      if (stn.in_grid === false) html("p", "Outside the grid", tip);
      highlight(null);
    } else {
      if (reg) {
        html("h3", reg.name || "Region", tip);
        var r = reg.row;
        if (r) {
          html("p", "Area: " + (num(r.area_km2) ? Math.round(r.area_km2).toLocaleString("en") : "–") + " km², covered " + fmt(r.covered_pct, 1) + " %", tip);
          html("p", "In drought: " + fmt(r.in_drought_pct, 1) + " % of the covered area", tip);
          html("p", "Mean z: " + fmt(r.mean_z, 2), tip);
          var tbl = html("table", null, tip), tb = html("tbody", null, tbl);
          (meta.bands || []).forEach(function (bd) {
            var v = r.share_pct ? r.share_pct[bd.key] : undefined;
            if (!num(v) || v <= 0) return;
            var tr = html("tr", null, tb), td = html("td", null, tr);
            swatch(bd.color, td);
            html("td", bd.label, tr);
            html("td", v.toFixed(1) + " %", tr, "num");
          });
        } else html("p", "No statistics for this region", tip);
      }
      var here = html("p", null, tip);
      if (band) { swatch(band.color, here); here.appendChild(document.createTextNode(" Here: " + band.label + (band.range ? " (" + band.range + ")" : ""))); } else here.textContent = "Here: " + (meta.nodata_label || "No data");
      highlight(reg);
    }
    tip.hidden = false;
    var wr = wrap.getBoundingClientRect();
    var x = e.clientX - wr.left + 14, y = e.clientY - wr.top + 14;
    if (x + tip.offsetWidth > wr.width - 4) x = Math.max(4, e.clientX - wr.left - tip.offsetWidth - 14);
    if (y + tip.offsetHeight > wr.height - 4) y = Math.max(4, e.clientY - wr.top - tip.offsetHeight - 14);
    tip.style.left = x + "px";
    tip.style.top = y + "px";
  }

  // Pan, zoom, keys.
  var drag = null;
  svg.addEventListener("pointerdown", function (e) {
    if (e.button !== 0) return;
    drag = { x: e.clientX, y: e.clientY, tx: st.tx, ty: st.ty };
    svg.setPointerCapture(e.pointerId);
    svg.classList.add("dragging");
  });
  svg.addEventListener("pointermove", function (e) {
    if (drag) {
      st.tx = drag.tx + e.clientX - drag.x;
      st.ty = drag.ty + e.clientY - drag.y;
      tip.hidden = true;
      schedule();
    } else hover(e);
  });
  function endDrag(e) {
    if (!drag) return;
    drag = null;
    if (svg.hasPointerCapture(e.pointerId)) svg.releasePointerCapture(e.pointerId);
    svg.classList.remove("dragging");
  }
  svg.addEventListener("pointerup", endDrag);
  svg.addEventListener("pointercancel", endDrag);
  svg.addEventListener("pointerleave", function () { if (!drag) hideTip(); });
  svg.addEventListener("wheel", function (e) {
    e.preventDefault();
    var r = svg.getBoundingClientRect();
    zoomAt(Math.pow(1.0015, -e.deltaY * (e.deltaMode === 1 ? 33 : 1)), e.clientX - r.left, e.clientY - r.top);
  }, { passive: false });
  svg.addEventListener("keydown", function (e) {
    var used = true;
    switch (e.key) {
      case "ArrowLeft": st.tx += 60; schedule(); break;
      case "ArrowRight": st.tx -= 60; schedule(); break;
      case "ArrowUp": st.ty += 60; schedule(); break;
      case "ArrowDown": st.ty -= 60; schedule(); break;
      case "+": case "=": zoomAt(1.5, vw / 2, vh / 2); break;
      case "-": case "_": zoomAt(1 / 1.5, vw / 2, vh / 2); break;
      case "0": resetView(); break;
      default: used = false;
    }
    if (used) e.preventDefault();
  });
  document.getElementById("zoom-in").addEventListener("click", function () { measure(); zoomAt(1.5, vw / 2, vh / 2); });
  document.getElementById("zoom-out").addEventListener("click", function () { measure(); zoomAt(1 / 1.5, vw / 2, vh / 2); });
  document.getElementById("zoom-reset").addEventListener("click", resetView);
  window.addEventListener("resize", resetView);

  // Sortable region table.
  var table = document.getElementById("regions-table");
  if (table && table.tHead) {
    var ths = table.tHead.rows[0].cells;
    Array.prototype.forEach.call(ths, function (th) {
      var btn = th.querySelector("button");
      if (!btn) return;
      btn.addEventListener("click", function () {
        var col = th.cellIndex, asc = th.getAttribute("aria-sort") !== "ascending";
        var text = btn.getAttribute("data-type") === "text";
        Array.prototype.forEach.call(ths, function (h) { h.setAttribute("aria-sort", "none"); });
        th.setAttribute("aria-sort", asc ? "ascending" : "descending");
        var tb = table.tBodies[0], list = Array.prototype.slice.call(tb.rows);
        list.sort(function (a, b) {
          var va = a.cells[col].getAttribute("data-v") || "", vb = b.cells[col].getAttribute("data-v") || "";
          var c;
          if (text) c = va.localeCompare(vb);
          else if (va === "" || vb === "") c = (va === "" ? 1 : 0) - (vb === "" ? 1 : 0);
          else c = parseFloat(va) - parseFloat(vb);
          if (va !== "" && vb !== "" || text) c = asc ? c : -c;
          return c || a.cells[0].getAttribute("data-v").localeCompare(b.cells[0].getAttribute("data-v"));
        });
        list.forEach(function (r) { tb.appendChild(r); });
      });
    });
  }

  try {
    resetView();
  } catch (err) {
    noteError(err && err.message ? err.message : err);
    throw err;
  }
  var shown = 0;
  Array.prototype.forEach.call(document.querySelectorAll("#legend .legend-item"), function (li) {
    var r = li.getBoundingClientRect();
    if (r.width > 0 && r.height > 0 && window.getComputedStyle(li).visibility !== "hidden") shown++;
  });
  body.setAttribute("data-legend-shown", String(shown));
  body.setAttribute("data-bands-drawn", String(nBands));
  body.setAttribute("data-stations-drawn", String(nStations));
  body.setAttribute("data-regions-drawn", String(nRegions));
  var res = window.performance && performance.getEntriesByType ? performance.getEntriesByType("resource").length : 0;
  body.setAttribute("data-resources", String(res));
  body.setAttribute("data-rendered", "1");
})();
