// basisbook offline search: filters the build-time index (assets/search-index.js).
// Results are built with textContent only, so project text can never become markup.
(function () {
  "use strict";
  var box = document.getElementById("bb-search");
  var list = document.getElementById("bb-search-results");
  var root = document.body.getAttribute("data-root") || "";
  var index = window.BASISBOOK_SEARCH || [];
  if (!box || !list) { return; }
  function show(query) {
    while (list.firstChild) { list.removeChild(list.firstChild); }
    var words = query.toLowerCase().split(/\s+/).filter(function (w) { return w.length > 0; });
    if (words.length === 0) { list.hidden = true; return; }
    var hits = 0;
    for (var i = 0; i < index.length && hits < 40; i++) {
      var e = index[i];
      var hay = (e.t + " " + e.s + " " + e.k).toLowerCase();
      if (words.every(function (w) { return hay.indexOf(w) >= 0; })) {
        var li = document.createElement("li");
        var a = document.createElement("a");
        a.href = root + e.h;
        a.textContent = e.t;
        var kind = document.createElement("span");
        kind.className = "bb-kind";
        kind.textContent = " " + e.k;
        li.appendChild(a);
        li.appendChild(kind);
        list.appendChild(li);
        hits++;
      }
    }
    if (hits === 0) {
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
