"use strict";
(function () {
  // Sorting, filtering, showing one pair at a time, and adding what the page
  // keeps as data (rows after the first screen, detail views opened later).
  // Builds elements with createElement and text nodes only; never parses
  // markup from strings. The data block is parsed when first needed.
  //
  // The script runs from the head, before the body is parsed: the class
  // "js" then hides the detail views from the start, so that Chromium never
  // lays out their texts while the page loads; the rest waits for the body.
  document.documentElement.classList.add("js");
  if (document.readyState === "loading") {
    document.addEventListener("DOMContentLoaded", start);
  } else {
    start();
  }

  function start() {

    var data = null;
    function pageData() {
      if (!data) {
        var block = document.getElementById("page-data");
        data = JSON.parse(block.textContent);
      }
      return data;
    }

    // el(tag, attributes, children...): a child is a node or a string (text);
    // empty strings, null and undefined are left out.
    function el(tag, attrs) {
      var e = document.createElement(tag);
      if (attrs) {
        Object.keys(attrs).forEach(function (k) { e.setAttribute(k, String(attrs[k])); });
      }
      for (var i = 2; i < arguments.length; i++) {
        add(e, arguments[i]);
      }
      return e;
    }
    function add(e, c) {
      if (c === null || c === undefined || c === "") { return; }
      e.appendChild(typeof c === "string" ? document.createTextNode(c) : c);
    }
    function link(id, text) { return el("a", {href: "#" + id}, text); }
    function path(p) { return el("span", {"class": "path"}, p); }
    // The same digits Go's percent writes for a fraction of four decimals.
    function pct(f) { return (f * 100).toFixed(2) + "%"; }
    function setMore(button, left, text) {
      button.parentNode.hidden = left <= 0;
      button.textContent = text;
    }

    // ---- The pairs table -------------------------------------------------
    var table = document.getElementById("pair-table");
    var body = table ? table.tBodies[0] : null;
    var total = table ? +table.getAttribute("data-pairs") : 0;
    var pathInput = document.getElementById("filter-path");
    var scoreInput = document.getElementById("filter-score");
    var shown = document.getElementById("shown");
    var morePairs = document.getElementById("more-pairs");
    var step = morePairs ? +morePairs.getAttribute("data-step") : 50;
    var built = {}; // rank -> row element, written or built
    var written = 0;
    if (body) {
      Array.prototype.forEach.call(body.rows, function (r) { built[r.getAttribute("data-rank")] = r; });
      written = body.rows.length;
    }
    var limit = written;
    var order = null; // ranks passing the filters in table order; null: every rank, in rank order
    var sortKey = "rank", sortDir = 1;
    var column = {score: 0, cova: 1, covb: 2, shared: 3, longest: 4};
    var lowPaths = null;

    function key(rank, k) { return k === "rank" ? rank : pageData().rows[rank - 1][column[k]]; }

    // rowEl is the table row of a pair, as the template writes it.
    function rowEl(rank) {
      var r = built[rank];
      if (r) { return r; }
      var d = pageData(), x = d.rows[rank - 1];
      r = el("tr", {"data-rank": rank, "data-score": x[0], "data-cova": x[1], "data-covb": x[2], "data-shared": x[3], "data-longest": x[4]},
        el("td", {"class": "n"}, rank <= d.detailed ? link("pair-" + rank, String(rank)) : String(rank)),
        el("td", {"class": "n"}, pct(x[0])), el("td", {"class": "n"}, pct(x[1])), el("td", {"class": "n"}, pct(x[2])),
        el("td", {"class": "n"}, String(x[3])), el("td", {"class": "n"}, String(x[4])),
        el("td", {"class": "path"}, d.paths[x[5]]), el("td", {"class": "path"}, d.paths[x[6]]),
        el("td", null, x.length > 7 ? "A " + x[7] + ", B " + x[8] : ""));
      built[rank] = r;
      return r;
    }

    function draw() {
      var n = order ? order.length : total;
      var count = Math.min(limit, n);
      var frag = document.createDocumentFragment();
      for (var i = 0; i < count; i++) { frag.appendChild(rowEl(order ? order[i] : i + 1)); }
      body.textContent = "";
      body.appendChild(frag);
      shown.textContent = count + " of " + total + " pairs shown";
      if (morePairs) {
        var left = n - count;
        setMore(morePairs, left, "Show " + Math.min(step, left) + " more pairs (" + left + " not shown)");
      }
    }

    // refresh recomputes the table's order from the filters and the sort.
    function refresh() {
      var d = pageData();
      if (!lowPaths) { lowPaths = d.paths.map(function (p) { return p.toLowerCase(); }); }
      var needle = (pathInput.value || "").toLowerCase();
      var min = parseFloat(scoreInput.value);
      if (isNaN(min)) { min = 0; }
      var ranks = [];
      for (var i = 0; i < d.rows.length; i++) {
        var x = d.rows[i];
        if ((needle === "" || (lowPaths[x[5]] + "\n" + lowPaths[x[6]]).indexOf(needle) >= 0) && x[0] * 100 >= min - 1e-9) {
          ranks.push(i + 1);
        }
      }
      if (sortKey !== "rank" || sortDir !== 1) {
        ranks.sort(function (a, b) {
          var v = (key(a, sortKey) - key(b, sortKey)) * sortDir;
          return v !== 0 ? v : a - b;
        });
      }
      order = ranks;
      limit = Math.max(limit, written);
      draw();
    }

    function sortBy(k) {
      if (k === sortKey) { sortDir = -sortDir; } else { sortKey = k; sortDir = k === "rank" ? 1 : -1; }
      table.querySelectorAll("th").forEach(function (th) {
        var b = th.querySelector("button");
        if (!b) { return; }
        if (b.getAttribute("data-key") === sortKey) {
          th.setAttribute("aria-sort", sortDir > 0 ? "ascending" : "descending");
        } else {
          th.removeAttribute("aria-sort");
        }
      });
      refresh();
    }

    if (table) {
      table.querySelectorAll("th button").forEach(function (b) {
        b.addEventListener("click", function () { sortBy(b.getAttribute("data-key")); });
      });
      pathInput.addEventListener("input", function () { limit = written; refresh(); });
      scoreInput.addEventListener("input", function () { limit = written; refresh(); });
      if (morePairs) {
        morePairs.addEventListener("click", function () { limit += step; draw(); });
      }
    }

    // ---- The other long lists ---------------------------------------------
    // more(buttonId, list, build, into): each click appends the next step of
    // the data's items, built by build, to into.
    function more(buttonId, list, build, into, label) {
      var button = document.getElementById(buttonId);
      if (!button) { return; }
      var next = 0, n = +button.getAttribute("data-step");
      button.addEventListener("click", function () {
        var items = list(), frag = document.createDocumentFragment();
        for (var end = Math.min(items.length, next + n); next < end; next++) { frag.appendChild(build(items[next])); }
        into().appendChild(frag);
        var left = items.length - next;
        setMore(button, left, label(Math.min(n, left), left));
      });
    }

    more("more-docs", function () { return pageData().docs; }, function (x) {
      // [path, words, reused, [[partner, rank], ...], more]
      var d = pageData(), cell = el("td");
      x[3].forEach(function (p, k) {
        if (k > 0) { add(cell, "; "); }
        cell.appendChild(path(d.paths[p[0]]));
        add(cell, " (");
        add(cell, p[1] <= d.detailed ? link("pair-" + p[1], "#" + p[1]) : "#" + p[1]);
        add(cell, ")");
      });
      if (x[4]) { add(cell, "; and " + x[4] + " more"); }
      return el("tr", null, el("td", {"class": "path"}, d.paths[x[0]]), el("td", {"class": "n"}, String(x[1])),
        el("td", {"class": "n", "data-reused": x[2]}, pct(x[2])), cell);
    }, function () { return document.getElementById("doc-table").tBodies[0]; },
    function (k, left) { return "Show " + k + " more documents (" + left + " not shown)"; });

    more("more-groups", function () { return pageData().groups; }, function (x) {
      // [heading, [path, ...]]
      var d = pageData(), li = el("li", null, x[0] + ": ");
      x[1].forEach(function (p, k) {
        if (k > 0) { add(li, ", "); }
        li.appendChild(path(d.paths[p]));
      });
      return li;
    }, function () { return document.getElementById("group-list"); },
    function (k, left) { return "Show more groups (" + left + " not shown)"; });

    more("more-near", function () { return pageData().near; }, function (x) {
      // [number, members, pairs listed, pairs, representative, differs most or -1, [[path, resemblance], ...], more]
      var d = pageData(), frag = document.createDocumentFragment();
      frag.appendChild(el("h3", null, "Set " + x[0] + ": " + x[1] + " documents"));
      var p = el("p", null, x[2] + " of its " + x[3] + " pairs are listed with the pairs below.");
      if (x[5] >= 0) {
        add(p, " Differs most from the representative: ");
        p.appendChild(path(d.paths[x[5]]));
        add(p, ".");
      } else {
        add(p, " Every member holds the same counted " + d.unit + "s.");
      }
      frag.appendChild(p);
      var rows = el("tbody");
      x[6].forEach(function (m) {
        rows.appendChild(el("tr", null, el("td", {"class": "n"}, pct(m[1])),
          el("td", null, path(d.paths[m[0]]), m[0] === x[4] ? " (representative)" : "")));
      });
      frag.appendChild(el("table", null, el("thead", null, el("tr", null,
        el("th", {scope: "col"}, "Resemblance"), el("th", {scope: "col"}, "Document"))), rows));
      if (x[7]) { frag.appendChild(el("p", null, "… and " + x[7] + " more (the JSON report lists them all).")); }
      return frag;
    }, function () { return document.getElementById("near-list"); },
    function (k, left) { return "Show more sets (" + left + " not shown)"; });

    // ---- Detail views kept as data ----------------------------------------
    function sideEl(s) {
      var div = el("div", {"class": "side", "data-side": s.label},
        el("h4", null, el("span", {"class": "sidelabel"}, s.label), " ", path(s.path)));
      if (s.missing) {
        div.appendChild(el("p", {"class": "warn"}, s.missing));
        return div;
      }
      if (!s.short) { div.appendChild(el("p", {"class": "hint"}, "A long document: each passage with some text around it.")); }
      var pre = el("pre", {"class": "text"});
      (s.segs || []).forEach(function (g) {
        if (g.g) {
          pre.appendChild(el("span", {"class": "gap"}, g.g));
        } else if (g.m) {
          if (g.l) { pre.appendChild(el("span", {"class": "num", "aria-hidden": "true"}, String(g.l))); }
          pre.appendChild(el("mark", g.i ? {id: g.i, "data-p": g.m} : {"data-p": g.m}, g.t));
        } else {
          add(pre, g.t);
        }
      });
      div.appendChild(pre);
      return div;
    }

    // buildPair renders pair rank from its data block, in the block's place.
    function buildPair(rank) {
      var block = document.getElementById("pair-data-" + rank);
      if (!block) { return false; }
      var x = JSON.parse(block.textContent), id = "pair-" + rank;
      var pager = el("p", {"class": "pager"}, link("pairs", "Back to the table"));
      if (x.prev) { add(pager, " · "); pager.appendChild(link(x.prev, "Previous pair")); }
      if (x.next) { add(pager, " · "); pager.appendChild(link(x.next, "Next pair")); }
      var labels = ["Score", "Cover A", "Cover B", "Jaccard", "Shared " + x.unit + "s", "Passages", "Longest passage"];
      var fields = ["score", "coverage_a", "coverage_b", "jaccard", "shared", "passages", ""];
      var facts = el("dl", {"class": "facts pairfacts"});
      labels.forEach(function (l, k) {
        facts.appendChild(el("dt", null, l));
        facts.appendChild(el("dd", fields[k] ? {"data-field": fields[k]} : null, x.facts[k]));
      });
      var list = el("ol", {"class": "plist"});
      (x.items || []).forEach(function (it) {
        var li = el("li", {"data-n": it.n}, el("span", {"class": "num"}, String(it.n)), " ",
          it.aid ? link(it.aid, "A " + it.aw) : "A " + it.aw, " · ",
          it.bid ? link(it.bid, "B " + it.bw) : "B " + it.bw, " · " + it.size + " ", el("q", null, it.q));
        if (it.x) {
          var ex = el("div", {"class": "explain"}, el("p", {"class": "small"}, it.x.h));
          [["A", it.x.a], ["B", it.x.b]].forEach(function (sd) {
            var p = el("p", null, el("b", null, sd[0]), " ");
            sd[1].forEach(function (pc) { if (pc[1]) { p.appendChild(el("b", {"class": "sw"}, pc[0])); } else { add(p, pc[0]); } });
            ex.appendChild(p);
          });
          li.appendChild(ex);
        }
        if (!it.aid) { add(li, " "); li.appendChild(el("em", null, "(A's text around it is not shown: page limit)")); }
        if (!it.bid) { add(li, " "); li.appendChild(el("em", null, "(B's text around it is not shown: page limit)")); }
        list.appendChild(li);
      });
      var caution = document.querySelector("footer p").textContent;
      var sec = el("section", {"class": "pair block", id: id, "aria-labelledby": id + "-h"},
        el("h2", {id: id + "-h"}, "Pair " + rank), pager, facts, el("p", {"class": "caution small"}, caution),
        el("h3", null, "Passages"), list);
      if (x.more) {
        sec.appendChild(el("p", {"class": "warn"}, x.more + " more passages are not listed here (at most 200 per pair); the JSON lists all of them."));
      }
      sec.appendChild(el("div", {"class": "sides"}, sideEl(x.sides[0]), sideEl(x.sides[1])));
      block.parentNode.insertBefore(sec, block);
      return true;
    }

    // Show the pair that holds the element the address points to, rendering
    // it first when it is kept as data.
    function route() {
      var id = decodeURIComponent(location.hash.slice(1));
      var target = id ? document.getElementById(id) : null;
      if (id && !target) {
        var m = /^(?:pair-(\d+)|p(\d+)[ab]-\d+)$/.exec(id);
        if (m && buildPair(m[1] || m[2])) { target = document.getElementById(id); }
      }
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
  }
})();
