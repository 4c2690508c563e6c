// Filters the designs table by status and tag. Without JavaScript the full table shows.
(function () {
  "use strict";
  var form = document.getElementById("filters");
  var table = document.getElementById("designs");
  if (!form || !table) { return; }
  var status = document.getElementById("filter-status");
  var tag = document.getElementById("filter-tag");
  var count = document.getElementById("filter-count");
  var rows = table.tBodies[0].rows;

  function apply() {
    var shown = 0;
    for (var i = 0; i < rows.length; i += 1) {
      var row = rows[i];
      var tags = (row.getAttribute("data-tags") || "").split("|");
      var ok = (!status.value || row.getAttribute("data-status") === status.value) &&
               (!tag.value || tags.indexOf(tag.value) >= 0);
      row.hidden = !ok;
      if (ok) { shown += 1; }
    }
    count.textContent = shown + " of " + rows.length + " designs shown";
  }

  form.hidden = false;
  form.addEventListener("submit", function (event) { event.preventDefault(); });
  status.addEventListener("change", apply);
  tag.addEventListener("change", apply);
  apply();
}());
