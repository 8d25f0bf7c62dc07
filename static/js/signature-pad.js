/* The signing pad: a canvas drawn on with a finger (or stylus or mouse) through pointer
   events. On submit, what was drawn goes into the form's hidden `signature` input as a
   PNG data URL (inspections/services/signatures.py checks it). Nothing drawn: the input
   stays empty and the server says so. No inline script or style: the strict CSP allows
   only files from this site. Markup: templates/inspections/_signature_pad.html. */
(function () {
  "use strict";

  // A phone or tablet reports 2 or 3; past 2 the PNG only grows, the line looks the same.
  var MAX_RATIO = 2;
  var LINE_WIDTH = 2.6; // CSS pixels: a pen line, thick enough to read on a printed record

  function setUp(pad) {
    var frame = pad.querySelector("[data-signature-frame]");
    var canvas = pad.querySelector("[data-signature-canvas]");
    var input = pad.querySelector("[data-signature-input]");
    var tools = pad.querySelector("[data-signature-tools]");
    var clear = pad.querySelector("[data-signature-clear]");
    var state = pad.querySelector("[data-signature-state]");
    var form = pad.closest("form");
    if (!frame || !canvas || !input || !form || !canvas.getContext) return;
    frame.hidden = false;
    if (tools) tools.hidden = false;

    var context = canvas.getContext("2d");
    // Strokes in CSS pixels, so a resize (the tablet turned) redraws them at the new size.
    var strokes = [];
    var current = null;

    function paint() {
      var ratio = Math.min(window.devicePixelRatio || 1, MAX_RATIO);
      context.setTransform(ratio, 0, 0, ratio, 0, 0);
      context.clearRect(0, 0, canvas.width, canvas.height);
      context.lineCap = "round";
      context.lineJoin = "round";
      context.lineWidth = LINE_WIDTH;
      context.strokeStyle = "#0a0d12";
      context.fillStyle = "#0a0d12";
      strokes.forEach(function (points) {
        if (points.length === 1) {
          context.beginPath();
          context.arc(points[0][0], points[0][1], LINE_WIDTH / 2, 0, Math.PI * 2);
          context.fill();
          return;
        }
        context.beginPath();
        context.moveTo(points[0][0], points[0][1]);
        for (var i = 1; i < points.length; i++) context.lineTo(points[i][0], points[i][1]);
        context.stroke();
      });
    }

    function fit() {
      var ratio = Math.min(window.devicePixelRatio || 1, MAX_RATIO);
      var box = canvas.getBoundingClientRect();
      var width = Math.max(1, Math.round(box.width * ratio));
      var height = Math.max(1, Math.round(box.height * ratio));
      if (canvas.width !== width || canvas.height !== height) {
        canvas.width = width;
        canvas.height = height;
      }
      paint();
    }

    function say() {
      if (state) state.textContent = strokes.length ? "Signature drawn." : "Nothing drawn yet.";
      pad.classList.toggle("is-signed", strokes.length > 0);
    }

    function point(event) {
      var box = canvas.getBoundingClientRect();
      return [event.clientX - box.left, event.clientY - box.top];
    }

    canvas.addEventListener("pointerdown", function (event) {
      if (event.button !== undefined && event.button > 0) return;
      event.preventDefault();
      if (canvas.setPointerCapture) canvas.setPointerCapture(event.pointerId);
      current = [point(event)];
      strokes.push(current);
      paint();
      say();
    });
    canvas.addEventListener("pointermove", function (event) {
      if (!current) return;
      event.preventDefault();
      // Coalesced events keep a quick stroke smooth on touch screens.
      var events = event.getCoalescedEvents ? event.getCoalescedEvents() : [event];
      if (!events.length) events = [event];
      events.forEach(function (e) { current.push(point(e)); });
      paint();
    });
    // Touches on the pad are the page's alone: without this a quick stroke can still be
    // read by the browser as a fling, and the next tap (on Clear or Sign) is swallowed to
    // stop it. Pointer events above still fire.
    ["touchstart", "touchmove"].forEach(function (type) {
      canvas.addEventListener(type, function (event) { event.preventDefault(); }, { passive: false });
    });
    function end() { current = null; }
    canvas.addEventListener("pointerup", end);
    canvas.addEventListener("pointercancel", end);
    canvas.addEventListener("lostpointercapture", end);

    if (clear) {
      clear.addEventListener("click", function () {
        strokes = [];
        current = null;
        input.value = "";
        paint();
        say();
      });
    }

    form.addEventListener("submit", function () {
      input.value = strokes.length ? canvas.toDataURL("image/png") : "";
    });

    var pending = null;
    window.addEventListener("resize", function () {
      if (pending) window.cancelAnimationFrame(pending);
      pending = window.requestAnimationFrame(fit);
    });
    fit();
    say();
  }

  function start() {
    Array.prototype.forEach.call(document.querySelectorAll("[data-signature-pad]"), setUp);
  }
  if (document.readyState === "loading") document.addEventListener("DOMContentLoaded", start);
  else start();
})();
