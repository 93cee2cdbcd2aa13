// The first frame of a reopened draft: the draft's text in the static form and its remembered answer in
// the answer bar (and, for a wide screen where the bar is hidden, at the top of the results). The build writes this file into index.html as an inline script just after the static
// form (its SHA-256 is the one inline script the page's CSP allows), so it runs while the page is parsed,
// before the first frame, without waiting for any fetch. It draws only the answer bar and its mark;
// remembered.js adopts what it did (window.__fpEarly) and draws the full results after that frame.
// It draws only when the inputs on screen are the draft's, the draft (the journal) is the one the answer
// was computed for, and the build (fp-build in <head>) is the one that computed it. An edit takes the
// answer away at once ("Answer pending…"). Classic script, no imports; remembered.js re-exports the
// names and the key rule below, so they exist once.
(function () {
  var E = (window.__fpEarly = {
    state: "off", // "off" (nothing drawn), "drawn", "withdrawn" (an edit took it away); remembered.js goes on
    JOURNAL: "fp-journal", // localStorage: the open draft's inputs {sheet, target, inputs} (app.js)
    REMEMBERED: "fp-remembered", // localStorage: the newest remembered result {slot, build, inputs, result, bar}
    MARK: "Remembered — confirming…",
    NOTE: "Remembered result for these inputs, shown while the engine starts; it is being confirmed.",
    PENDING: "Answer pending…",
    PENDING_NOTE: "The inputs changed: their answer appears here once the engine has computed it.",
    CHECKING: "Checking…", // the engine pill's word while a remembered answer waits for the engine
    framed: false, // the first frame has been drawn (its callbacks have run)
    /** The exact inputs as one string: the worksheet and each field's text, in field-name order. */
    inputsKey: function (sheetId, inputs) {
      return JSON.stringify([sheetId, Object.keys(inputs).sort().map(function (k) { return [k, inputs[k]]; })]);
    },
    readLocal: function (key) {
      try { return JSON.parse(localStorage.getItem(key) || "null"); } catch (e) { return null; }
    },
  });
  requestAnimationFrame(function () { E.framed = true; E.framedAt = performance.now(); });
  var $ = function (id) { return document.getElementById(id); };

  /** A static field's control, the value it shows, and the one index.html served (the worksheet's default). */
  function fieldValues(w) {
    var radios = Array.prototype.slice.call(w.querySelectorAll("input[type=radio]"));
    if (radios.length) {
      var on = radios.filter(function (r) { return r.checked; })[0];
      var served = radios.filter(function (r) { return r.defaultChecked; })[0];
      return [null, on ? on.value : "", served ? served.value : ""];
    }
    var el = w.querySelector("select, input[type=text], textarea");
    if (!el) return null;
    if (el.tagName === "SELECT") {
      var first = Array.prototype.filter.call(el.options, function (o) { return o.defaultSelected; })[0] || el.options[0];
      return [null, el.value, first ? first.value : ""];
    }
    return [el, el.value, el.defaultValue];
  }

  /** Every static field shows the draft's value (a field the draft does not hold: the default it was served
   * with), after an untouched text field is given the draft's text (as the shell will). A choice that differs
   * is left to the shell, which also shows and hides the fields it governs: then nothing is drawn. */
  function fillDraft(form, inputs) {
    var todo = [];
    var fields = form.querySelectorAll(".field[data-field]");
    for (var i = 0; i < fields.length; i++) {
      var v = fieldValues(fields[i]);
      if (!v) continue;
      var name = fields[i].dataset.field;
      var want = Object.prototype.hasOwnProperty.call(inputs, name) ? String(inputs[name]) : v[2];
      if (v[1] === want) continue;
      if (!v[0] || v[1] !== v[2]) return false; // a choice, or typed in: all or nothing
      todo.push([v[0], want]);
    }
    todo.forEach(function (t) { t[0].value = t[1]; });
    return true;
  }

  function withdraw() {
    if (E.state !== "drawn") return;
    E.state = "withdrawn";
    if (E.onWithdraw) return E.onWithdraw(); // remembered.js has run: its full pending answer
    var head = $("headline");
    var size = head.textContent;
    head.textContent = "";
    var msg = document.createElement("span");
    msg.className = "pending-msg";
    msg.textContent = E.PENDING;
    var keep = document.createElement("span"); // the box keeps its size: the form does not move
    keep.className = "pending-size";
    keep.setAttribute("aria-hidden", "true");
    keep.textContent = size;
    head.append(msg, keep);
    head.setAttribute("data-pending", "");
    head.removeAttribute("data-remembered");
    $("results").removeAttribute("data-remembered");
    para($("results-body"), "muted pending-note", E.PENDING_NOTE, true);
  }

  /** A paragraph of text at the end of ``box`` (``alone``: in place of what it held). */
  function para(box, cls, text, alone) {
    var p = document.createElement("p");
    p.className = cls;
    p.textContent = text;
    if (alone) box.textContent = "";
    box.append(p);
  }

  try {
    var form = $("form");
    var sheet = form && form.dataset.static;
    if (!sheet) return;
    var m = location.hash.match(/^#\/sheet\/([\w-]+)/);
    if (m ? m[1] !== sheet : location.hash) return; // another worksheet, a job entry or the jobs screen
    var journal = E.readLocal(E.JOURNAL);
    if (!journal || journal.sheet !== sheet || journal.target || !journal.inputs || typeof journal.inputs !== "object") return;
    if (!fillDraft(form, journal.inputs)) return;
    var rec = E.readLocal(E.REMEMBERED);
    var build = document.querySelector('meta[name="fp-build"]');
    var key = E.inputsKey(sheet, journal.inputs);
    if (!rec || !build || !build.content || rec.build !== build.content || rec.slot !== "sheet:" + sheet) return;
    if (rec.inputs !== key || !rec.result || !rec.bar || typeof rec.bar.text !== "string" || Object.keys(rec.result.field_errors || {}).length) return;
    // the answer bar as remembered.js's answerBar() worded it when the answer was remembered
    var head = $("headline");
    head.hidden = !rec.bar.text;
    head.removeAttribute("data-pending");
    head.textContent = rec.bar.text;
    head.dataset.status = rec.bar.status;
    head.setAttribute("data-remembered", "");
    var mark = document.createElement("span"); // on the headline's border, out of the flow (app.css)
    mark.className = "remembered-mark";
    mark.textContent = E.MARK;
    if (rec.bar.text) head.append(mark);
    $("results").setAttribute("data-remembered", "");
    var body = $("results-body"); // remembered.js draws the full results there after this frame
    para(body, "msg remembered-mark", E.NOTE, true);
    if (rec.bar.answer) para(body, "early-answer", rec.bar.answer, false);
    var pill = $("engine");
    if (pill.dataset.state === "starting") pill.textContent = E.CHECKING;
    E.state = "drawn";
    E.slot = rec.slot;
    E.key = key;
    E.result = rec.result;
    E.shown = performance.now();
    form.addEventListener("input", withdraw);
    form.addEventListener("change", withdraw);
    E.stop = function () { // the shell has taken over: it watches the inputs from now on
      form.removeEventListener("input", withdraw);
      form.removeEventListener("change", withdraw);
    };
  } catch (err) {
    E.error = String(err);
  }
})();
