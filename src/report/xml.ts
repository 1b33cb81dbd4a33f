/** Escape text for XML/HTML element content and double-quoted attributes (XML 1.0 §2.4, §3.3.3). */
export function escapeXml(text: string): string {
  return (
    text
      .replace(/&/g, '&amp;')
      .replace(/</g, '&lt;')
      .replace(/>/g, '&gt;')
      .replace(/"/g, '&quot;')
      .replace(/'/g, '&apos;')
      // Control characters other than tab, LF and CR are not allowed in XML 1.0 documents at all (§2.2).
      .replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\ufffe\uffff]/g, '\ufffd')
  );
}

/** Attribute values also keep their line breaks and tabs, which attribute normalisation would turn into spaces (XML 1.0 §3.3.3). */
export function escapeAttribute(text: string): string {
  return escapeXml(text).replace(/\n/g, '&#10;').replace(/\r/g, '&#13;').replace(/\t/g, '&#9;');
}

/** `<tag a="1" b="x">children</tag>`, or self-closed when there are no children; attribute values escaped. */
export function el(tag: string, attrs: Record<string, string | number | undefined>, children: string | string[] = ''): string {
  const attrText = Object.entries(attrs)
    .filter(([, v]) => v !== undefined)
    .map(([k, v]) => ` ${k}="${escapeAttribute(String(v))}"`)
    .join('');
  const body = Array.isArray(children) ? children.join('') : children;
  return body === '' ? `<${tag}${attrText}/>` : `<${tag}${attrText}>${body}</${tag}>`;
}
