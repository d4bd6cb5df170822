// The punch list's filters (machine, owner, state): progressive enhancement over the plain
// table, which lists every deficiency without JavaScript.
(function () {
  "use strict";
  var form = document.getElementById("punch-filters");
  var table = document.getElementById("punch-table");
  if (!form || !table) { return; }
  var selects = form.querySelectorAll("select[data-filter]");
  var rows = table.querySelectorAll("tr.punch-row");
  var empty = document.getElementById("punch-empty");
  function apply() {
    var shown = 0;
    rows.forEach(function (row) {
      var match = true;
      selects.forEach(function (select) {
        var wanted = select.value;
        if (wanted !== "" && row.getAttribute("data-" + select.getAttribute("data-filter")) !== wanted) {
          match = false;
        }
      });
      row.hidden = !match;
      if (match) { shown += 1; }
    });
    if (empty) { empty.hidden = shown !== 0; }
  }
  selects.forEach(function (select) { select.addEventListener("change", apply); });
  form.hidden = false;
  apply();
})();
