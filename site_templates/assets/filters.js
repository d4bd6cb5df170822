/* Filters for the index: state, area, checklist, open items.
   Progressive enhancement: without this script the index is the plain table. The choices come
   from index-data.js (written by the build) because a page opened from file:// may not fetch
   JSON; each row carries data-state, data-area, data-checklists and data-open. A state's
   option carries its mark beside its word, as every badge of the site does. */
(function () {
  "use strict";
  var data = window.acceptanceIndex;
  var slot = document.getElementById("filters");
  var table = document.getElementById("visit-table");
  if (!data || !slot || !table) { return; }
  var rows = Array.prototype.slice.call(table.querySelectorAll("tbody tr.visit-row"));

  function select(id, label, options) {
    var wrapper = document.createElement("div");
    wrapper.className = "filter";
    var name = document.createElement("label");
    name.htmlFor = id;
    name.textContent = label;
    var control = document.createElement("select");
    control.id = id;
    options.forEach(function (option) {
      var element = document.createElement("option");
      element.value = option.value;
      // A state shows the word and mark the records show (one definition, in the results).
      var label = option.mark ? option.mark + " " + option.label : option.label;
      element.textContent = option.count === undefined ? label
        : label + " (" + option.count + ")";
      control.appendChild(element);
    });
    wrapper.appendChild(name);
    wrapper.appendChild(control);
    return { wrapper: wrapper, control: control };
  }

  var any = { value: "", label: "any" };
  var controls = {
    state: select("filter-state", "State", [any].concat(
      data.states.filter(function (s) { return s.count > 0; }))),
    area: select("filter-area", "Area or line", [any].concat(data.areas)),
    checklist: select("filter-checklist", "Checklist", [any].concat(data.checklists)),
    open: select("filter-open", "Open items", [any,
      { value: "yes", label: "with open items" }, { value: "no", label: "none open" }])
  };
  var form = document.createElement("form");
  form.className = "filters";
  form.setAttribute("role", "search");
  form.setAttribute("aria-label", "Filter the visits");
  var status = document.createElement("p");
  status.className = "filter-status";
  status.id = "filter-status";
  status.setAttribute("aria-live", "polite");
  Object.keys(controls).forEach(function (key) { form.appendChild(controls[key].wrapper); });
  var reset = document.createElement("button");
  reset.type = "reset";
  reset.textContent = "Show all";
  form.appendChild(reset);
  slot.appendChild(form);
  slot.appendChild(status);
  var empty = document.getElementById("filter-empty");

  function apply() {
    var state = controls.state.control.value;
    var area = controls.area.control.value;
    var checklist = controls.checklist.control.value;
    var open = controls.open.control.value;
    var shown = 0, visits = 0;
    rows.forEach(function (row) {
      var d = row.dataset;
      var isVisit = d.state !== "none";
      var match = (!state || d.state === state)
        && (!area || d.area === area)
        && (!checklist || (" " + d.checklists + " ").indexOf(" " + checklist + " ") >= 0)
        && (!open || (open === "yes" ? Number(d.open) > 0 : Number(d.open) === 0));
      if ((state || checklist || open) && !isVisit) { match = false; }
      row.hidden = !match;
      if (match && isVisit) { shown += 1; }
      if (isVisit) { visits += 1; }
    });
    status.textContent = "Showing " + shown + " of " + visits + " visits.";
    if (empty) { empty.hidden = shown > 0 || rows.some(function (r) { return !r.hidden; }); }
  }
  form.addEventListener("change", apply);
  form.addEventListener("reset", function () { window.setTimeout(apply, 0); });
  form.addEventListener("submit", function (event) { event.preventDefault(); });
  apply();
}());
