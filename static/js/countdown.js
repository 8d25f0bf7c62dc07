/* Live soak countdown. Any <time data-countdown-until="<ISO 8601 with offset>"> gets its
   text updated: every 30 s ("3 h 12 min left", minutes rounded up, as the server writes
   it), every second in the last two minutes ("1 min 35 s left"), and at zero
   "Soak complete: reload to start the retorque". The server renders the first text, so
   the page says the same without JavaScript. Loaded with defer; no inline script (CSP). */
(function () {
  "use strict";

  var DONE = "Soak complete: reload to start the retorque";
  var LAST_STRETCH_MS = 2 * 60 * 1000;

  function words(ms) {
    if (ms < LAST_STRETCH_MS) {
      var seconds = Math.max(1, Math.ceil(ms / 1000));
      var m = Math.floor(seconds / 60);
      var s = seconds % 60;
      return (m ? m + " min " : "") + s + " s left";
    }
    var minutes = Math.max(1, Math.ceil(ms / 60000));
    var hours = Math.floor(minutes / 60);
    minutes = minutes % 60;
    return hours ? hours + " h " + minutes + " min left" : minutes + " min left";
  }

  function start(el) {
    var until = Date.parse(el.getAttribute("data-countdown-until"));
    if (isNaN(until)) {
      return; // keep what the server wrote
    }
    function tick() {
      var left = until - Date.now();
      if (left <= 0) {
        el.textContent = DONE;
        el.setAttribute("data-countdown-done", "");
        return;
      }
      el.textContent = words(left);
      // Next update: on the next whole second near the end, else in 30 s (or sooner,
      // at the start of the last two minutes).
      var wait = left <= LAST_STRETCH_MS ? (left % 1000 || 1000) : Math.min(30000, left - LAST_STRETCH_MS);
      window.setTimeout(tick, Math.max(200, wait));
    }
    tick();
  }

  function init() {
    var nodes = document.querySelectorAll("time[data-countdown-until]");
    for (var i = 0; i < nodes.length; i++) {
      start(nodes[i]);
    }
  }

  if (document.readyState === "loading") {
    document.addEventListener("DOMContentLoaded", init);
  } else {
    init();
  }
})();
