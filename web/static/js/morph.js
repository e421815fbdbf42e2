// Update a panel in place: the panel's new content is built as before
// (detached elements, cheap), then the live subtree is brought to match
// it node by node, so the document only sees the text and attributes
// that changed. Rebuilding the whole panel on every frame replaced
// hundreds of nodes, which costs style, layout and paint of all of
// them, and loses what the user had under the pointer or selected.
//
// Nodes are matched by position; a node whose kind or tag differs is
// replaced, as are form controls (their state and listeners belong to
// the new ones).

const Replaced = new Set(['INPUT', 'SELECT', 'TEXTAREA', 'BUTTON']);

// Make live's children match next (an array of nodes, taken over).
export function morphChildren(live, next) {
  for (let i = 0; i < next.length; i++) {
    const o = live.childNodes[i];
    if (o) morphNode(live, o, next[i]);
    else live.append(next[i]);
  }
  while (live.childNodes.length > next.length) live.lastChild.remove();
}

function morphNode(parent, o, n) {
  if (o.nodeType !== n.nodeType || o.nodeName !== n.nodeName || Replaced.has(n.nodeName) || (n.nodeType !== 1 && n.nodeType !== 3)) {
    parent.replaceChild(n, o);
    return;
  }
  if (n.nodeType === 3) {
    if (o.nodeValue !== n.nodeValue) o.nodeValue = n.nodeValue;
    return;
  }
  for (const a of [...o.attributes]) if (!n.hasAttribute(a.name)) o.removeAttribute(a.name);
  for (const a of n.attributes) if (o.getAttribute(a.name) !== a.value) o.setAttribute(a.name, a.value);
  morphChildren(o, [...n.childNodes]);
}
