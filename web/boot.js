// Runs first (a small classic script, async in <head>): starts the Python worker while the page
// is still being parsed, so the interpreter boots while the page paints. app.js's Engine adopts it.
(function () {
  if (window.__fpBoot) return; // the shell got there first and started its own worker
  var installer = new URLSearchParams(location.search).get("installer") === "micropip" ? "installer=micropip" : "engine";
  var early = [];
  var worker = new Worker(new URL("worker.js", document.baseURI), { type: "module", name: installer });
  // Keep messages that arrive before the Engine takes over (status marks, "ready").
  worker.onmessage = function (e) { early.push(e.data); };
  window.__fpBoot = { worker: worker, early: early };
})();
