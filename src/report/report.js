// hearsay report: sortable tables and evidence panels. Reads only this page's own elements.
(function () {
  "use strict";
  function cellValue(row, i, numeric) {
    var t = row.cells[i] ? row.cells[i].textContent.trim() : "";
    if (numeric) { var n = parseFloat(t); return isNaN(n) ? -Infinity : n; }
    return t.toLowerCase();
  }
  document.querySelectorAll("table.sortable").forEach(function (table) {
    var heads = table.tHead ? table.tHead.rows[0].cells : [];
    Array.prototype.forEach.call(heads, function (th, i) {
      var button = th.querySelector("button");
      if (!button) { return; }
      button.addEventListener("click", function () {
        var numeric = th.getAttribute("data-type") === "num";
        var asc = th.getAttribute("aria-sort") !== "ascending";
        Array.prototype.forEach.call(heads, function (h) { h.setAttribute("aria-sort", "none"); });
        th.setAttribute("aria-sort", asc ? "ascending" : "descending");
        var body = table.tBodies[0];
        var rows = Array.prototype.slice.call(body.rows);
        rows.sort(function (a, b) {
          var x = cellValue(a, i, numeric), y = cellValue(b, i, numeric);
          var c = x < y ? -1 : x > y ? 1 : 0;
          return asc ? c : -c;
        });
        rows.forEach(function (r) { body.appendChild(r); });
      });
    });
  });
  function showEdge(g) {
    var id = g.getAttribute("data-edge");
    document.querySelectorAll("#claim-graph .edge.selected").forEach(function (e) { e.classList.remove("selected"); });
    document.querySelectorAll(".edge-detail").forEach(function (s) { s.hidden = true; });
    var panel = document.getElementById("edge-detail-" + id);
    if (panel) { panel.hidden = false; }
    var hint = document.getElementById("edge-hint");
    if (hint) { hint.hidden = true; }
    g.classList.add("selected");
  }
  document.querySelectorAll("#claim-graph .edge").forEach(function (g) {
    g.addEventListener("click", function () { showEdge(g); });
    g.addEventListener("keydown", function (ev) {
      if (ev.key === "Enter" || ev.key === " ") { ev.preventDefault(); showEdge(g); }
    });
  });
  // Tells a test (or a curious reader) that the script ran to the end.
  document.body.setAttribute("data-script", "ready");
})();
