// Tiny DOM builder: elements from tag, attributes and children. Text is always set as text
// (never parsed as HTML); SVG from Python is parsed by the XML parser, not as HTML.
export function h(tag, attrs = {}, ...children) {
  const el = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs || {})) {
    if (v === false || v === null || v === undefined) continue;
    if (k === "class") el.className = v;
    else if (k === "text") el.textContent = v;
    else if (k.startsWith("on") && typeof v === "function") el.addEventListener(k.slice(2), v);
    else if (k === "dataset") Object.assign(el.dataset, v);
    else if (v === true) el.setAttribute(k, "");
    else el.setAttribute(k, String(v));
  }
  for (const c of children.flat()) {
    if (c === null || c === undefined || c === false) continue; // never append a null as text
    el.append(c instanceof Node ? c : document.createTextNode(String(c)));
  }
  return el;
}

/**
 * An element from a markup tree `[tag, {attribute: value}, ...children]` (children: trees or text),
 * as app/formview.py draws forms. Attributes are set as attributes (`true` = present); event
 * handler attributes are refused, text is always text.
 */
export function fromTree(node) {
  if (typeof node === "string") return document.createTextNode(node);
  const [tag, attrs, ...children] = node;
  const el = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) {
    if (/^on/i.test(k) || v === false || v === null) continue;
    el.setAttribute(k, v === true ? "" : String(v));
  }
  for (const c of children) el.append(fromTree(c));
  return el;
}

// SVG text is parsed by the XML parser as a fragment in one blank XML document kept for the purpose
// (no browsing context: nothing in it runs or loads), then adopted into the page once cleaned. A
// fresh DOMParser document per figure gave the same nodes at about three times the cost.
let xmlRange = null;

function parseXml(text) {
  if (!xmlRange) {
    const doc = new DOMParser().parseFromString("<figure/>", "application/xml");
    xmlRange = doc.createRange();
    xmlRange.selectNodeContents(doc.documentElement);
  }
  try {
    return xmlRange.createContextualFragment(text);
  } catch {
    return null; // not well-formed XML
  }
}

/** Parse SVG text from the app's Python code into a node; drops any script or event attribute. */
export function svgNode(text) {
  const frag = parseXml(text);
  const root = frag && frag.firstElementChild;
  // as a document would: one root element, an <svg>, and no text beside it
  if (!root || root.nodeName !== "svg" || frag.childElementCount !== 1 ||
      [...frag.childNodes].some((n) => n.nodeType === Node.CDATA_SECTION_NODE || (n.nodeType === Node.TEXT_NODE && n.textContent.trim()))) {
    return h("p", { class: "muted", text: "This figure could not be drawn." });
  }
  for (const bad of root.querySelectorAll("script, foreignObject")) bad.remove();
  for (const el of [root, ...root.querySelectorAll("*")]) {
    for (const a of [...el.attributes]) {
      if (/^on/i.test(a.name) || /^\s*javascript:/i.test(a.value)) el.removeAttribute(a.name);
    }
  }
  return document.adoptNode(root);
}

export function clear(el) {
  while (el.firstChild) el.firstChild.remove();
  return el;
}

/**
 * Make `parent`'s children the nodes of `items` ([{key, make}]) in order, reusing a child drawn
 * before for the same key (a string of the data it shows) and calling `make()` only for new keys.
 * A recompute that changes a few values then touches a few nodes, and what the user opened (a
 * "How" disclosure) stays open where its result did not change. Children no item reuses are
 * removed first, so a kept child that is already in order is never moved (moving a node in the
 * live page costs as much as drawing it).
 */
export function reconcile(parent, items) {
  const old = new Map();
  for (let n = parent.firstElementChild; n; n = n.nextElementSibling) {
    if (n.__key === undefined) continue;
    const pool = old.get(n.__key);
    if (pool) pool.push(n);
    else old.set(n.__key, [n]);
  }
  const nodes = items.map((it) => {
    const pool = old.get(it.key);
    return (pool && pool.shift()) || null;
  });
  const kept = new Set(nodes);
  for (let n = parent.firstChild; n;) {
    const next = n.nextSibling;
    if (!kept.has(n)) n.remove();
    n = next;
  }
  let at = parent.firstChild;
  items.forEach((it, i) => {
    let node = nodes[i];
    if (!node) {
      node = it.make();
      node.__key = it.key;
    }
    if (node === at) at = at.nextSibling;
    else parent.insertBefore(node, at);
  });
  return parent;
}
