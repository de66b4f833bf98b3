package page

// pageSelfCheckJS is appended to the page's script in the browser test. It
// acts as a user would: hovers a station and a region (synthetic pointer
// events at their centres), zooms with the wheel, sorts the table, and writes
// what the page showed into body attributes for the dumped DOM.
const pageSelfCheckJS = `
(function () {
  "use strict";
  var b = document.body, svg = document.getElementById("map"), tip = document.getElementById("tooltip");
  function at(el) { var r = el.getBoundingClientRect(); return { clientX: r.left + r.width / 2, clientY: r.top + r.height / 2, bubbles: true }; }
  function move(el, opts) { svg.dispatchEvent(new PointerEvent("pointermove", opts || at(el))); return tip.hidden ? "" : tip.textContent; }
  var st = document.querySelector("#layer-stations circle");
  if (st) b.setAttribute("data-tip-station", move(st));
  var reg = document.querySelector("#layer-regions .region-hit");
  if (reg) {
    var bb = reg.getBBox(), m = reg.getScreenCTM();
    var p = new DOMPoint(bb.x + bb.width * 0.3, bb.y + bb.height * 0.5).matrixTransform(m);
    b.setAttribute("data-tip-region", move(reg, { clientX: p.x, clientY: p.y, bubbles: true }));
  }
  var before = document.getElementById("view").getAttribute("transform");
  var r = svg.getBoundingClientRect();
  svg.dispatchEvent(new WheelEvent("wheel", { deltaY: -300, clientX: r.left + r.width / 2, clientY: r.top + r.height / 2, bubbles: true, cancelable: true }));
  window.requestAnimationFrame(function () {
    b.setAttribute("data-zoomed", String(document.getElementById("view").getAttribute("transform") !== before));
    b.setAttribute("data-grat-labels", String(document.querySelectorAll("#labels text").length));
  });
  var btn = document.querySelector("#regions-table thead th:nth-child(4) button");
  if (btn) {
    btn.click(); btn.click();
    var tb = document.querySelector("#regions-table tbody");
    var order = [];
    for (var i = 0; i < tb.rows.length; i++) order.push(tb.rows[i].cells[0].getAttribute("data-v"));
    b.setAttribute("data-sorted", order.join("|"));
  }
  b.setAttribute("data-selfcheck", "1");
})();
`
