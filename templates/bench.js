// windsheet bench: saves each reading as it is typed and shows the server's verdicts.
// The server parses and judges every reading; this script only carries text both ways.
(function () {
  "use strict";
  var form = document.getElementById("qc-form");
  if (!form || !window.fetch) { return; }
  var csrf = document.querySelector('meta[name="csrf-token"]').getAttribute("content");
  var url = form.getAttribute("action") + "/field";
  var timers = {};
  var chains = {};
  var saved = {};
  var shown = {};

  function show(el, items) {
    el.textContent = "";
    items.forEach(function (c) {
      var s = document.createElement("span");
      s.className = c.cls; s.textContent = c.text; el.appendChild(s);
    });
  }
  function message(text, bad) {
    var box = document.getElementById("messages");
    box.textContent = "";
    if (!text) { return; }
    var p = document.createElement("p");
    p.className = bad ? "message error" : "message"; p.textContent = text; box.appendChild(p);
  }
  function apply(units, seq) {
    Object.keys(units).forEach(function (i) {
      // Answers can arrive out of order; the server numbers its views, and a unit never shows an older one.
      if (seq !== undefined && shown[i] !== undefined && seq < shown[i]) { return; }
      if (seq !== undefined) { shown[i] = seq; }
      var u = units[i];
      Object.keys(u.cells).forEach(function (key) {
        var el = document.getElementById("c-" + i + "-" + key);
        if (el) { show(el, u.cells[key]); }
      });
      var s = document.getElementById("s-" + i);
      if (s) {
        s.textContent = "";
        var b = document.createElement("b");
        b.className = u.summary.cls; b.textContent = u.summary.verdict; s.appendChild(b);
        u.summary.findings.forEach(function (f) {
          var sp = document.createElement("span"); sp.className = "finding"; sp.textContent = f; s.appendChild(sp);
        });
      }
    });
  }
  function queue(input) {
    // One save at a time per field, so a save never races the field's own previous one.
    var k = input.name;
    chains[k] = (chains[k] || Promise.resolve()).then(function () {
      if (saved[k] === input.value) { return null; }
      return save(input);
    });
  }
  function save(input) {
    var sent = input.value;
    var body = new URLSearchParams();
    body.set("unit", input.dataset.unit); body.set("field", input.dataset.field);
    body.set("value", input.value); body.set("version", input.dataset.version);
    body.set("inspector", (document.getElementById("inspector") || {}).value || "");
    return fetch(url, {method: "POST", body: body, credentials: "same-origin",
                       headers: {"X-CSRF-Token": csrf}})
      .then(function (r) { return r.json(); })
      .then(function (data) {
        if (!data.stale) { saved[input.name] = sent; }
        if (data.version !== undefined) {
          input.dataset.version = data.version;
          var hidden = form.querySelector('input[type=hidden][name="v:' + input.dataset.unit + ":" + input.dataset.field + '"]');
          if (hidden) { hidden.value = data.version; }
        }
        message(data.message, !!data.message);
        if (data.units) { apply(data.units, data.seq); }
        if (data.stale && data.value !== undefined) { input.value = data.value; saved[input.name] = data.value; }
        input.classList.toggle("stale", !!data.stale);
      })
      .catch(function () { message("could not reach the bench server: your entry is not saved yet", true); });
  }
  // The inspector's name is this browser's: kept in a cookie the server reads back on every page
  // and download, so a reload keeps it and the files carry it.
  var who = document.getElementById("inspector");
  if (who) {
    who.addEventListener("input", function () {
      document.cookie = "ws_bench_inspector=" + encodeURIComponent(who.value.trim().slice(0, 200)) +
        "; path=/; SameSite=Strict; max-age=31536000";
    });
  }
  // What the server rendered is what it holds; anything typed before this script ran is saved now.
  var typedEarly = [];
  Array.prototype.forEach.call(form.querySelectorAll("input[data-field]"), function (el) {
    saved[el.name] = el.defaultValue;
    if (el.value !== el.defaultValue) { typedEarly.push(el); }
  });
  form.addEventListener("input", function (ev) {
    var input = ev.target;
    if (!input.dataset || input.dataset.field === undefined) { return; }
    var k = input.name;
    clearTimeout(timers[k]);
    timers[k] = setTimeout(function () { queue(input); }, 350);
  });
  form.addEventListener("change", function (ev) {
    var input = ev.target;
    if (!input.dataset || input.dataset.field === undefined) { return; }
    clearTimeout(timers[input.name]);
    queue(input);
  });
  typedEarly.forEach(queue);
})();
