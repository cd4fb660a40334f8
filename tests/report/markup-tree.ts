/**
 * A strict little parser for the markup our plots write (elements, quoted attributes, text,
 * character references), so tests can query elements by name and class. It refuses anything that
 * is not well formed (mismatched or unclosed tags, unquoted attributes, a raw `<` or `&` in text),
 * which is itself a check that every user string was escaped (W3C XML 1.0 §2.4, §3.1).
 */

/** A parsed element. */
export interface Node {
  name: string;
  attributes: Record<string, string>;
  children: Node[];
  /** Text directly inside, character references decoded. */
  text: string;
}

const REFERENCES: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'" };

function decode(text: string, where: number): string {
  return text.replace(/&([^;\s]*);?/g, (match, name: string) => {
    if (!match.endsWith(';')) throw new Error(`bare & at ${where}`);
    if (name.startsWith('#x')) return String.fromCodePoint(parseInt(name.slice(2), 16));
    if (name.startsWith('#')) return String.fromCodePoint(parseInt(name.slice(1), 10));
    const value = REFERENCES[name];
    if (value === undefined) throw new Error(`unknown reference &${name}; at ${where}`);
    return value;
  });
}

/**
 * Parses one root element (an XML declaration before it is skipped).
 *
 * @param markup - SVG or XHTML-like markup
 * @throws Error naming the offset of the first fault
 */
export function parseMarkup(markup: string): Node {
  let i = markup.startsWith('<?xml') ? markup.indexOf('?>') + 2 : 0;
  const root: Node = { name: '#root', attributes: {}, children: [], text: '' };
  const stack: Node[] = [root];
  while (i < markup.length) {
    const open = markup.indexOf('<', i);
    const textEnd = open === -1 ? markup.length : open;
    const text = markup.slice(i, textEnd);
    if (text.includes('>')) throw new Error(`raw > in text at ${i}`);
    (stack[stack.length - 1] as Node).text += decode(text, i);
    if (open === -1) break;
    if (markup.startsWith('</', open)) {
      const close = markup.indexOf('>', open);
      const name = markup.slice(open + 2, close).trim();
      const top = stack.pop();
      if (top === undefined || top.name !== name)
        throw new Error(`</${name}> at ${open} closes <${top?.name}>`);
      i = close + 1;
      continue;
    }
    const tag = /^<([A-Za-z][\w:-]*)((?:\s+[\w:-]+="[^"<]*")*)\s*(\/?)>/.exec(markup.slice(open));
    if (tag === null) throw new Error(`malformed tag at ${open}: ${markup.slice(open, open + 60)}`);
    const attributes: Record<string, string> = {};
    for (const m of (tag[2] ?? '').matchAll(/([\w:-]+)="([^"]*)"/g)) {
      if (attributes[m[1] as string] !== undefined) throw new Error(`attribute ${m[1]} twice at ${open}`);
      attributes[m[1] as string] = decode(m[2] as string, open);
    }
    const node: Node = { name: tag[1] as string, attributes, children: [], text: '' };
    (stack[stack.length - 1] as Node).children.push(node);
    if (tag[3] !== '/') stack.push(node);
    i = open + tag[0].length;
  }
  if (stack.length !== 1) throw new Error(`unclosed <${stack[stack.length - 1]?.name}>`);
  const [first] = root.children;
  if (first === undefined || root.children.length !== 1)
    throw new Error(`expected one root element, found ${root.children.length}`);
  return first;
}

/** Every element below `node` (depth first), itself included. */
export function allNodes(node: Node): Node[] {
  return [node, ...node.children.flatMap(allNodes)];
}

/** Elements with a class (space-separated list) containing `className`. */
export function byClass(node: Node, className: string): Node[] {
  return allNodes(node).filter((n) => (n.attributes.class ?? '').split(/\s+/).includes(className));
}

/** Elements by name. */
export function byName(node: Node, name: string): Node[] {
  return allNodes(node).filter((n) => n.name === name);
}

/** All text inside a node, children included. */
export function textOf(node: Node): string {
  return node.text + node.children.map(textOf).join('');
}

/** The (x, y) of `transform="translate(x,y)"`. */
export function translation(node: Node): [number, number] {
  const m = /translate\(([-\d.e]+),([-\d.e]+)\)/.exec(node.attributes.transform ?? '');
  if (m === null) throw new Error(`no translate in ${node.attributes.transform}`);
  return [Number(m[1]), Number(m[2])];
}

/** The numeric value of an attribute. */
export function numberAttribute(node: Node, name: string): number {
  const value = Number(node.attributes[name]);
  if (!Number.isFinite(value)) throw new Error(`${node.name}.${name} = ${node.attributes[name]}`);
  return value;
}

/** Points of an SVG path's M/L commands (as d3-shape writes them: absolute, comma separated). */
export function pathPoints(d: string): { command: string; x: number; y: number }[] {
  return [...d.matchAll(/([ML])([-\d.e]+),([-\d.e]+)/g)].map((m) => ({
    command: m[1] as string,
    x: Number(m[2]),
    y: Number(m[3]),
  }));
}
