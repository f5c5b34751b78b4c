/* Offline search over window.SITEGEN_SEARCH (search-index.js, loaded with
   <script src> so it also works from file://). Every query word must be a
   prefix of some word of a document; matches in the title weigh most. */
(function () {
  "use strict";
  var data = window.SITEGEN_SEARCH;
  var form = document.querySelector(".search-form");
  if (!form || !data) { return; }
  var input = form.querySelector("input[type=search]");
  var list = document.getElementById("search-results");
  var count = document.getElementById("search-count");
  var root = form.getAttribute("data-root") || "";
  var WEIGHTS = { title: 8, analyte: 6, reagents: 4, formulas: 4, matrix: 3, text: 1 };

  function tokens(s) {
    return String(s || "").toLowerCase().normalize("NFD").replace(/[\u0300-\u036f]/g, "")
      .split(/[^a-z0-9]+/).filter(function (t) { return t.length > 0; });
  }

  var docs = data.documents.map(function (d) {
    var fields = {};
    Object.keys(WEIGHTS).forEach(function (f) { fields[f] = tokens(d[f]); });
    return { doc: d, fields: fields };
  });

  function score(entry, q) {
    var total = 0;
    for (var i = 0; i < q.length; i++) {
      var best = 0;
      Object.keys(WEIGHTS).forEach(function (f) {
        var words = entry.fields[f];
        for (var j = 0; j < words.length; j++) {
          if (words[j].indexOf(q[i]) === 0) {
            var w = WEIGHTS[f] * (words[j].length === q[i].length ? 2 : 1);
            if (w > best) { best = w; }
          }
        }
      });
      if (best === 0) { return 0; }
      total += best;
    }
    return total;
  }

  function render(hits, q) {
    list.textContent = "";
    hits.forEach(function (h) {
      var li = document.createElement("li");
      var a = document.createElement("a");
      a.href = root + h.doc.url;
      a.textContent = h.doc.title;
      li.appendChild(a);
      var meta = document.createElement("span");
      meta.className = "item-meta";
      meta.textContent = (h.doc.status === "draft" ? "DRAFT - not for use · " : "") +
        h.doc.analyte + " · " + h.doc.matrix;
      li.appendChild(meta);
      list.appendChild(li);
    });
    if (!q.length) { count.textContent = ""; return; }
    count.textContent = hits.length === 1 ? "1 method found" : hits.length + " methods found";
  }

  function run() {
    var q = tokens(input.value);
    var hits = [];
    if (q.length) {
      docs.forEach(function (e) {
        var s = score(e, q);
        if (s > 0) { hits.push({ doc: e.doc, score: s }); }
      });
      hits.sort(function (a, b) {
        return b.score - a.score || (a.doc.title < b.doc.title ? -1 : a.doc.title > b.doc.title ? 1 : 0);
      });
    }
    render(hits, q);
  }

  function links() { return list.querySelectorAll("a"); }

  input.addEventListener("input", run);
  input.addEventListener("keydown", function (e) {
    var a = links();
    if (e.key === "ArrowDown" && a.length) { e.preventDefault(); a[0].focus(); }
    else if (e.key === "Enter" && a.length) { e.preventDefault(); a[0].click(); }
  });
  list.addEventListener("keydown", function (e) {
    var a = Array.prototype.slice.call(links());
    var i = a.indexOf(document.activeElement);
    if (i < 0) { return; }
    if (e.key === "ArrowDown") { e.preventDefault(); (a[i + 1] || a[i]).focus(); }
    else if (e.key === "ArrowUp") { e.preventDefault(); if (i === 0) { input.focus(); } else { a[i - 1].focus(); } }
    else if (e.key === "Escape") { input.focus(); }
  });
  count.textContent = "";
  if (input.value) { run(); }
})();
