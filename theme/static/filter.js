/* Home page filters (progressive enhancement: without JavaScript the
   filter controls stay hidden and every approved method is listed). */
(function () {
  "use strict";
  var box = document.querySelector(".filters");
  if (!box) { return; }
  var selects = box.querySelectorAll("select[data-filter]");
  var items = document.querySelectorAll("#approved ~ .analyte-group .method-item");
  var groups = document.querySelectorAll(".analyte-group");
  var count = box.querySelector(".filter-count");
  box.hidden = false;

  function apply() {
    var want = {};
    Array.prototype.forEach.call(selects, function (s) { want[s.getAttribute("data-filter")] = s.value; });
    var shown = 0;
    Array.prototype.forEach.call(items, function (li) {
      var ok = Object.keys(want).every(function (k) {
        return !want[k] || li.getAttribute("data-" + k) === want[k];
      });
      li.hidden = !ok;
      if (ok) { shown += 1; }
    });
    Array.prototype.forEach.call(groups, function (g) {
      g.hidden = g.querySelectorAll(".method-item:not([hidden])").length === 0;
    });
    count.textContent = shown + " of " + items.length + " approved methods shown";
  }
  Array.prototype.forEach.call(selects, function (s) { s.addEventListener("change", apply); });
  apply();
})();
