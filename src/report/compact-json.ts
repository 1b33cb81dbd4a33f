/**
 * JSON laid out for reading and diffing: an array or object goes on one line when it fits in `width` characters,
 * otherwise one member per line. Keys are sorted when `sortKeys` is set, so the same data always prints the same.
 */
export function compactJson(value: unknown, options: { width?: number; sortKeys?: boolean } = {}): string {
  const width = options.width ?? 80;
  const sortKeys = options.sortKeys ?? false;
  const render = (v: unknown, indent: string): string => {
    if (v === null || typeof v !== 'object') return JSON.stringify(v) ?? 'null';
    const inner = indent + '  ';
    if (Array.isArray(v)) {
      if (v.length === 0) return '[]';
      const items = v.map((x) => render(x, inner));
      const flat = `[${items.join(', ')}]`;
      if (!flat.includes('\n') && indent.length + flat.length <= width) return flat;
      return `[\n${items.map((x) => inner + x).join(',\n')}\n${indent}]`;
    }
    const keys = Object.keys(v).filter((k) => (v as Record<string, unknown>)[k] !== undefined);
    if (sortKeys) keys.sort();
    if (keys.length === 0) return '{}';
    const members = keys.map((k) => `${JSON.stringify(k)}: ${render((v as Record<string, unknown>)[k], inner)}`);
    const flat = `{ ${members.join(', ')} }`;
    if (!flat.includes('\n') && indent.length + flat.length <= width) return flat;
    return `{\n${members.map((x) => inner + x).join(',\n')}\n${indent}}`;
  };
  return render(value, '');
}
