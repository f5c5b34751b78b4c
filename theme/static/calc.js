/* In-page result calculator. The formula, factor, molar mass, unit scale
   and rounding come from the JSON island the build wrote, so the page
   computes exactly what the build computed for the worked example. */
(function () {
  "use strict";
  var MINUS = "\u2212";

  function fixed(x, decimals) {
    if (!isFinite(x)) { return "\u2014"; }
    var t = x.toFixed(decimals);
    if (parseFloat(t) === 0) { t = t.replace(/^-/, ""); }
    return t.replace("-", MINUS);
  }

  function compute(d, v) {
    var titre = (v.v_end - v.v_start) - v.v_blank;       /* mL */
    var kind = d.kind;
    var back = kind.indexOf("back-") === 0;
    var base = back ? kind.slice(5) : kind;
    if (base === "titrant-concentration") {
      if (!(titre > 0)) { return NaN; }
      return v.sample * d.purity / (d.molar_mass * d.factor * titre / 1000.0) * d.scale;
    }
    var mmolTitrant = titre * v.conc;
    var mmolAnalyte = back
      ? d.factor * (v.excess_conc * v.excess_volume - d.excess_factor * mmolTitrant)
      : d.factor * mmolTitrant;
    var mg = mmolAnalyte * d.molar_mass;
    if (base === "mass-fraction") { return mg / 1000.0 / v.sample * d.scale; }
    return mg / v.sample * d.scale;                       /* mass concentration, mg/mL */
  }

  function setup(form) {
    var island = form.querySelector("script.calc-data");
    var out = form.querySelector("output");
    if (!island || !out) { return; }
    var d = JSON.parse(island.textContent);
    function update() {
      var values = {};
      var ok = true;
      Array.prototype.forEach.call(form.querySelectorAll("input"), function (inp) {
        var x = parseFloat(String(inp.value).replace(",", "."));
        if (!isFinite(x)) { ok = false; }
        values[inp.name] = x;
      });
      out.textContent = ok ? fixed(compute(d, values), d.decimals) : "\u2014";
    }
    form.addEventListener("input", update);
    form.addEventListener("submit", function (e) { e.preventDefault(); update(); });
    update();
  }

  Array.prototype.forEach.call(document.querySelectorAll("form[data-calc]"), setup);
})();
