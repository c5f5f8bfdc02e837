/**
 * A tiny XML well-formedness checker for the SVG tests (no DOM, no extra
 * dependency). It checks what the XML 1.0 recommendation calls well-formed for
 * the subset SVG writers emit: one root element, properly nested and matched
 * tags, quoted and unique attributes, no raw `<` or stray `&` in text or
 * attribute values (only the five predefined entities and numeric character
 * references), comments, processing instructions and CDATA sections closed.
 * It returns the element tree so tests can count marks.
 */

export interface XmlElement {
  name: string;
  attrs: Record<string, string>;
  children: XmlElement[];
  text: string;
}

const NAME = /^[A-Za-z_:][A-Za-z0-9_.:-]*/;
const ENTITY = /&(?:amp|lt|gt|quot|apos|#[0-9]+|#x[0-9A-Fa-f]+);/g;

function checkText(s: string, where: string): void {
  const stripped = s.replace(ENTITY, '');
  if (stripped.includes('&')) throw new Error(`stray '&' in ${where}`);
  if (stripped.includes('<')) throw new Error(`raw '<' in ${where}`);
}

function parseAttrs(src: string, tag: string): Record<string, string> {
  const attrs: Record<string, string> = {};
  let rest = src.trim();
  while (rest.length) {
    const m = /^([A-Za-z_:][A-Za-z0-9_.:-]*)\s*=\s*("([^"]*)"|'([^']*)')/.exec(rest);
    if (!m) throw new Error(`bad attribute syntax in <${tag}>: ${rest.slice(0, 40)}`);
    if (m[1] in attrs) throw new Error(`duplicate attribute ${m[1]} in <${tag}>`);
    const value = m[3] ?? m[4] ?? '';
    checkText(value, `attribute ${m[1]} of <${tag}>`);
    attrs[m[1]] = value;
    rest = rest.slice(m[0].length);
    if (rest.length && !/^\s/.test(rest)) throw new Error(`attributes not separated in <${tag}>`);
    rest = rest.trim();
  }
  return attrs;
}

/** Parse `xml`; throws an Error naming the first well-formedness violation. */
export function parseXml(xml: string): XmlElement {
  let i = 0;
  const stack: XmlElement[] = [];
  let root: XmlElement | null = null;
  const expectOutside = (s: string): void => {
    if (s.trim() !== '') throw new Error(`text outside the root element: ${s.trim().slice(0, 30)}`);
  };
  while (i < xml.length) {
    const lt = xml.indexOf('<', i);
    const text = lt < 0 ? xml.slice(i) : xml.slice(i, lt);
    if (stack.length) {
      checkText(text, `content of <${stack[stack.length - 1].name}>`);
      stack[stack.length - 1].text += text;
    } else expectOutside(text);
    if (lt < 0) break;
    const close = (marker: string, what: string): number => {
      const end = xml.indexOf(marker, lt);
      if (end < 0) throw new Error(`unclosed ${what}`);
      return end + marker.length;
    };
    if (xml.startsWith('<!--', lt)) { i = close('-->', 'comment'); continue; }
    if (xml.startsWith('<?', lt)) { i = close('?>', 'processing instruction'); continue; }
    if (xml.startsWith('<![CDATA[', lt)) {
      if (!stack.length) throw new Error('CDATA outside the root element');
      i = close(']]>', 'CDATA section');
      continue;
    }
    if (xml.startsWith('<!DOCTYPE', lt)) { i = close('>', 'DOCTYPE'); continue; }
    const gt = xml.indexOf('>', lt);
    if (gt < 0) throw new Error('unclosed tag');
    const body = xml.slice(lt + 1, gt);
    i = gt + 1;
    if (body.startsWith('/')) {
      const name = body.slice(1).trim();
      const open = stack.pop();
      if (!open || open.name !== name) throw new Error(`</${name}> does not match <${open?.name ?? 'nothing'}>`);
      continue;
    }
    const selfClosing = body.endsWith('/');
    const inner = selfClosing ? body.slice(0, -1) : body;
    const m = NAME.exec(inner);
    if (!m) throw new Error(`bad tag name: <${inner.slice(0, 20)}`);
    const el: XmlElement = { name: m[0], attrs: parseAttrs(inner.slice(m[0].length), m[0]), children: [], text: '' };
    if (stack.length) stack[stack.length - 1].children.push(el);
    else if (root) throw new Error('more than one root element');
    else root = el;
    if (!selfClosing) stack.push(el);
  }
  if (stack.length) throw new Error(`unclosed <${stack[stack.length - 1].name}>`);
  if (!root) throw new Error('no root element');
  return root;
}

/** Every element below `el` (depth first) for which `pred` holds. */
export function findAll(el: XmlElement, pred: (e: XmlElement) => boolean): XmlElement[] {
  const out: XmlElement[] = [];
  const walk = (e: XmlElement): void => {
    if (pred(e)) out.push(e);
    e.children.forEach(walk);
  };
  walk(el);
  return out;
}

/** The drawn items of a Vega mark group: children of `<g class="mark-<type> role-mark <name>_marks">`. */
export function markItems(svgRoot: XmlElement, markName: string): XmlElement[] {
  const groups = findAll(svgRoot, (e) => e.name === 'g' && (e.attrs.class ?? '').split(/\s+/).includes(`${markName}_marks`));
  return groups.flatMap((g) => g.children);
}
