// A small XML scanner for VTK XML files: elements, attributes and the text range of leaf elements, each with its
// line number, for rungs's messages. It handles the XML declaration, comments, DOCTYPE and the five predefined
// entities (XML 1.0, W3C 2008, §2.4 and §4.6); CDATA sections are rejected because VTK's ASCII data never needs them.
// Every reference is checked: a named one must be one of the five, a character reference (&#NNN; or &#xHHH;) must
// name a character XML allows (§2.2, production [2] Char) and a bare & is an error. Well-formedness that catches
// truncation and damage: one root element closed at the end, matching tags, no attribute twice, no < in attribute
// values, no text outside the root or beside child elements (except a DataArray's values before its <InformationKey>
// elements, which VTK 9 writes there).
// <AppendedData> ends the scan: its data, after a '_', may hold any byte, so it is located, not scanned — from the
// byte after the '_' to the closing </AppendedData></VTKFile> the file must end with (checked from the end).
// Why not a streaming SAX parser: sax 1.6.1 and saxes 6.0.0 were measured in this scanner's place, fed the same
// Latin-1 chunks, and found the same elements, lines and byte ranges, but they step through every character of a
// DataArray's text in JavaScript where this scanner passes over it with Buffer.indexOf: on 1M-point files (2 shared
// cores) the structure pass of a 97 MB ASCII .vtu took 6× as long (the whole read 1.2×), of a 99 MB base64 one 34×
// (the whole read 2.6×), with a peak RSS of 144 MiB against 80 MiB; and raw appended data, which is not XML, would
// still have to be split off by hand.
import { RungsInputError } from '../../errors.ts';
import { placeOf, type LevelRef } from '../where.ts';
import { bufferSource, ByteWindow, CHUNK_BYTES, utf8, type ByteSource } from './source.ts';

export interface XmlElement {
  name: string;
  attrs: Record<string, string>;
  children: XmlElement[];
  line: number;
  /** Byte range in the file and first line of the element's content (meaningful for leaf elements). */
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

/** The root element and the line the file ends on. */
export interface XmlDocument {
  root: XmlElement;
  endLine: number;
}

/** Parses XML text into its root element; see scanXml. */
export function parseXml(text: string, file: string, ref?: LevelRef, chunkBytes?: number): XmlElement {
  return scanXml(bufferSource(Buffer.from(text, 'utf8')), file, ref, chunkBytes).root;
}

/** Offset of the first character in text[from, to) that is not a blank, tab or line break, or -1. */
function firstNonBlank(text: string, from: number, to: number): number {
  for (let p = from; p < to; p++) {
    const c = text.charCodeAt(p);
    if (c !== 32 && c !== 9 && c !== 13 && c !== 10) return p;
  }
  return -1;
}

/** Number of line breaks in text[from, to). */
function breaks(text: string, from: number, to: number): number {
  let n = 0;
  for (let p = text.indexOf('\n', from); p >= 0 && p < to; p = text.indexOf('\n', p + 1)) n++;
  return n;
}

/**
 * Scans the XML of a source chunk by chunk into its elements (the text of leaf elements is checked — references,
 * placement — and located by its byte range, not kept). Malformed input throws a RungsInputError naming file and line.
 * Markup (a tag, a comment, a declaration) must fit in the window's limit (MAX_PIECE_BYTES); text need not.
 */
export function scanXml(source: ByteSource, file: string, ref?: LevelRef, chunkBytes = CHUNK_BYTES): XmlDocument {
  const fail = (line: number, message: string): never => {
    throw new RungsInputError(`${placeOf(ref, file, line)}: ${message}`, file);
  };
  let line = 1;
  const w = new ByteWindow(source, 0, source.size, (bytes) => fail(line, `a tag, comment or declaration longer than ${bytes} bytes; VTK files hold none that long (damaged file?)`), chunkBytes);
  w.more(0);
  let text = w.text;
  let pos = 0;
  /** Reads on, keeping the window from `keep`; `pos` moves with it. */
  const more = (keep: number): boolean => {
    if (!w.more(keep)) return false;
    text = w.text;
    pos -= keep;
    return true;
  };
  const advance = (to: number): void => {
    line += breaks(text, pos, to);
    pos = to;
  };
  /** Offset of `needle` at or after `from` (relative to pos, which the window keeps), reading on as needed; -1 at the end. */
  const find = (needle: string, from: number): number => {
    let off = from - pos;
    for (;;) {
      const at = text.indexOf(needle, pos + off);
      if (at >= 0) return at;
      off = Math.max(off, text.length - pos - needle.length + 1);
      if (!more(pos)) return -1;
    }
  };
  let scratch: Buffer | null = null;
  /** Moves the window to the next '<' or '&' after it (or to the end of the file), counting the line breaks passed. */
  const skipText = (): void => {
    scratch ??= Buffer.allocUnsafe(Math.max(16, Math.min(chunkBytes, CHUNK_BYTES)));
    let at = w.base + text.length;
    let rest: Uint8Array;
    for (;;) {
      const got = source.read(scratch, 0, Math.min(scratch.length, Math.max(0, source.size - at)), at);
      const chunk = scratch.subarray(0, got);
      const lt = chunk.indexOf(60), amp = chunk.indexOf(38);
      const stop = lt < 0 ? (amp < 0 ? got : amp) : amp < 0 ? lt : Math.min(lt, amp);
      for (let nl = chunk.indexOf(10); nl >= 0 && nl < stop; nl = chunk.indexOf(10, nl + 1)) line++;
      at += stop;
      rest = chunk.subarray(stop);
      if (stop < got || got === 0) break;
    }
    w.seek(at, rest);
    text = w.text;
    pos = 0;
  };
  const stack: XmlElement[] = [];
  /** Line of the first non-blank text directly inside each open element (0: none yet). */
  const textAt: number[] = [];
  let root: XmlElement | null = null;
  let appended: XmlElement | null = null;
  if (text.startsWith('\xEF\xBB\xBF')) pos = 3; // UTF-8 byte order mark

  for (;;) {
    // Text up to the next '<', a window at a time: references checked; outside the root, or beside child elements,
    // only blanks are allowed.
    let lt = -1;
    let seenText = false;
    for (;;) {
      lt = text.indexOf('<', pos);
      let to = lt >= 0 ? lt : text.length;
      if (lt < 0 && !w.done) {
        // A reference cut by the end of the window is checked whole in the next one.
        const amp = text.lastIndexOf('&');
        if (amp >= pos && amp > text.length - 16) to = amp;
      }
      const nonBlank = firstNonBlank(text, pos, to);
      if (nonBlank >= 0 && !seenText) {
        seenText = true;
        const at = line + breaks(text, pos, nonBlank);
        const open = stack[stack.length - 1];
        /** The text quoted in a message, the same wherever the window ends: up to the next '<', 30 characters. */
        const shown = (): string => {
          const abs = w.base + nonBlank;
          while (w.base + text.length < abs + 120 && more(pos));
          const s = text.slice(abs - w.base, abs - w.base + 120);
          return utf8(s.includes('<') ? s.slice(0, s.indexOf('<')) : s).trim().slice(0, 30);
        };
        if (!open) {
          fail(at, `text '${shown()}' outside the root element${root ? ` (after </${root.name}>)` : ''}; an XML file holds one root element and only blanks around it`);
        }
        if (open!.children.length) {
          fail(at, `text '${shown()}' beside the child elements of <${open!.name}> (line ${open!.line}); VTK elements hold either elements or data, not both`);
        }
        if (!textAt[stack.length - 1]) textAt[stack.length - 1] = at;
      }
      const amp = nonBlank >= 0 ? text.indexOf('&', nonBlank) : -1;
      if (amp >= 0 && amp < to) {
        const chunk = utf8(text.slice(pos, to));
        decode(chunk, (offset, message) => fail(line + breaks(chunk, 0, offset), message));
      }
      advance(to);
      if (lt >= 0) break;
      // The rest of a long text (a DataArray's numbers or base64) whose start has been checked: passed over in raw
      // chunks up to the next '<' or '&', counting lines, without making window text of it.
      if (seenText && pos === text.length && !w.done) {
        skipText();
        continue;
      }
      if (!more(pos)) break;
    }
    if (lt < 0) break;
    // Markup: make sure its opening characters are in the window.
    if (text.length - pos < 9) more(pos);
    if (text.startsWith('<?', pos)) {
      const end = find('?>', pos);
      if (end < 0) fail(line, 'the file ends inside a <? … ?> declaration (truncated file?)');
      advance(end + 2);
    } else if (text.startsWith('<!--', pos)) {
      const end = find('-->', pos + 4);
      if (end < 0) fail(line, 'the file ends inside a comment (truncated file?)');
      advance(end + 3);
    } else if (text.startsWith('<![CDATA[', pos)) {
      fail(line, 'CDATA sections are not read; write the DataArrays as plain ASCII numbers');
    } else if (text.startsWith('<!', pos)) {
      const end = find('>', pos);
      if (end < 0) fail(line, 'the file ends inside a <! … > declaration (truncated file?)');
      if (!text.startsWith('<!DOCTYPE', pos)) fail(line, `unknown declaration '${utf8(text.slice(pos, pos + 12))}'; XML allows <!-- comments --> and <!DOCTYPE …>`);
      if (text.slice(pos, end).includes('[')) fail(line, 'a DOCTYPE with an internal subset ([ … ]) is not read; VTK files need no DOCTYPE');
      advance(end + 1);
    } else if (text.startsWith('</', pos)) {
      const end = find('>', pos);
      if (end < 0) fail(line, 'the file ends inside a closing tag (truncated file?)');
      const name = utf8(text.slice(pos + 2, end).trim());
      const open = stack.pop();
      textAt.length = stack.length;
      if (!open) fail(line, `closing tag </${name}> without an opening tag`);
      if (open!.name !== name) fail(line, `closing tag </${name}> does not match <${open!.name}> opened at line ${open!.line}`);
      if (!open!.children.length) open!.textEnd = w.base + pos;
      advance(end + 1);
    } else {
      const tagLine = line;
      let p = pos + 1;
      let quote = 0;
      for (;;) {
        while (p < text.length) {
          const c = text.charCodeAt(p);
          if (quote) { if (c === quote) quote = 0; } else if (c === 34 || c === 39) quote = c; else if (c === 62) break;
          p++;
        }
        if (p < text.length) break;
        const keep = pos;
        if (!more(pos)) break;
        p -= keep;
      }
      if (p >= text.length) fail(tagLine, 'the file ends inside a tag (truncated file?)');
      const selfClosing = text.charCodeAt(p - 1) === 47;
      const inner = utf8(text.slice(pos + 1, selfClosing ? p - 1 : p));
      const nameMatch = /^([A-Za-z_:][-A-Za-z0-9_:.]*)/.exec(inner);
      if (!nameMatch) fail(tagLine, `malformed tag "<${inner.slice(0, 40)}>"`);
      const name = nameMatch![1]!;
      const attrs: Record<string, string> = Object.create(null) as Record<string, string>;
      const attrRe = /\s+([A-Za-z_:][-A-Za-z0-9_:.]*)\s*=\s*(?:"([^"]*)"|'([^']*)')/y;
      const rest = inner.slice(name.length);
      let m: RegExpExecArray | null;
      let at = 0;
      while ((m = attrRe.exec(rest)) !== null) {
        const attrLine = tagLine + breaks(inner, 0, name.length + m.index + m[0].search(/\S/));
        const raw = m[2] ?? m[3] ?? '';
        if (Object.hasOwn(attrs, m[1]!)) fail(attrLine, `attribute ${m[1]} appears twice in <${name}>`);
        if (raw.includes('<')) fail(attrLine, `attribute ${m[1]} of <${name}> holds '<', which XML does not allow in attribute values (write &lt;)`);
        const valueAt = name.length + m.index + m[0].indexOf(raw);
        attrs[m[1]!] = decode(raw, (offset, message) => fail(tagLine + breaks(inner, 0, valueAt + offset), message));
        at = attrRe.lastIndex;
      }
      if (rest.slice(at).trim() !== '') fail(tagLine, `malformed attributes in <${name}>: "${rest.slice(at).trim().slice(0, 40)}"; write name="value" pairs separated by blanks`);
      const tagStart = w.base + pos;
      advance(p + 1);
      const el: XmlElement = { name, attrs, children: [], line: tagLine, textStart: w.base + pos, textEnd: w.base + pos, textLine: line };
      if (stack.length) {
        const parent = stack[stack.length - 1]!;
        const textLine = textAt[stack.length - 1];
        // VTK 9 writes <InformationKey> elements after a DataArray's values (checked on its files): the data ends there.
        const afterData = parent.name === 'DataArray' && name === 'InformationKey' && parent.children.length === 0;
        if (textLine && !afterData) fail(textLine, `text beside the child elements of <${parent.name}> (line ${parent.line}); VTK elements hold either elements or data, not both`);
        if (parent.children.length === 0) parent.textEnd = tagStart;
        parent.children.push(el);
      } else if (root) fail(tagLine, `a second root element <${name}>; the file must have one root`);
      else root = el;
      if (!selfClosing) { stack.push(el); textAt[stack.length - 1] = 0; }
      if (name === 'AppendedData' && !selfClosing) {
        // The appended data may hold any byte ('<' and '&' too): markup is not scanned past its '_'.
        if (stack.length !== 2) fail(tagLine, `<AppendedData> must be a child of the root element <VTKFile>, found inside <${stack[stack.length - 2]!.name}>`);
        for (;;) {
          while (pos < text.length && /[ \t\r\n]/.test(text[pos]!)) advance(pos + 1);
          if (pos < text.length || !more(pos)) break;
        }
        if (text[pos] !== '_') {
          fail(line, `<AppendedData> (line ${tagLine}) must start its data with '_' after blanks, found ${pos < text.length ? `'${text[pos]}'` : 'the end of the file'}`);
        }
        el.textStart = w.base + pos + 1;
        el.textLine = line;
        appended = el;
        break;
      }
    }
  }
  if (appended) {
    // The data runs to the closing tags at the end of the file; their absence means a truncated file.
    const tailBytes = Math.min(source.size - appended.textStart, 4096);
    const tail = Buffer.alloc(tailBytes);
    const got = source.read(tail, 0, tailBytes, source.size - tailBytes);
    const m = /<\/AppendedData>[ \t\r\n]*<\/VTKFile>[ \t\r\n]*$/.exec(tail.toString('latin1', 0, got));
    if (!m) {
      fail(line, `the file does not end with </AppendedData></VTKFile> after the appended data that starts here (line ${line}): ` +
        'truncated file?');
    }
    appended.textEnd = source.size - tailBytes + m!.index;
    stack.length = 0;
  }
  if (stack.length) {
    const open = stack[stack.length - 1]!;
    fail(line, `the file ends before </${open.name}> (opened at line ${open.line}): truncated file?`);
  }
  if (!root) fail(1, 'no XML element in the file');
  return { root: root!, endLine: line };
}

/** Child elements with the given name. */
export function childrenNamed(el: XmlElement, name: string): XmlElement[] {
  return el.children.filter((c) => c.name === name);
}
