/* Waymark report.html: the publication explorer's filters, live count and paging, and sortable columns
   for it and for every table marked data-sortable. The page is complete without this script: it only
   adds controls, hides rows and reorders them. No request, no library. */
(function () {
  "use strict";
  var collator = new Intl.Collator("en", { numeric: true, sensitivity: "base" });
  var each = function (list, fn) { Array.prototype.forEach.call(list, fn); };
  var number = function (n) { return n.toLocaleString("en"); };

  /* Reorder `rows` (the table's original order) by key(row); missing keys (null) go last either way,
     ties keep the original order, so every sort is repeatable. */
  function sortRows(tbody, rows, key, dir) {
    var keyed = rows.map(function (row, i) { return { row: row, key: key(row), i: i }; });
    keyed.sort(function (a, b) {
      if (a.key === null || b.key === null) {
        return a.key === b.key ? a.i - b.i : (a.key === null ? 1 : -1);
      }
      var c = typeof a.key === "number" ? a.key - b.key : collator.compare(a.key, b.key);
      return c ? c * dir : a.i - b.i;
    });
    var fragment = document.createDocumentFragment();
    keyed.forEach(function (k) { fragment.appendChild(k.row); });
    tbody.appendChild(fragment);
  }

  /* Header cells become buttons (keyboard operable as buttons are); aria-sort tells the state.
     keyFor(column, th) gives a row -> key function, or null for a column that does not sort;
     sorted() runs after each sort. Returns a function that sorts again by the current column. */
  function makeSortable(table, keyFor, sorted) {
    var tbody = table.tBodies[0];
    if (!tbody || !table.tHead) { return function () {}; }
    var original = Array.prototype.slice.call(tbody.rows);
    var headers = table.tHead.rows[table.tHead.rows.length - 1].cells;
    var current = null;
    each(headers, function (th, column) {
      var key = keyFor(column, th);
      if (!key) { return; }
      var button = document.createElement("button");
      button.type = "button";
      button.className = "sort";
      while (th.firstChild) { button.appendChild(th.firstChild); }
      th.appendChild(button);
      button.addEventListener("click", function () {
        var state = th.getAttribute("aria-sort");
        var first = th.getAttribute("data-first") || (th.classList.contains("num") ? "descending" : "ascending");
        var next = state === "ascending" ? "descending" : state === "descending" ? "ascending" : first;
        each(headers, function (h) { h.removeAttribute("aria-sort"); });
        th.setAttribute("aria-sort", next);
        current = function () { sortRows(tbody, original, key, next === "ascending" ? 1 : -1); };
        current();
        if (sorted) { sorted(); }
      });
    });
    return function () { if (current) { current(); } };
  }

  /* Key of a plain table cell: numbers from numeric cells and goal codes, text otherwise;
     too-small and missing figures have no key. */
  function cellKey(column) {
    return function (row) {
      var cell = row.cells[column];
      if (!cell || cell.classList.contains("too-small")) { return null; }
      var code = cell.querySelector(".goal-code");
      var text = (code || cell).textContent.trim();
      if (code || cell.classList.contains("num")) {
        var found = text.replace(/,/g, "").match(/[-+]?\d*\.?\d+/);
        return found ? parseFloat(found[0]) : null;
      }
      return text || null;
    };
  }

  function explorer(table) {
    var data = JSON.parse(document.getElementById("explorer-data").textContent).rows;
    var tbody = table.tBodies[0];
    var rows = Array.prototype.slice.call(tbody.rows);
    var field = function (id) { return document.getElementById("explorer-" + id); };
    var goal = field("goal"), department = field("department"), year = field("year");
    var country = field("country"), search = field("search"), count = field("count"), more = field("more");
    // Laying out thousands of rows takes seconds, so the list grows a page at a time.
    var atOnce = parseInt(table.getAttribute("data-rows-at-once"), 10) || rows.length;
    var limit = atOnce, nMatched = 0;
    var labels = function (select) {
      var out = {};
      each(select.options, function (o) { out[o.value] = o.text; });
      return out;
    };
    var departmentNames = labels(department), countryNames = labels(country);
    var texts = rows.map(function (row) {
      return (row.cells[0].textContent + " " + row.cells[5].textContent).toLowerCase();
    });
    var dataOf = new Map(rows.map(function (row, i) { return [row, data[i]]; }));
    var matched = new Map();

    function scoreOf(d, code) {  // d[1] is [goal, score, goal, score, ...], highest score first
      for (var k = 0; k < d[1].length; k += 2) { if (d[1][k] === code) { return d[1][k + 1]; } }
      return null;
    }
    function chosenGoal() {
      return goal.value === "" || goal.value === "any" || goal.value === "none" ? null : goal.value;
    }
    function listMatches(values, chosen) {
      return chosen === "" || (chosen === "none" ? values.length === 0 : values.indexOf(+chosen) >= 0);
    }
    var keys = {
      title: function (row) { return row.cells[0].textContent.trim(); },
      year: function (row) { return dataOf.get(row)[0]; },
      departments: function (row) { var d = dataOf.get(row)[2]; return d.length ? departmentNames[d[0]] : null; },
      countries: function (row) { var c = dataOf.get(row)[3]; return c.length ? countryNames[c[0]] : null; },
      score: function (row) {  // the chosen goal's score, else the strongest one
        var d = dataOf.get(row), code = chosenGoal();
        if (code !== null) { return scoreOf(d, code); }
        return d[1].length ? d[1][1] : null;
      }
    };

    /* List the first `limit` matching rows in the table's current order and say how many match. */
    function show() {
      var listed = 0;
      each(tbody.rows, function (row) {
        var visible = matched.get(row) && listed < limit;
        row.hidden = !visible;
        if (visible) { listed += 1; }
      });
      count.textContent = number(nMatched) + " of " + number(rows.length) + " " + (count.getAttribute("data-noun") || "publications") + " " +
        (listed < nMatched ? "match; the first " + number(listed) + " are shown" : "shown");
      more.hidden = listed >= nMatched;
      more.textContent = "Show " + number(Math.min(atOnce, nMatched - listed)) + " more";
    }
    var resort = makeSortable(table, function (column, th) {
      return keys[th.getAttribute("data-sort")] || null;
    }, show);

    function filter() {
      var code = chosenGoal(), words = search.value.toLowerCase().split(/\s+/).filter(Boolean);
      nMatched = 0;
      rows.forEach(function (row, i) {
        var d = data[i];
        var ok = (goal.value !== "any" || d[1].length > 0) && (goal.value !== "none" || d[1].length === 0) &&
          (code === null || scoreOf(d, code) !== null) && (year.value === "" || d[0] === +year.value) &&
          listMatches(d[2], department.value) && listMatches(d[3], country.value) &&
          words.every(function (w) { return texts[i].indexOf(w) >= 0; });
        matched.set(row, ok);
        if (ok) { nMatched += 1; }
        // With a goal chosen, a publication shows that goal's evidence sentence only.
        each(row.cells[5].querySelectorAll("p[data-goals]"), function (p) {
          p.hidden = code !== null && p.getAttribute("data-goals").split(" ").indexOf(code) < 0;
        });
      });
      limit = atOnce;
      resort();  // the score column's keys follow the chosen goal
      show();
    }

    var pending = null;
    [goal, department, year, country].forEach(function (select) { select.addEventListener("change", filter); });
    search.addEventListener("input", function () {
      clearTimeout(pending);
      pending = setTimeout(filter, 150);  // a large list is filtered once typing pauses
    });
    field("reset").addEventListener("click", function () {
      [goal, department, year, country, search].forEach(function (input) { input.value = ""; });
      filter();
    });
    more.addEventListener("click", function () {
      limit += atOnce;
      show();
    });
    field("controls").hidden = false;
    filter();
  }

  function init() {
    each(document.querySelectorAll("table[data-sortable]"), function (table) {
      makeSortable(table, function (column) { return cellKey(column); });
    });
    var table = document.getElementById("explorer-table");
    if (table) { explorer(table); }
  }

  if (document.readyState === "loading") {
    document.addEventListener("DOMContentLoaded", init);
  } else {
    init();
  }
})();
