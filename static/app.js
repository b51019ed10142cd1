// Sort tables in place when a column heading is clicked (the heading links
// still sort on the server without JavaScript). Keeps aria-sort and the
// address bar in step so the view stays bookmarkable.
(function () {
  "use strict";
  function cellValue(row, index) {
    var cell = row.children[index];
    if (!cell) { return ""; }
    var v = cell.getAttribute("data-sort");
    return v === null ? cell.textContent.trim() : v;
  }
  function compare(a, b, numeric) {
    if (numeric) {
      var x = parseFloat(a), y = parseFloat(b);
      var xa = isNaN(x), ya = isNaN(y);
      if (xa && ya) { return 0; }
      if (xa) { return 1; }
      if (ya) { return -1; }
      return x - y;
    }
    return a.localeCompare(b);
  }
  function sortBy(table, th) {
    var heads = Array.prototype.slice.call(th.parentNode.children);
    var index = heads.indexOf(th);
    var current = th.getAttribute("aria-sort");
    var descending = current !== "descending";
    var numeric = th.classList.contains("num");
    var body = table.tBodies[0];
    var rows = Array.prototype.slice.call(body.rows);
    rows.sort(function (r1, r2) {
      var c = compare(cellValue(r1, index), cellValue(r2, index), numeric);
      var v1 = cellValue(r1, index), v2 = cellValue(r2, index);
      var missing1 = numeric && isNaN(parseFloat(v1)), missing2 = numeric && isNaN(parseFloat(v2));
      if (missing1 || missing2) { return c; }
      return descending ? -c : c;
    });
    rows.forEach(function (r) { body.appendChild(r); });
    heads.forEach(function (h) { if (h.hasAttribute("aria-sort")) { h.setAttribute("aria-sort", "none"); } });
    th.setAttribute("aria-sort", descending ? "descending" : "ascending");
    var note = document.getElementById("sort-note");
    var key = th.getAttribute("data-key");
    if (note) { note.textContent = "sorted by " + th.textContent.trim() + (descending ? ", high to low" : ", low to high"); }
    if (key && window.history && window.history.replaceState) {
      var url = new URL(window.location.href);
      url.searchParams.set("sort", key);
      url.searchParams.set("dir", descending ? "desc" : "asc");
      window.history.replaceState(null, "", url.toString());
    }
  }
  document.addEventListener("DOMContentLoaded", function () {
    var tables = document.querySelectorAll("table.sortable");
    Array.prototype.forEach.call(tables, function (table) {
      var heads = table.tHead ? table.tHead.rows[0].children : [];
      Array.prototype.forEach.call(heads, function (th) {
        if (!th.hasAttribute("aria-sort")) { return; }
        th.addEventListener("click", function (ev) {
          ev.preventDefault();
          sortBy(table, th);
        });
        th.addEventListener("keydown", function (ev) {
          if ((ev.key === "Enter" || ev.key === " ") && ev.target === th) {
            ev.preventDefault();
            sortBy(table, th);
          }
        });
        if (!th.querySelector("a")) { th.setAttribute("tabindex", "0"); }
      });
    });
  });
})();
