// Progressive enhancement for the archive index: filter by verdict, device,
// author and date, and sort the rows. Without this script the page shows the
// full table and the controls stay hidden. No framework; plain DOM.
(function () {
  "use strict";
  var form = document.getElementById("index-controls");
  var table = document.getElementById("archive-index");
  if (!form || !table || !table.tBodies[0]) return;
  var body = table.tBodies[0];
  var rows = Array.prototype.slice.call(body.querySelectorAll("tr[data-status]"));
  var count = document.getElementById("index-count");
  // Verdicts in order of concern: a failed audit first.
  var SEVERITY = { fail: 0, inconclusive: 1, pass: 2 };

  function authorsOf(row) {
    return row.dataset.authors ? row.dataset.authors.split("\n") : [];
  }

  function fill(select, values) {
    values.forEach(function (v) {
      var option = document.createElement("option");
      option.value = v;
      option.textContent = v;
      select.appendChild(option);
    });
  }

  function unique(list) {
    return list.filter(function (v, i) { return v && list.indexOf(v) === i; }).sort(function (a, b) { return a.localeCompare(b); });
  }

  fill(form.elements.device, unique(rows.map(function (r) { return r.dataset.device; })));
  fill(form.elements.author, unique([].concat.apply([], rows.map(authorsOf))));

  function compare(key) {
    var byText = function (name) {
      return function (a, b) { return (a.dataset[name] || "\uffff").localeCompare(b.dataset[name] || "\uffff"); };
    };
    if (key === "date-asc") return byText("date");
    if (key === "date-desc") return function (a, b) { return (b.dataset.date || "").localeCompare(a.dataset.date || ""); };
    if (key === "status") return function (a, b) { return SEVERITY[a.dataset.status] - SEVERITY[b.dataset.status] || byText("title")(a, b); };
    return byText(key);
  }

  function update() {
    var f = form.elements;
    var shown = 0;
    rows.slice().sort(compare(f.sort.value)).forEach(function (row) {
      var d = row.dataset;
      var keep =
        (!f.status.value || d.status === f.status.value) &&
        (!f.device.value || d.device === f.device.value) &&
        (!f.author.value || authorsOf(row).indexOf(f.author.value) >= 0) &&
        (!f.from.value || (d.date && d.date >= f.from.value)) &&
        (!f.to.value || (d.date && d.date <= f.to.value));
      row.hidden = !keep;
      if (keep) shown++;
      body.appendChild(row);
    });
    count.textContent = shown + " of " + rows.length + " audits shown";
  }

  form.addEventListener("input", update);
  form.addEventListener("change", update);
  form.addEventListener("reset", function () { setTimeout(update, 0); });
  form.addEventListener("submit", function (e) { e.preventDefault(); });
  form.hidden = false;
  update();
})();
