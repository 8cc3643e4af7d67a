// A small XML 1.0 reader for tests: checks well-formedness (one root, properly nested and closed
// elements, quoted unique attributes, known entity references, no stray `<` or `&`) and returns
// the element tree. Follows the W3C XML 1.0 rules for the subset SVG files use (no DTD).

export interface XmlElement {
  name: string;
  attributes: Map<string, string>;
  children: XmlElement[];
  /** Text directly inside this element, entities decoded. */
  text: string;
}

const NAME = /^[A-Za-z_:][\w.:-]*/;
const ENTITIES: Record<string, string> = { amp: "&", lt: "<", gt: ">", quot: '"', apos: "'" };

function decode(text: string, where: number): string {
  return text.replace(/&([^;]*);|&/g, (m, body: string | undefined) => {
    if (body === undefined) throw new Error(`bare & near offset ${where}`);
    if (body in ENTITIES) return ENTITIES[body]!;
    const num = /^#(x[0-9a-fA-F]+|[0-9]+)$/.exec(body);
    if (num) return String.fromCodePoint(num[1]!.startsWith("x") ? parseInt(num[1]!.slice(1), 16) : parseInt(num[1]!, 10));
    throw new Error(`unknown entity &${body}; near offset ${where}`);
  });
}

/** Parses `source`; throws an Error naming the first well-formedness problem. */
export function parseXml(source: string): XmlElement {
  let pos = 0;
  const stack: XmlElement[] = [];
  let root: XmlElement | undefined;
  const fail = (msg: string): never => {
    throw new Error(`${msg} at offset ${pos}`);
  };
  if (source.startsWith("<?xml")) {
    const end = source.indexOf("?>");
    if (end < 0) fail("unterminated XML declaration");
    pos = end + 2;
  }
  while (pos < source.length) {
    const lt = source.indexOf("<", pos);
    const textEnd = lt < 0 ? source.length : lt;
    const text = source.slice(pos, textEnd);
    if (text.includes(">") && text.includes("]]>")) fail("']]>' in text");
    if (stack.length === 0) {
      if (text.trim() !== "") fail("text outside the root element");
    } else {
      stack[stack.length - 1]!.text += decode(text, pos);
    }
    if (lt < 0) break;
    pos = lt;
    if (source.startsWith("<!--", pos)) {
      const end = source.indexOf("-->", pos + 4);
      if (end < 0) fail("unterminated comment");
      if (source.slice(pos + 4, end).includes("--")) fail("'--' inside a comment");
      pos = end + 3;
      continue;
    }
    if (source.startsWith("<?", pos)) {
      const end = source.indexOf("?>", pos);
      if (end < 0) fail("unterminated processing instruction");
      pos = end + 2;
      continue;
    }
    if (source.startsWith("<![CDATA[", pos)) {
      const end = source.indexOf("]]>", pos);
      if (end < 0 || stack.length === 0) fail("bad CDATA section");
      stack[stack.length - 1]!.text += source.slice(pos + 9, end);
      pos = end + 3;
      continue;
    }
    if (source.startsWith("</", pos)) {
      pos += 2;
      const m = NAME.exec(source.slice(pos));
      if (!m) fail("bad closing tag name");
      pos += m![0].length;
      while (/\s/.test(source[pos] ?? "")) pos++;
      if (source[pos] !== ">") fail("'>' expected");
      pos++;
      const open = stack.pop();
      if (!open || open.name !== m![0]) fail(`</${m![0]}> does not close <${open?.name ?? "nothing"}>`);
      continue;
    }
    pos++;
    const m = NAME.exec(source.slice(pos));
    if (!m) fail("bad tag name");
    const el: XmlElement = { name: m![0], attributes: new Map(), children: [], text: "" };
    pos += m![0].length;
    for (;;) {
      const ws = /^\s*/.exec(source.slice(pos))![0].length;
      pos += ws;
      if (source.startsWith("/>", pos) || source[pos] === ">") break;
      if (ws === 0) fail("white space expected between attributes");
      const a = NAME.exec(source.slice(pos));
      if (!a) fail("bad attribute name");
      pos += a![0].length;
      const eq = /^\s*=\s*/.exec(source.slice(pos));
      if (!eq) fail("'=' expected");
      pos += eq![0].length;
      const quote = source[pos];
      if (quote !== '"' && quote !== "'") fail("quoted attribute value expected");
      const end = source.indexOf(quote!, pos + 1);
      if (end < 0) fail("unterminated attribute value");
      const raw = source.slice(pos + 1, end);
      if (raw.includes("<")) fail("'<' in attribute value");
      if (el.attributes.has(a![0])) fail(`attribute ${a![0]} given twice`);
      el.attributes.set(a![0], decode(raw, pos));
      pos = end + 1;
    }
    const selfClosing = source.startsWith("/>", pos);
    pos += selfClosing ? 2 : 1;
    if (stack.length > 0) stack[stack.length - 1]!.children.push(el);
    else if (root) fail("second root element");
    else root = el;
    if (!selfClosing) stack.push(el);
  }
  if (stack.length > 0) fail(`<${stack[stack.length - 1]!.name}> never closed`);
  if (!root) fail("no root element");
  return root!;
}

/** Every element of the tree, depth first. */
export function allElements(root: XmlElement): XmlElement[] {
  const out: XmlElement[] = [];
  const walk = (e: XmlElement) => {
    out.push(e);
    e.children.forEach(walk);
  };
  walk(root);
  return out;
}
