// whatif.js: recompute the what-if as the person types. The page is a plain
// GET form without this script; with it, a short pause after each change
// fetches the same URL with the fragment header and swaps in the server's
// HTML of the result. Nothing is ever saved: the request is a GET.
(function () {
  "use strict";

  var form = document.getElementById("whatif-form");
  var out = document.getElementById("whatif-result");
  if (!form || !out || !window.fetch || !window.URLSearchParams || !window.FormData) {
    return;
  }
  var DELAY_MS = 400;
  var timer = null;
  var ctrl = null;

  function query() {
    var params = new URLSearchParams();
    new FormData(form).forEach(function (value, name) {
      if (String(value).trim() !== "") {
        params.append(name, value);
      }
    });
    var q = params.toString();
    return q ? "?" + q : "";
  }

  function update() {
    var url = form.getAttribute("action") + query();
    if (ctrl && ctrl.abort) {
      ctrl.abort();
    }
    ctrl = window.AbortController ? new AbortController() : null;
    out.setAttribute("aria-busy", "true");
    fetch(url, {
      headers: { "X-Aloft-Fragment": "whatif" },
      credentials: "same-origin",
      signal: ctrl ? ctrl.signal : undefined
    }).then(function (resp) {
      // 422 carries the fragment with the messages too; a login that has
      // ended or a server error falls back to the plain form.
      if (resp.status !== 200 && resp.status !== 422) {
        throw new Error("status " + resp.status);
      }
      return resp.text();
    }).then(function (html) {
      out.innerHTML = html;
      out.removeAttribute("aria-busy");
      if (window.history && history.replaceState) {
        history.replaceState(null, "", url);
      }
    }).catch(function (err) {
      out.removeAttribute("aria-busy");
      if (err && err.name === "AbortError") {
        return;
      }
    });
  }

  function later() {
    window.clearTimeout(timer);
    timer = window.setTimeout(update, DELAY_MS);
  }

  form.addEventListener("input", later);
  form.addEventListener("change", later);
  form.addEventListener("submit", function (ev) {
    ev.preventDefault();
    window.clearTimeout(timer);
    update();
  });
})();
