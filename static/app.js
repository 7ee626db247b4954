// phasecast progressive enhancement. Every page works without this file.
// - Night-vision toggle: switches the theme at once and remembers it in a
//   cookie (the server reads the same cookie, so there is no flash).
// - data-refresh="URL" data-every="60": reload that element's content from
//   URL every N seconds (Tonight page); pauses while the tab is hidden.
// - data-countdown="RFC3339": ticks a countdown each second.
// - data-progress="URL": polls a JSON progress endpoint and updates a
//   <progress> element, then follows data-done when finished.
// - .countdown[data-until="RFC3339"]: keeps the Night page's "starts in …"
//   countdown running, in the server's form (page.Countdown).
// - svg.lanes g.block: keyboard or pointer focus shows the block's figures
//   (its <title>) in the #chart-tip box beside it.
// - button[data-copy="ID"]: copies the text of element ID to the clipboard
//   (the button stays hidden without script; the text is selectable).
(function () {
  "use strict";

  function setTheme(night) {
    document.documentElement.classList.toggle("nightmode", night);
    document.cookie = "theme=" + (night ? "night" : "day") + "; Path=/; Max-Age=31536000; SameSite=Lax";
  }

  document.addEventListener("submit", function (ev) {
    var f = ev.target;
    if (f && f.matches && f.matches("form[data-theme-toggle]")) {
      ev.preventDefault();
      setTheme(!document.documentElement.classList.contains("nightmode"));
    }
  });

  function pad(n) { return (n < 10 ? "0" : "") + n; }

  function tickCountdowns() {
    var now = Date.now();
    document.querySelectorAll("[data-countdown]").forEach(function (el) {
      var t = Date.parse(el.getAttribute("data-countdown"));
      if (isNaN(t)) { return; }
      var s = Math.round((t - now) / 1000);
      var sign = s < 0 ? "−" : "";
      s = Math.abs(s);
      var h = Math.floor(s / 3600), m = Math.floor((s % 3600) / 60), sec = s % 60;
      el.textContent = sign + h + ":" + pad(m) + ":" + pad(sec);
    });
  }

  function untilText(s) {
    s = Math.max(0, s);
    if (s < 60) { return s + " s"; }
    if (s < 3600) { return Math.floor(s / 60) + " min"; }
    if (s < 86400) { return Math.floor(s / 3600) + " h " + pad(Math.floor((s % 3600) / 60)) + " min"; }
    return Math.floor(s / 86400) + " d " + Math.floor((s % 86400) / 3600) + " h";
  }

  function tickUntil() {
    var now = Date.now();
    document.querySelectorAll(".countdown[data-until]").forEach(function (el) {
      var t = Date.parse(el.getAttribute("data-until"));
      if (isNaN(t)) { return; }
      var m = /^(\D*?)\s*\d/.exec(el.textContent);
      var s = Math.round((t - now) / 1000);
      el.textContent = (m ? m[1] + " " : "") + untilText(s);
    });
  }

  function showTip(g) {
    var tip = document.getElementById("chart-tip");
    var title = g.querySelector("title");
    if (!tip || !title) { return; }
    tip.textContent = title.textContent;
    tip.hidden = false;
    var r = g.getBoundingClientRect();
    var x = Math.min(r.left, window.innerWidth - tip.offsetWidth - 8);
    var y = r.bottom + 6;
    if (y + tip.offsetHeight > window.innerHeight) { y = Math.max(0, r.top - tip.offsetHeight - 6); }
    tip.style.left = Math.max(0, x) + "px";
    tip.style.top = y + "px";
  }

  function hideTip() {
    var tip = document.getElementById("chart-tip");
    if (tip) { tip.hidden = true; }
  }

  function blockOf(ev) {
    var t = ev.target;
    return t && t.closest ? t.closest("svg.lanes g.block") : null;
  }

  document.addEventListener("focusin", function (ev) { var g = blockOf(ev); if (g) { showTip(g); } });
  document.addEventListener("focusout", function (ev) { if (blockOf(ev)) { hideTip(); } });
  document.addEventListener("mouseover", function (ev) { var g = blockOf(ev); if (g) { showTip(g); } });
  document.addEventListener("mouseout", function (ev) { if (blockOf(ev)) { hideTip(); } });
  document.addEventListener("keydown", function (ev) { if (ev.key === "Escape") { hideTip(); } });

  function refresh(el) {
    var url = el.getAttribute("data-refresh");
    if (document.hidden) { return; }
    fetch(url, { credentials: "same-origin", headers: { "Accept": "text/html" } })
      .then(function (r) { return r.ok ? r.text() : Promise.reject(r.status); })
      .then(function (html) {
        var doc = new DOMParser().parseFromString(html, "text/html");
        var fresh = doc.querySelector("[data-refresh]") || doc.body;
        el.innerHTML = fresh.innerHTML;
        tickCountdowns();
      })
      .catch(function () { /* keep the old content; the next tick retries */ });
  }

  function pollProgress(el) {
    var url = el.getAttribute("data-progress");
    var bar = el.querySelector("progress");
    var label = el.querySelector("[data-progress-label]");
    function step() {
      fetch(url, { credentials: "same-origin", headers: { "Accept": "application/json" } })
        .then(function (r) { return r.json(); })
        .then(function (p) {
          if (bar) { bar.max = 1; bar.value = p.fraction || 0; }
          if (label) { label.textContent = p.message || ""; }
          if (p.done) {
            window.location.assign(p.next || el.getAttribute("data-done") || window.location.href);
          } else {
            window.setTimeout(step, 500);
          }
        })
        .catch(function () { window.setTimeout(step, 2000); });
    }
    step();
  }

  document.addEventListener("DOMContentLoaded", function () {
    document.querySelectorAll("[data-refresh]").forEach(function (el) {
      var every = parseInt(el.getAttribute("data-every") || "60", 10) * 1000;
      window.setInterval(function () { refresh(el); }, every);
    });
    if (document.querySelector("[data-countdown]")) {
      tickCountdowns();
      window.setInterval(tickCountdowns, 1000);
    }
    if (document.querySelector(".countdown[data-until]")) {
      window.setInterval(tickUntil, 15000);
    }
    document.querySelectorAll("[data-progress]").forEach(pollProgress);
    document.querySelectorAll("button[data-copy]").forEach(function (b) { b.hidden = false; });
  });

  function selectText(el) {
    var range = document.createRange();
    range.selectNodeContents(el);
    var sel = window.getSelection();
    sel.removeAllRanges();
    sel.addRange(range);
  }

  document.addEventListener("click", function (ev) {
    var b = ev.target;
    if (!b || !b.matches || !b.matches("button[data-copy]")) { return; }
    var el = document.getElementById(b.getAttribute("data-copy"));
    if (!el) { return; }
    var text = el.textContent.trim();
    function done(ok) {
      b.textContent = ok ? "Copied" : "Select and copy";
      if (!ok) { selectText(el); }
    }
    if (navigator.clipboard && window.isSecureContext) {
      navigator.clipboard.writeText(text).then(function () { done(true); }, function () { done(false); });
    } else {
      selectText(el);
      var ok = false;
      try { ok = document.execCommand("copy"); } catch (e) { ok = false; }
      done(ok);
    }
  });
})();
