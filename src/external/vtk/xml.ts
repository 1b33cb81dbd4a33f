// A small XML scanner for VTK XML files: elements, attributes and the text range of leaf elements, each with its
// line number (general XML libraries drop line numbers, and rungs's messages name the line). It handles the XML
// declaration, comments, DOCTYPE and the five predefined entities (XML 1.0, W3C 2008, §2.4 and §4.6); CDATA sections
// are rejected because VTK's ASCII data never needs them. Every reference is checked: a named one must be one of the
// five, a character reference (&#NNN; or &#xHHH;) must name a character XML allows (§2.2, production [2] Char) and a
// bare & is an error. Well-formedness that catches truncation and damage: one root element closed at the end,
// matching tags, no attribute twice, no < in attribute values, no text outside the root or beside child elements.
import { RungsInputError } from '../../errors.ts';
import { lineAt, placeOf, type LevelRef } from '../where.ts';

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

/** XML 1.0 §2.2 [2]: #x9 | #xA | #xD | [#x20-#xD7FF] | [#xE000-#xFFFD] | [#x10000-#x10FFFF]. */
const isXmlChar = (c: number): boolean =>
  c === 0x9 || c === 0xa || c === 0xd || (c >= 0x20 && c <= 0xd7ff) || (c >= 0xe000 && c <= 0xfffd) || (c >= 0x10000 && c <= 0x10ffff);

const REFERENCE_FORMS = 'XML allows &amp; &lt; &gt; &quot; &apos;, &#NNN; and &#xHHH; naming a character XML allows; write a bare & as &amp;';

/** The text with its references replaced; `fail(offset, message)` is called at the first invalid one. */
function decode(value: string, fail: (offset: number, message: string) => never): string {
  if (!value.includes('&')) return value;
  return value.replace(/&([^;&\s<]{0,12});?/g, (m: string, body: string, offset: number) => {
    if (!m.endsWith(';')) fail(offset, `'${m.slice(0, 14)}' is not a complete reference (no ';'); ${REFERENCE_FORMS}`);
    if (Object.hasOwn(ENTITIES, body)) return ENTITIES[body]!;
    const dec = /^#([0-9]{1,7})$/.exec(body);
    const hex = /^#x([0-9a-fA-F]{1,6})$/.exec(body);
    if (!dec && !hex) fail(offset, `'${m}' is not a reference rungs reads (only the five predefined entities and character references); ${REFERENCE_FORMS}`);
    const code = dec ? parseInt(dec[1]!, 10) : parseInt(hex![1]!, 16);
    if (!isXmlChar(code)) fail(offset, `'${m}' refers to code point ${code}, which is not a character XML allows; ${REFERENCE_FORMS}`);
    return String.fromCodePoint(code);
  });
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
  /** Line of the first non-blank text directly inside each open element (0: none yet). */
  const textAt: number[] = [];
  let root: XmlElement | null = null;
  if (text.charCodeAt(0) === 0xfeff) pos = 1;

  while (pos < text.length) {
    let lt = text.indexOf('<', pos);
    if (lt < 0) lt = text.length;
    // Text between tags: references checked; outside the root, or beside child elements, only blanks are allowed.
    const chunk = text.slice(pos, lt);
    if (/[^ \t\r\n]/.test(chunk)) {
      const nonBlank = chunk.search(/[^ \t\r\n]/);
      const at = line + (chunk.slice(0, nonBlank).match(/\n/g)?.length ?? 0);
      const open = stack[stack.length - 1];
      if (!open) {
        fail(at, `text '${chunk.trim().slice(0, 30)}' outside the root element${root ? ` (after </${root.name}>)` : ''}; an XML file holds one root element and only blanks around it`);
      }
      if (open!.children.length) {
        fail(at, `text '${chunk.trim().slice(0, 30)}' beside the child elements of <${open!.name}> (line ${open!.line}); VTK elements hold either elements or data, not both`);
      }
      decode(chunk, (offset, message) => fail(lineAt(text, pos + offset), message));
      if (!textAt[stack.length - 1]) textAt[stack.length - 1] = at;
    }
    if (lt >= text.length) { advance(text.length); break; }
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
      if (!text.startsWith('<!DOCTYPE', pos)) fail(line, `unknown declaration '${text.slice(pos, pos + 12)}'; XML allows <!-- comments --> and <!DOCTYPE …>`);
      if (text.slice(pos, end).includes('[')) fail(line, 'a DOCTYPE with an internal subset ([ … ]) is not read; VTK files need no DOCTYPE');
      advance(end + 1);
    } else if (text.startsWith('</', pos)) {
      const end = text.indexOf('>', pos);
      if (end < 0) fail(line, 'the file ends inside a closing tag (truncated file?)');
      const name = text.slice(pos + 2, end).trim();
      const open = stack.pop();
      textAt.length = stack.length;
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
      const attrs: Record<string, string> = Object.create(null) as Record<string, string>;
      const attrRe = /\s+([A-Za-z_:][-A-Za-z0-9_:.]*)\s*=\s*(?:"([^"]*)"|'([^']*)')/y;
      const rest = inner.slice(name.length);
      let m: RegExpExecArray | null;
      let at = 0;
      while ((m = attrRe.exec(rest)) !== null) {
        const attrLine = tagLine + (inner.slice(0, name.length + m.index + m[0].search(/\S/)).match(/\n/g)?.length ?? 0);
        const raw = m[2] ?? m[3] ?? '';
        if (Object.hasOwn(attrs, m[1]!)) fail(attrLine, `attribute ${m[1]} appears twice in <${name}>`);
        if (raw.includes('<')) fail(attrLine, `attribute ${m[1]} of <${name}> holds '<', which XML does not allow in attribute values (write &lt;)`);
        attrs[m[1]!] = decode(raw, (offset, message) => fail(lineAt(text, pos + 1 + name.length + m!.index + m![0].indexOf(raw) + offset), message));
        at = attrRe.lastIndex;
      }
      if (rest.slice(at).trim() !== '') fail(tagLine, `malformed attributes in <${name}>: "${rest.slice(at).trim().slice(0, 40)}"; write name="value" pairs separated by blanks`);
      advance(p + 1);
      const el: XmlElement = { name, attrs, children: [], line: tagLine, textStart: pos, textEnd: pos, textLine: line };
      if (stack.length) {
        const parent = stack[stack.length - 1]!;
        const textLine = textAt[stack.length - 1];
        if (textLine) fail(textLine, `text beside the child elements of <${parent.name}> (line ${parent.line}); VTK elements hold either elements or data, not both`);
        parent.children.push(el);
      } else if (root) fail(tagLine, `a second root element <${name}>; the file must have one root`);
      else root = el;
      if (!selfClosing) { stack.push(el); textAt[stack.length - 1] = 0; }
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
