"use strict";
(function () {
  // Sorting, filtering and showing one pair at a time. Only reads the page and
  // moves or hides existing elements; never builds markup from text.
  document.documentElement.classList.add("js");
  var table = document.getElementById("pair-table");
  var body = table ? table.tBodies[0] : null;
  var rows = body ? Array.prototype.slice.call(body.rows) : [];
  var pathInput = document.getElementById("filter-path");
  var scoreInput = document.getElementById("filter-score");
  var shown = document.getElementById("shown");
  var sortKey = "rank", sortDir = 1;

  function num(row, key) { return parseFloat(row.getAttribute("data-" + key)); }

  function sortRows(key) {
    if (key === sortKey) { sortDir = -sortDir; } else { sortKey = key; sortDir = key === "rank" ? 1 : -1; }
    rows.sort(function (x, y) {
      var d = (num(x, sortKey) - num(y, sortKey)) * sortDir;
      return d !== 0 ? d : num(x, "rank") - num(y, "rank");
    });
    rows.forEach(function (r) { body.appendChild(r); });
    table.querySelectorAll("th").forEach(function (th) {
      var b = th.querySelector("button");
      if (!b) { return; }
      if (b.getAttribute("data-key") === sortKey) {
        th.setAttribute("aria-sort", sortDir > 0 ? "ascending" : "descending");
      } else {
        th.removeAttribute("aria-sort");
      }
    });
  }

  function filterRows() {
    var needle = (pathInput.value || "").toLowerCase();
    var min = parseFloat(scoreInput.value);
    if (isNaN(min)) { min = 0; }
    var n = 0;
    rows.forEach(function (r) {
      var paths = r.querySelectorAll("td.path");
      var text = (paths[0].textContent + "\n" + paths[1].textContent).toLowerCase();
      var ok = (needle === "" || text.indexOf(needle) >= 0) && num(r, "score") * 100 >= min - 1e-9;
      r.hidden = !ok;
      if (ok) { n++; }
    });
    shown.textContent = n + " of " + rows.length + " pairs shown";
  }

  if (table) {
    table.querySelectorAll("th button").forEach(function (b) {
      b.addEventListener("click", function () { sortRows(b.getAttribute("data-key")); });
    });
    pathInput.addEventListener("input", filterRows);
    scoreInput.addEventListener("input", filterRows);
  }

  // Show the pair that holds the element the address points to.
  function route() {
    var id = decodeURIComponent(location.hash.slice(1));
    var target = id ? document.getElementById(id) : null;
    var pair = target ? target.closest(".pair") : null;
    document.querySelectorAll(".pair.open").forEach(function (s) { if (s !== pair) { s.classList.remove("open"); } });
    document.body.classList.toggle("one-pair", !!pair);
    if (pair) {
      pair.classList.add("open");
      target.scrollIntoView({block: target === pair ? "start" : "center"});
    }
  }
  window.addEventListener("hashchange", route);
  route();
})();
