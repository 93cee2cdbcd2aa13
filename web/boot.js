// Runs first (a small classic async script; index.html lists it after the static form, which
// measured about 20 ms sooner to first paint at 4x than listing it in <head>): starts the Python
// worker as soon as it is fetched, so the interpreter boots while the page paints.
// app.js's Engine adopts it.
(function () {
  if (window.__fpBoot) return; // the shell got there first and started its own worker
  // Worker options travel in its name (the same rule as workerName() in engine.js).
  var q = new URLSearchParams(location.search);
  var name = "engine";
  if (q.get("installer") === "micropip") name += "&installer=micropip";
  if (q.get("snapshot") === "off") name += "&snapshot=off";
  var early = [];
  var url = new URL("worker.js", document.baseURI);
  var worker = new Worker(url, { type: "module", name: name });
  // Keep messages that arrive before the Engine takes over (status marks, "ready").
  worker.onmessage = function (e) { early.push(e.data); };
  window.__fpBoot = { worker: worker, url: url, early: early };
})();
