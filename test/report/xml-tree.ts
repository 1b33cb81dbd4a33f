/** Test helper: parse XML with fast-xml-parser into a small element tree that is easy to query by tag and class. */
import { XMLParser, XMLValidator } from 'fast-xml-parser';

export interface XmlNode {
  tag: string;
  attrs: Record<string, string>;
  children: XmlNode[];
  /** Text directly inside this element (not in children). */
  text: string;
}

type Ordered = Record<string, unknown>;

function convert(entry: Ordered): XmlNode | null {
  const tag = Object.keys(entry).find((k) => k !== ':@');
  if (!tag || tag === '#text' || tag.startsWith('?')) return null;
  const attrs: Record<string, string> = {};
  const rawAttrs = (entry[':@'] ?? {}) as Record<string, unknown>;
  for (const [k, v] of Object.entries(rawAttrs)) attrs[k.replace(/^@_/, '')] = String(v);
  const kids = (entry[tag] ?? []) as Ordered[];
  const children: XmlNode[] = [];
  let text = '';
  for (const kid of kids) {
    if ('#text' in kid) text += String(kid['#text']);
    else {
      const node = convert(kid);
      if (node) children.push(node);
    }
  }
  return { tag, attrs, children, text };
}

/** Throws with the validator's message when the document is not well-formed. */
export function parseXml(xml: string): XmlNode {
  const valid = XMLValidator.validate(xml);
  if (valid !== true) throw new Error(`not well-formed XML: ${JSON.stringify(valid.err)}`);
  const parser = new XMLParser({
    preserveOrder: true,
    ignoreAttributes: false,
    attributeNamePrefix: '@_',
    parseAttributeValue: false,
    parseTagValue: false,
    trimValues: false,
    processEntities: true,
  });
  const doc = parser.parse(xml) as Ordered[];
  const roots = doc.map(convert).filter((n): n is XmlNode => n !== null);
  if (roots.length !== 1) throw new Error(`expected one root element, found ${roots.length}`);
  return roots[0];
}

export function descendants(node: XmlNode): XmlNode[] {
  return node.children.flatMap((c) => [c, ...descendants(c)]);
}

export function hasClass(node: XmlNode, cls: string): boolean {
  return (node.attrs.class ?? '').split(/\s+/).includes(cls);
}

export function byClass(node: XmlNode, cls: string): XmlNode[] {
  return descendants(node).filter((n) => hasClass(n, cls));
}

export function byTag(node: XmlNode, tag: string): XmlNode[] {
  return descendants(node).filter((n) => n.tag === tag);
}

/** All text inside the node, children included, in document order. */
export function textOf(node: XmlNode): string {
  return node.text + node.children.map(textOf).join('');
}
