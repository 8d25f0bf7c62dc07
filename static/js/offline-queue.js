/* The offline queue of torque readings.

   A reading saved on the entry page goes into this browser's localStorage FIRST, then the
   queue is sent to the job's sync endpoint (inspections/views/torque_sync.py). Whatever
   has not been answered stays in storage: it survives a reload and a closed tab, is
   counted in the header badge on every page and listed on the work page, and is sent
   again on page load, when the browser comes back online and on a timer. Each reading
   carries a key made here; the server stores a key once however often it arrives, so a
   reading whose answer was lost is sent again without being doubled. A reading the
   server refuses leaves the queue and its message is shown.

   No eval, no inline handlers: loaded by templates/base.html on every signed-in page. */
(function () {
  "use strict";

  var QUEUE = "ampwright.torque.queue.v1";
  var REFUSED = "ampwright.torque.refused.v1";
  var RETRY_MS = 10000;
  var BATCH = 50; // the endpoint's limit per request
  var sending = false;
  var again = false;
  var waitingKey = null; // the reading this page's form is waiting on

  function load(name) {
    try {
      var list = JSON.parse(window.localStorage.getItem(name) || "[]");
      return Array.isArray(list) ? list : [];
    } catch (e) {
      return [];
    }
  }

  function store(name, list) {
    window.localStorage.setItem(name, JSON.stringify(list));
  }

  function newKey() {
    if (window.crypto && typeof window.crypto.randomUUID === "function") {
      return window.crypto.randomUUID();
    }
    var bytes = new Uint8Array(16);
    window.crypto.getRandomValues(bytes);
    bytes[6] = (bytes[6] & 0x0f) | 0x40;
    bytes[8] = (bytes[8] & 0x3f) | 0x80;
    var hex = Array.prototype.map.call(bytes, function (b) {
      return (b + 0x100).toString(16).slice(1);
    }).join("");
    return [hex.slice(0, 8), hex.slice(8, 12), hex.slice(12, 16), hex.slice(16, 20), hex.slice(20)].join("-");
  }

  function csrfToken() {
    try {
      var headers = JSON.parse(document.body.getAttribute("hx-headers") || "{}");
      if (headers["X-CSRFToken"]) return headers["X-CSRFToken"];
    } catch (e) { /* fall through to the cookie */ }
    var match = document.cookie.match(/(?:^|;\s*)csrftoken=([^;]+)/);
    return match ? decodeURIComponent(match[1]) : "";
  }

  function withoutKeys(list, keys) {
    return list.filter(function (item) { return keys.indexOf(item.key) < 0; });
  }

  // ---- showing the queue ----

  function el(tag, className, text) {
    var node = document.createElement(tag);
    if (className) node.className = className;
    if (text !== undefined) node.textContent = text;
    return node;
  }

  function render() {
    var queue = load(QUEUE);
    var refused = load(REFUSED);
    var badge = document.querySelector("[data-pending-count]");
    if (badge) {
      badge.textContent = queue.length + " pending";
      badge.hidden = queue.length === 0;
    }
    // Mark the rows of the work list whose reading is still on this tablet.
    document.querySelectorAll("[data-row-pending]").forEach(function (node) { node.remove(); });
    queue.forEach(function (item) {
      var row = document.querySelector("#termination-" + item.termination + " .tq-row");
      if (!row) return;
      var mark = el("span", "tq-row-pending", "◷ " + item.value + " " + (item.unitLabel || item.unit) + " waiting to send");
      mark.setAttribute("data-row-pending", "");
      row.appendChild(mark);
    });
    var section = document.getElementById("pending-readings");
    if (!section) return;
    var list = section.querySelector("[data-pending-list]");
    var refusedList = section.querySelector("[data-refused-list]");
    if (list) {
      list.textContent = "";
      queue.forEach(function (item) {
        var li = el("li", "tq-pending-item");
        li.appendChild(el("strong", "", item.label || "Reading"));
        li.appendChild(el("span", "", " " + item.value + " " + (item.unitLabel || item.unit)));
        li.appendChild(el("span", "tq-pending-state", " · waiting to send"));
        list.appendChild(li);
      });
    }
    if (refusedList) {
      refusedList.textContent = "";
      refused.forEach(function (item) {
        var li = el("li", "tq-refused-item");
        li.appendChild(el("strong", "", "Not stored: " + (item.label || "Reading") + " " + item.value + " " + (item.unitLabel || item.unit)));
        li.appendChild(el("span", "", " " + item.message));
        var button = el("button", "button", "Dismiss");
        button.type = "button";
        button.setAttribute("data-dismiss-key", item.key);
        li.appendChild(button);
        refusedList.appendChild(li);
      });
    }
    section.hidden = queue.length === 0 && refused.length === 0;
  }

  function status(text, kind) {
    var box = document.querySelector("[data-entry-status]");
    if (!box) return;
    box.textContent = "";
    box.className = "tq-status" + (kind ? " tq-status-" + kind : "");
    box.appendChild(el("span", "", text));
    var form = document.querySelector("form[data-torque-entry]");
    if (kind === "pending" && form && form.getAttribute("data-next-url")) {
      box.appendChild(document.createTextNode(" "));
      var next = el("a", "button", "Next termination");
      next.href = form.getAttribute("data-next-url");
      box.appendChild(next);
    }
    box.hidden = false;
  }

  function showErrors(form, errors) {
    var general = [];
    Object.keys(errors || {}).forEach(function (field) {
      var slot = form.querySelector('[data-error-for="' + field + '"]');
      var text = errors[field].join(" ");
      if (slot) {
        slot.textContent = text;
        slot.hidden = false;
        var wrap = slot.closest(".field");
        if (wrap) wrap.classList.add("has-error");
      } else {
        general.push(text);
      }
    });
    return general.join(" ");
  }

  function clearErrors(form) {
    form.querySelectorAll("[data-error-for]").forEach(function (slot) {
      slot.textContent = "";
      slot.hidden = true;
      var wrap = slot.closest(".field");
      if (wrap) wrap.classList.remove("has-error");
    });
  }

  // ---- sending ----

  function answered(item, result) {
    var form = document.querySelector("form[data-torque-entry]");
    if (result.status === "stored") {
      if (item.key === waitingKey) {
        waitingKey = null;
        window.location.assign(item.entry + "?saved=" + result.record + "&next=1");
        return;
      }
      status("Sent: " + result.message, "sent");
      return;
    }
    if (item.key === waitingKey && form) {
      waitingKey = null;
      var rest = showErrors(form, result.errors);
      status(rest || "Not saved: correct the reading and save it again.", "refused");
      form.querySelector("button[type=submit]").disabled = false;
      return; // shown beside the fields: not kept in the refused list
    }
    var refused = load(REFUSED);
    refused.push({ key: item.key, label: item.label, value: item.value, unit: item.unit, unitLabel: item.unitLabel, message: result.message });
    store(REFUSED, refused);
  }

  function sendBatch(url, batch) {
    var body = {
      readings: batch.map(function (item) {
        return {
          key: item.key, termination: item.termination, stage: item.stage, value: item.value,
          unit: item.unit, wrench: item.wrench, found_loose: item.found_loose, note: item.note
        };
      })
    };
    return fetch(url, {
      method: "POST",
      credentials: "same-origin",
      redirect: "error", // a sign-in page is no answer: keep the readings
      headers: { "Content-Type": "application/json", "Accept": "application/json", "X-CSRFToken": csrfToken() },
      body: JSON.stringify(body)
    }).then(function (response) {
      if (!response.ok) throw new Error("status " + response.status);
      return response.json();
    }).then(function (data) {
      var done = [];
      var byKey = {};
      batch.forEach(function (item) { byKey[item.key] = item; });
      (data.results || []).forEach(function (result) {
        var item = byKey[result.key];
        if (!item || (result.status !== "stored" && result.status !== "refused")) return;
        done.push(item.key);
        answered(item, result);
      });
      // Re-read storage: another tab may have added readings meanwhile.
      store(QUEUE, withoutKeys(load(QUEUE), done));
    });
  }

  function flush() {
    if (sending) {
      again = true;
      return Promise.resolve();
    }
    var queue = load(QUEUE);
    render();
    if (!queue.length) return Promise.resolve();
    sending = true;
    var batches = [];
    var byUrl = {};
    queue.forEach(function (item) {
      (byUrl[item.url] = byUrl[item.url] || []).push(item);
    });
    Object.keys(byUrl).forEach(function (url) {
      for (var i = 0; i < byUrl[url].length; i += BATCH) {
        batches.push([url, byUrl[url].slice(i, i + BATCH)]);
      }
    });
    var chain = Promise.resolve();
    batches.forEach(function (pair) {
      chain = chain.then(function () {
        return sendBatch(pair[0], pair[1]).catch(function () { /* stays queued */ });
      });
    });
    return chain.then(function () {
      sending = false;
      render();
      if (again) {
        again = false;
        return flush();
      }
    });
  }

  // ---- the entry form ----

  function selectedLabel(select) {
    var option = select && select.options[select.selectedIndex];
    return option ? (option.getAttribute("data-label") || option.textContent) : "";
  }

  function onSubmit(event) {
    var form = event.target;
    if (!form.matches || !form.matches("form[data-torque-entry]")) return;
    var photo = form.querySelector("input[type=file]");
    if (photo && photo.files && photo.files.length) return; // sent as a plain form, with the page's key
    event.preventDefault();
    var button = form.querySelector("button[type=submit]");
    if (button.disabled) return;
    clearErrors(form);
    var wrench = form.elements.wrench.value;
    var loose = form.elements.found_loose;
    var item = {
      key: newKey(),
      termination: parseInt(form.getAttribute("data-termination"), 10),
      stage: parseInt(form.getAttribute("data-stage"), 10),
      value: form.elements.value.value.trim(),
      unit: form.elements.unit.value,
      unitLabel: selectedLabel(form.elements.unit),
      wrench: /^\d+$/.test(wrench) ? parseInt(wrench, 10) : null,
      found_loose: loose ? loose.checked : false,
      note: form.elements.note ? form.elements.note.value : "",
      url: form.getAttribute("data-sync-url"),
      entry: form.getAttribute("data-entry-url"),
      label: form.getAttribute("data-label")
    };
    var queue = load(QUEUE);
    queue.push(item);
    store(QUEUE, queue); // kept before anything is sent
    waitingKey = item.key;
    button.disabled = true;
    status("Saving…", "saving");
    render();
    flush().then(function () {
      if (waitingKey !== item.key) return; // answered
      waitingKey = null;
      button.disabled = false;
      form.elements.value.value = "";
      status("Saved on this tablet, not sent yet: it is sent when the connection returns.", "pending");
    });
  }

  function formatNumber(x) {
    var text = (Math.round(x * 100) / 100).toFixed(2);
    return text.replace(/0+$/, "").replace(/\.$/, "");
  }

  function onUnitChange(event) {
    var select = event.target;
    if (!select.matches || !select.matches("[data-unit-select]")) return;
    var form = select.form;
    var specNm = parseFloat(form.getAttribute("data-spec-nm"));
    var tolerance = parseFloat(form.getAttribute("data-tolerance"));
    var option = select.options[select.selectedIndex];
    var perUnit = parseFloat(option.getAttribute("data-nm-per-unit"));
    var target = document.querySelector("[data-spec-in-unit]");
    if (!target || !isFinite(specNm) || !isFinite(perUnit) || perUnit <= 0) return;
    var band = specNm * tolerance / 100;
    var label = option.getAttribute("data-label");
    target.textContent = formatNumber(specNm / perUnit) + " " + label + " (accepted " +
      formatNumber((specNm - band) / perUnit) + "–" + formatNumber((specNm + band) / perUnit) + ")";
  }

  function onClick(event) {
    var button = event.target.closest && event.target.closest("[data-dismiss-key]");
    if (!button) return;
    store(REFUSED, withoutKeys(load(REFUSED), [button.getAttribute("data-dismiss-key")]));
    render();
  }

  document.addEventListener("submit", onSubmit);
  document.addEventListener("change", onUnitChange);
  document.addEventListener("click", onClick);
  window.addEventListener("online", flush);
  window.addEventListener("storage", render);
  document.addEventListener("visibilitychange", function () {
    if (document.visibilityState === "visible") flush();
  });
  if (document.readyState === "loading") {
    document.addEventListener("DOMContentLoaded", flush);
  } else {
    flush();
  }
  window.setInterval(flush, RETRY_MS);
})();
