// basisbook offline search: ranks the build-time index (assets/search-index.js).
// A query is compared with each quantity's symbol as engineers type it (Ik", Ik, x_d, xd,
// η, eta, SrT) and with its words; exact symbols come first, then the symbol without its
// primes, then symbols that begin with the query, then word matches, each in page order.
// Results are built with textContent only, so project text can never become markup.
(function () {
  "use strict";
  var box = document.getElementById("bb-search");
  var list = document.getElementById("bb-search-results");
  var root = document.body.getAttribute("data-root") || "";
  var index = window.BASISBOOK_SEARCH || [];
  var greek = window.BASISBOOK_GREEK || {};
  var LIMIT = 40;
  if (!box || !list) { return; }

  // the same reduction as symbol_key() in basisbook/rendering/search_index.py
  function key(text) {
    var t = text.replace(/″|''|“|”/g, '"').replace(/′|’/g, "'");
    var out = "";
    for (var i = 0; i < t.length; i++) { out += greek.hasOwnProperty(t[i]) ? greek[t[i]] : t[i]; }
    return out.replace(/[\s_{}^,\\]/g, "");
  }
  function unprimed(k) { return k.replace(/["']/g, ""); }
  function primes(k) { return k.replace(/[^"']/g, ""); }

  // primes may be typed where the eye reads them (Ik" for I″k) or left out (Ik)
  function rank(e, q, ql, words) {
    if (e.y) {
      if (e.y === q) { return 0; }
      var yl = e.y.toLowerCase();
      if (yl === ql) { return 1; }
      var qu = unprimed(ql), qp = primes(ql), yu = unprimed(yl);
      var samePrimes = qp === "" || qp === primes(yl);
      if (qu.length > 0 && yu === qu && samePrimes) { return 2; }
      if (qu.length > 1 && yu.indexOf(qu) === 0 && samePrimes) { return 3; }
    }
    var hay = (e.t + " " + e.s + " " + e.k + " " + (e.p || "")).toLowerCase();
    for (var i = 0; i < words.length; i++) { if (hay.indexOf(words[i]) < 0) { return -1; } }
    return 4;
  }

  function show(query) {
    while (list.firstChild) { list.removeChild(list.firstChild); }
    var words = query.toLowerCase().split(/\s+/).filter(function (w) { return w.length > 0; });
    if (words.length === 0) { list.hidden = true; return; }
    var q = key(query.trim());
    var ql = q.toLowerCase();
    var hits = [];
    for (var i = 0; i < index.length; i++) {
      var r = rank(index[i], q, ql, words);
      if (r >= 0) { hits.push([r, i]); }
    }
    hits.sort(function (a, b) { return a[0] - b[0] || a[1] - b[1]; });
    hits = hits.slice(0, LIMIT);
    for (var j = 0; j < hits.length; j++) {
      var e = index[hits[j][1]];
      var li = document.createElement("li");
      var a = document.createElement("a");
      a.href = root + e.h;
      a.textContent = e.t;
      li.appendChild(a);
      var detail = document.createElement("span");
      detail.className = "bb-kind";
      detail.textContent = " " + e.k + (e.v ? " = " + e.v : "") + (e.p ? " · " + e.p : "");
      li.appendChild(detail);
      list.appendChild(li);
    }
    if (hits.length === 0) {
      var none = document.createElement("li");
      none.textContent = "no match";
      list.appendChild(none);
    }
    list.hidden = false;
  }
  box.addEventListener("input", function () { show(box.value); });
  box.addEventListener("keydown", function (ev) {
    if (ev.key === "Enter") {
      var first = list.querySelector("a");
      if (first) { window.location.href = first.href; }
    }
  });
})();
