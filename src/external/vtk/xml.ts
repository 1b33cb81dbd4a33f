// A small XML scanner for VTK XML files: elements, attributes and the text range of leaf elements, each with its
// line number (general XML libraries drop line numbers, and rungs's messages name the line). It handles the XML
// declaration, comments, DOCTYPE and the five predefined entities (XML 1.0, W3C 2008, §2.4 and §4.6); CDATA sections
// are rejected because VTK's ASCII data never needs them.
import { RungsInputError } from '../../errors.ts';
import { placeOf, type LevelRef } from '../where.ts';

export interface XmlElement {
  name: string;
  attrs: Record<string, string>;
  children: XmlElement[];
  line: number;
  /** Character range and first line of the element's content (meaningful for leaf elements). */
  textStart: number;
  textEnd: number;
  textLine: number;
}

const ENTITIES: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'" };

function decode(value: string): string {
  return value.replace(/&(amp|lt|gt|quot|apos|#\d+|#x[0-9a-fA-F]+);/g, (_m, e: string) =>
    e[0] === '#' ? String.fromCodePoint(e[1] === 'x' ? parseInt(e.slice(2), 16) : parseInt(e.slice(1), 10)) : ENTITIES[e]!,
  );
}

/** Parses the text into its root element; malformed input throws a RungsInputError naming file and line. */
export function parseXml(text: string, file: string, ref?: LevelRef): XmlElement {
  const fail = (line: number, message: string): never => {
    throw new RungsInputError(`${placeOf(ref, file, line)}: ${message}`, file);
  };
  let pos = 0;
  let line = 1;
  const advance = (to: number): void => {
    for (let p = pos; p < to; p++) if (text.charCodeAt(p) === 10) line++;
    pos = to;
  };
  const stack: XmlElement[] = [];
  let root: XmlElement | null = null;

  while (pos < text.length) {
    const lt = text.indexOf('<', pos);
    if (lt < 0) { advance(text.length); break; }
    advance(lt);
    if (text.startsWith('<?', pos)) {
      const end = text.indexOf('?>', pos);
      if (end < 0) fail(line, 'the file ends inside a <? … ?> declaration (truncated file?)');
      advance(end + 2);
    } else if (text.startsWith('<!--', pos)) {
      const end = text.indexOf('-->', pos);
      if (end < 0) fail(line, 'the file ends inside a comment (truncated file?)');
      advance(end + 3);
    } else if (text.startsWith('<![CDATA[', pos)) {
      fail(line, 'CDATA sections are not read; write the DataArrays as plain ASCII numbers');
    } else if (text.startsWith('<!', pos)) {
      const end = text.indexOf('>', pos);
      if (end < 0) fail(line, 'the file ends inside a <! … > declaration (truncated file?)');
      advance(end + 1);
    } else if (text.startsWith('</', pos)) {
      const end = text.indexOf('>', pos);
      if (end < 0) fail(line, 'the file ends inside a closing tag (truncated file?)');
      const name = text.slice(pos + 2, end).trim();
      const open = stack.pop();
      if (!open) fail(line, `closing tag </${name}> without an opening tag`);
      if (open!.name !== name) fail(line, `closing tag </${name}> does not match <${open!.name}> opened at line ${open!.line}`);
      open!.textEnd = pos;
      advance(end + 1);
    } else {
      const tagLine = line;
      let p = pos + 1;
      let quote = 0;
      while (p < text.length) {
        const c = text.charCodeAt(p);
        if (quote) { if (c === quote) quote = 0; } else if (c === 34 || c === 39) quote = c; else if (c === 62) break;
        p++;
      }
      if (p >= text.length) fail(tagLine, 'the file ends inside a tag (truncated file?)');
      const selfClosing = text.charCodeAt(p - 1) === 47;
      const inner = text.slice(pos + 1, selfClosing ? p - 1 : p);
      const nameMatch = /^([A-Za-z_:][-A-Za-z0-9_:.]*)/.exec(inner);
      if (!nameMatch) fail(tagLine, `malformed tag "<${inner.slice(0, 40)}>"`);
      const name = nameMatch![1]!;
      const attrs: Record<string, string> = {};
      const attrRe = /([A-Za-z_:][-A-Za-z0-9_:.]*)\s*=\s*(?:"([^"]*)"|'([^']*)')/g;
      let rest = inner.slice(name.length);
      let m: RegExpExecArray | null;
      while ((m = attrRe.exec(rest)) !== null) attrs[m[1]!] = decode(m[2] ?? m[3] ?? '');
      rest = rest.replace(attrRe, '').trim();
      if (rest !== '') fail(tagLine, `malformed attributes in <${name}>: "${rest.slice(0, 40)}"`);
      advance(p + 1);
      const el: XmlElement = { name, attrs, children: [], line: tagLine, textStart: pos, textEnd: pos, textLine: line };
      if (stack.length) stack[stack.length - 1]!.children.push(el);
      else if (root) fail(tagLine, `a second root element <${name}>; the file must have one root`);
      else root = el;
      if (!selfClosing) stack.push(el);
    }
  }
  if (stack.length) {
    const open = stack[stack.length - 1]!;
    fail(line, `the file ends before </${open.name}> (opened at line ${open.line}): truncated file?`);
  }
  if (!root) fail(1, 'no XML element in the file');
  return root!;
}

/** Child elements with the given name. */
export function childrenNamed(el: XmlElement, name: string): XmlElement[] {
  return el.children.filter((c) => c.name === name);
}
