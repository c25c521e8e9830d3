// The airway level as findings come in: the form works without this script.
(function () {
  "use strict";
  var form = document.getElementById("assessment");
  var live = document.getElementById("live");
  if (!form || !live || !window.fetch) { return; }
  var timer = null;
  function update() {
    var body = new URLSearchParams(new FormData(form));
    fetch("/api/level", { method: "POST", body: body, credentials: "same-origin" })
      .then(function (r) { return r.json(); })
      .then(function (d) {
        if (!d.heading) { live.textContent = ""; return; }
        var text = d.heading + (d.drivers && d.drivers.length ? " (" + d.drivers.join(", ") + ")" : "");
        if (d.converted && d.converted.length) { text += ". Converted: " + d.converted.join("; "); }
        live.textContent = text;
      })
      .catch(function () { live.textContent = ""; });
  }
  form.addEventListener("input", function () { clearTimeout(timer); timer = setTimeout(update, 250); });
  form.addEventListener("change", update);
})();
