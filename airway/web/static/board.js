// The board on a ward screen shows new plans without anyone touching it: it reloads
// every minute, unless the reader has ticked "hold this view".
(function () {
  "use strict";
  var hold = document.getElementById("hold");
  setInterval(function () { if (!hold || !hold.checked) { window.location.reload(); } }, 60000);
})();
