// cage.js: the cage-side page's tap counters, breathing-recovery stopwatch
// and the draft kept on this phone (localStorage) until the server has
// confirmed it. Without this script the page is a plain form.
//
// The draft survives a reload, a dropped network and an ended login. Every
// send carries the draft's idempotency key (made once, when the draft
// starts), so sending it again never stores a second session.
(function () {
  "use strict";

  var root = document.querySelector("[data-cage]");
  if (!root) {
    return;
  }
  var form = root.querySelector("form.cage-form");
  var scope = root.getAttribute("data-scope");
  var api = root.getAttribute("data-api");
  var cases = (root.getAttribute("data-cases") || "").split(",").filter(Boolean);
  var group = cases.length > 1;
  var storeKey = "aloft.cage.v1:" + scope;
  var RETRY_MS = 15000;

  // Fields that are not typed by the person, or are derived from the taps.
  var skipFields = ["_csrf", "idempotency_key", "at", "group_cases",
    "passes", "longest_run", "landings", "landings_controlled", "recovery_s"];

  var draft = null; // null until the first tap or change
  var sending = false;
  var state = ""; // "", "sending", "offline", "logged-out", "error", "offer", "done"
  var retryTimer = null;
  var tickTimer = null;

  root.classList.add("cage-js");

  // --- the draft -----------------------------------------------------------

  function uuid() {
    var b = new Uint8Array(16);
    window.crypto.getRandomValues(b);
    b[6] = (b[6] & 0x0f) | 0x40;
    b[8] = (b[8] & 0x3f) | 0x80;
    var h = Array.prototype.map.call(b, function (x) { return (x + 0x100).toString(16).slice(1); }).join("");
    return h.slice(0, 8) + "-" + h.slice(8, 12) + "-" + h.slice(12, 16) + "-" + h.slice(16, 20) + "-" + h.slice(20);
  }

  function loadDraft() {
    try {
      var d = JSON.parse(window.localStorage.getItem(storeKey) || "null");
      return d && d.v === 1 && Array.isArray(d.events) ? d : null;
    } catch (e) {
      return null;
    }
  }

  function persist() {
    if (!draft) {
      return;
    }
    draft.fields = readFields();
    try {
      window.localStorage.setItem(storeKey, JSON.stringify(draft));
    } catch (e) {
      showState("error", "This phone would not keep the draft (storage full, or a private window): save it soon.");
    }
  }

  function dropDraft() {
    draft = null;
    try {
      window.localStorage.removeItem(storeKey);
    } catch (e) { /* nothing kept, nothing to remove */ }
  }

  function ensureDraft() {
    if (!draft) {
      draft = { v: 1, key: uuid(), created: Date.now(), events: [], watch: { start: null, stopped: null }, fields: {}, pending: false };
      setHidden("idempotency_key", draft.key);
    }
    return draft;
  }

  // --- form fields ---------------------------------------------------------

  function readFields() {
    var out = {};
    Array.prototype.forEach.call(form.elements, function (el) {
      if (!el.name || skipFields.indexOf(el.name) >= 0 || el.tagName === "BUTTON") {
        return;
      }
      if (el.type === "checkbox") {
        out[el.name] = el.checked;
      } else if (el.type === "radio") {
        if (el.checked) {
          out[el.name] = el.value;
        } else if (!(el.name in out)) {
          out[el.name] = "";
        }
      } else {
        out[el.name] = el.value;
      }
    });
    return out;
  }

  function writeFields(fields) {
    Array.prototype.forEach.call(form.elements, function (el) {
      if (!el.name || !(el.name in fields) || skipFields.indexOf(el.name) >= 0 || el.tagName === "BUTTON") {
        return;
      }
      if (el.type === "checkbox") {
        el.checked = !!fields[el.name];
      } else if (el.type === "radio") {
        el.checked = fields[el.name] === el.value;
      } else {
        el.value = fields[el.name];
      }
    });
  }

  function setHidden(name, value) {
    var el = form.elements.namedItem(name);
    if (el && el.value !== undefined) {
      el.value = value;
    }
  }

  // --- counts and stopwatch ------------------------------------------------

  // derive turns the tap log into the session's counts: a pass adds to the
  // unbroken run, a landing ends it.
  function derive(events) {
    var c = { passes: 0, run: 0, longest: 0, landings: 0, controlled: 0 };
    events.forEach(function (e) {
      if (e.t === "p") {
        c.passes++;
        c.run++;
        c.longest = Math.max(c.longest, c.run);
      } else {
        c.landings++;
        if (e.t === "lc") {
          c.controlled++;
        }
        c.run = 0;
      }
    });
    return c;
  }

  function watchOf() {
    return (draft && draft.watch) || { start: null, stopped: null };
  }

  function running() {
    var w = watchOf();
    return w.start !== null && w.stopped === null;
  }

  function watchSeconds() {
    var w = watchOf();
    if (w.stopped !== null) {
      return w.stopped;
    }
    if (w.start !== null) {
      return Math.max(0, Math.floor((Date.now() - w.start) / 1000));
    }
    return 0;
  }

  function show(name, value) {
    root.querySelectorAll("[data-show='" + name + "']").forEach(function (el) {
      el.textContent = String(value);
    });
  }

  function renderWatch() {
    var w = watchOf();
    show("watch", watchSeconds());
    var label = "breathing recovery: starts at a landing";
    if (running()) {
      label = "running: tap Stop when breathing is back to resting";
    } else if (w.stopped !== null) {
      label = "breathing back to resting after " + w.stopped + " s";
    }
    show("watch-state", label);
    var btn = root.querySelector("[data-act='watch']");
    btn.textContent = running() ? "Stop" : "Start";
    btn.classList.toggle("primary", running());
  }

  function render() {
    var c = derive(draft ? draft.events : []);
    show("passes", c.passes);
    show("run", c.run);
    show("longest", c.longest);
    show("landings", c.landings);
    show("controlled", c.controlled);
    setHidden("passes", c.passes);
    setHidden("longest_run", c.longest);
    setHidden("landings", c.landings);
    setHidden("landings_controlled", c.controlled);
    setHidden("recovery_s", watchOf().stopped === null ? "" : watchOf().stopped);
    renderWatch();
    if (running() && !tickTimer) {
      tickTimer = window.setInterval(renderWatch, 250);
    } else if (!running() && tickTimer) {
      window.clearInterval(tickTimer);
      tickTimer = null;
    }
  }

  // --- messages ------------------------------------------------------------

  function msg(name) {
    return root.querySelector("[data-msg='" + name + "']");
  }

  // showState shows one of the state messages (or none) and remembers it.
  function showState(name, text) {
    ["offer", "offline", "logged-out", "error", "sending"].forEach(function (n) {
      msg(n).hidden = n !== name;
    });
    if (name === "error") {
      msg("error").querySelector("[data-error-text]").textContent = text || "";
    }
    state = name;
  }

  function clearFieldErrors() {
    root.querySelectorAll("[data-error-for]").forEach(function (el) {
      el.textContent = "";
    });
  }

  function showFieldErrors(fields) {
    var lines = [];
    Object.keys(fields || {}).forEach(function (name) {
      var el = root.querySelector("[data-error-for='" + name + "']");
      if (el) {
        el.textContent = fields[name];
      }
      lines.push(fields[name]);
    });
    return lines;
  }

  function buzz() {
    if (navigator.vibrate) {
      try {
        navigator.vibrate(15);
      } catch (e) { /* no vibration here */ }
    }
  }

  // --- actions -------------------------------------------------------------

  var actions = {
    "pass": function () {
      ensureDraft().events.push({ t: "p", at: Date.now() });
    },
    "unpass": function () {
      if (!draft) {
        return;
      }
      for (var i = draft.events.length - 1; i >= 0; i--) {
        if (draft.events[i].t === "p") {
          draft.events.splice(i, 1);
          return;
        }
      }
    },
    "land-ok": function () {
      land("lc");
    },
    "land-bad": function () {
      land("ln");
    },
    "watch": function () {
      var d = ensureDraft();
      if (running()) {
        d.watch.stopped = Math.max(0, Math.round((Date.now() - d.watch.start) / 1000));
      } else {
        d.watch = { start: Date.now(), stopped: null };
      }
    },
    "watch-reset": function () {
      ensureDraft().watch = { start: null, stopped: null };
    },
    "temp-up": function () {
      stepTemp(1);
    },
    "temp-down": function () {
      stepTemp(-1);
    },
    "undo": function () {
      if (!draft || draft.events.length === 0) {
        return;
      }
      var last = draft.events.pop();
      if (last.t !== "p" && draft.watch.start === last.at) {
        draft.watch = { start: null, stopped: null };
      }
    },
    "send": function () {
      send();
    },
    "discard": discard
  };

  // land records a landing: it ends the unbroken run and starts the
  // recovery stopwatch afresh.
  function land(kind) {
    var d = ensureDraft();
    var at = Date.now();
    d.events.push({ t: kind, at: at });
    d.watch = { start: at, stopped: null };
  }

  function stepTemp(delta) {
    var el = form.elements.namedItem("air_temp_c");
    var v = parseNumber(el.value);
    if (el.value.trim() === "" || v.error) {
      el.focus();
      return;
    }
    el.value = String(Math.round((v.value + delta) * 10) / 10);
    ensureDraft();
  }

  var discardArmed = false;

  function discard(btn) {
    if (!discardArmed) {
      discardArmed = true;
      btn.textContent = "Tap again to throw this session away";
      window.setTimeout(function () {
        discardArmed = false;
        btn.textContent = "Start over";
      }, 4000);
      return false;
    }
    dropDraft();
    window.location.reload();
    return false;
  }

  root.addEventListener("click", function (ev) {
    var btn = ev.target.closest("[data-act]");
    if (!btn || !root.contains(btn)) {
      return;
    }
    ev.preventDefault();
    var act = btn.getAttribute("data-act");
    if (!actions[act] || state === "done") {
      return;
    }
    var keep = actions[act](btn);
    buzz();
    if (keep !== false && act !== "send") {
      persist();
    }
    render();
  });

  function onFieldChange(ev) {
    if (state === "done" || !ev.target.name || skipFields.indexOf(ev.target.name) >= 0) {
      return;
    }
    ensureDraft();
    persist();
  }
  form.addEventListener("input", onFieldChange);
  form.addEventListener("change", onFieldChange);

  form.addEventListener("submit", function (ev) {
    ev.preventDefault();
    send();
  });

  // --- sending -------------------------------------------------------------

  function parseNumber(raw) {
    var s = String(raw || "").trim().replace(",", ".");
    if (s === "") {
      return { value: null };
    }
    var n = Number(s);
    if (!isFinite(n)) {
      return { error: "enter a number, such as 12 or 12.5" };
    }
    return { value: n };
  }

  // payload builds the JSON the API takes from the draft and the form.
  function payload() {
    var f = readFields();
    var c = derive(draft.events);
    var errors = {};
    var num = function (name) {
      var r = parseNumber(f[name]);
      if (r.error) {
        errors[name] = r.error;
      }
      return r.error ? null : r.value;
    };
    var s = {
      at: new Date(draft.created).toISOString(),
      exercise: f.exercise || "cage",
      enclosure_name: (f.enclosure || "").trim(),
      enclosure_length_m: num("length_m"),
      air_temp_c: num("air_temp_c"),
      passes: c.passes,
      longest_run: c.longest,
      landings: c.landings,
      landings_controlled: c.controlled,
      recovery_s: draft.watch.stopped,
      highest: f.highest || "",
      open_mouth: !!f.open_mouth,
      tail_bobbing: !!f.tail_bobbing,
      asymmetry: !!f.asymmetry,
      droop: f.droop || "none",
      notes: f.notes || ""
    };
    if (!s.highest) {
      errors.highest = "choose the highest point reached";
    }
    if (running()) {
      errors.recovery_s = "the recovery stopwatch is still running: tap Stop when the breathing is back to resting, or Reset";
    }
    var body = { idempotency_key: draft.key, session: s };
    if (group) {
      s.group = true;
      s.group_cases = cases;
      body.birds = {};
      cases.forEach(function (cn) {
        var p = "bird_" + cn + "_";
        body.birds[cn] = {
          open_mouth: !!f[p + "open_mouth"], tail_bobbing: !!f[p + "tail_bobbing"],
          asymmetry: !!f[p + "asymmetry"], droop: f[p + "droop"] || "none", notes: f[p + "notes"] || ""
        };
      });
    }
    return { body: body, errors: errors };
  }

  function csrfToken() {
    var m = document.querySelector("meta[name='csrf-token']");
    return m ? m.getAttribute("content") : "";
  }

  function setCsrfToken(tok) {
    var m = document.querySelector("meta[name='csrf-token']");
    if (m) {
      m.setAttribute("content", tok);
    }
    setHidden("_csrf", tok);
  }

  function post(body, token) {
    return window.fetch(api, {
      method: "POST",
      credentials: "same-origin",
      cache: "no-store",
      headers: { "Content-Type": "application/json", "Accept": "application/json", "X-CSRF-Token": token },
      body: JSON.stringify(body)
    });
  }

  // freshToken asks the server for the login's CSRF token: null when
  // nobody is logged in.
  function freshToken() {
    return window.fetch("/api/v1/csrf", { credentials: "same-origin", cache: "no-store", headers: { "Accept": "application/json" } })
      .then(function (r) {
        if (r.status === 401) {
          return null;
        }
        if (!r.ok) {
          throw new Error("csrf " + r.status);
        }
        return r.json().then(function (j) { return j.csrf_token; });
      });
  }

  function readJSON(r) {
    return r.json().catch(function () { return {}; });
  }

  async function send() {
    if (sending || state === "done") {
      return;
    }
    ensureDraft();
    clearFieldErrors();
    var p = payload();
    var local = showFieldErrors(p.errors);
    if (local.length > 0) {
      showState("error", "Not sent yet: " + local.join("; ") + ".");
      persist();
      return;
    }
    var resumed = state === "offer" || state === "logged-out";
    sending = true;
    draft.pending = true;
    persist();
    showState("sending");
    try {
      var token = csrfToken();
      if (resumed) {
        // A draft kept over a reload or a new login: ask for the login's
        // current token first.
        var t = await freshToken();
        if (t === null) {
          loggedOut();
          return;
        }
        setCsrfToken(t);
        token = t;
        resumed = false;
      }
      var r = await post(p.body, token);
      if (r.status === 401 || r.status === 403) {
        var fresh = await freshToken();
        if (fresh === null) {
          loggedOut();
          return;
        }
        if (fresh !== token || r.status === 401) {
          setCsrfToken(fresh);
          r = await post(p.body, fresh);
        }
      }
      await answer(r);
    } catch (e) {
      offline();
    } finally {
      sending = false;
    }
  }

  async function answer(r) {
    var j = await readJSON(r);
    if (r.status === 200 || r.status === 201) {
      done(j);
      return;
    }
    if (r.status === 401) {
      loggedOut();
      return;
    }
    if (r.status === 422) {
      draft.pending = false;
      persist();
      var lines = showFieldErrors(j.fields);
      showState("error", (j.error || "Not saved.") + " " + lines.join("; "));
      return;
    }
    showState("error", "Not sent: the server answered " + r.status + (j.error ? " (" + j.error + ")" : "") +
      ". Your session is kept on this phone; tap Save session to try again.");
  }

  function offline() {
    showState("offline");
    scheduleRetry();
  }

  function loggedOut() {
    showState("logged-out");
  }

  function scheduleRetry() {
    if (retryTimer) {
      return;
    }
    retryTimer = window.setInterval(function () {
      if (state === "offline" && navigator.onLine !== false) {
        send();
      }
    }, RETRY_MS);
  }

  function done(j) {
    dropDraft();
    if (retryTimer) {
      window.clearInterval(retryTimer);
      retryTimer = null;
    }
    showState("done");
    msg("restored").hidden = true;
    form.hidden = true;
    var n = (j.entries || []).length;
    var text = n > 1 ? "Saved for " + n + " birds." : "Saved.";
    if (j.duplicate) {
      text += " (It had already arrived: stored once.)";
    }
    root.querySelector("[data-done-text]").textContent = text;
    root.querySelector(".cage-done").hidden = false;
    root.querySelector(".cage-done a").focus();
  }

  window.addEventListener("online", function () {
    if (state === "offline") {
      send();
    }
  });
  // Back from logging in in another tab: try again with a fresh token.
  document.addEventListener("visibilitychange", function () {
    if (document.visibilityState === "visible" && state === "logged-out") {
      send();
    }
  });

  // --- start ---------------------------------------------------------------

  draft = loadDraft();
  if (draft) {
    writeFields(draft.fields || {});
    setHidden("idempotency_key", draft.key);
    var at = new Date(draft.created);
    msg("restored").querySelector("[data-restored-at]").textContent =
      at.toLocaleTimeString([], { hour: "2-digit", minute: "2-digit" });
    msg("restored").hidden = false;
    if (draft.pending) {
      showState("offer");
    }
  }
  render();
}());
