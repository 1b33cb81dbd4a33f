import { RungsInputError } from '../errors.ts';

/**
 * Splits a command template into argv words without a shell: words are separated by whitespace; '…' quotes
 * everything literally, "…" quotes with \" and \\ as escapes, and outside quotes a backslash keeps the next
 * character. Nothing is expanded (no variables, globs, pipes or redirections): what you write is what runs.
 */
export function splitCommandWords(template: string, where = 'command'): string[] {
  const words: string[] = [];
  let word = '';
  let inWord = false;
  let i = 0;
  const n = template.length;
  while (i < n) {
    const ch = template[i]!;
    if (ch === ' ' || ch === '\t' || ch === '\n' || ch === '\r') {
      if (inWord) { words.push(word); word = ''; inWord = false; }
      i++;
      continue;
    }
    inWord = true;
    if (ch === "'") {
      const close = template.indexOf("'", i + 1);
      if (close < 0) throw unclosed(where, "'", i, template);
      word += template.slice(i + 1, close);
      i = close + 1;
    } else if (ch === '"') {
      i++;
      for (;;) {
        if (i >= n) throw unclosed(where, '"', template.lastIndexOf('"'), template);
        const c = template[i]!;
        if (c === '"') { i++; break; }
        if (c === '\\' && (template[i + 1] === '"' || template[i + 1] === '\\')) { word += template[i + 1]; i += 2; continue; }
        word += c;
        i++;
      }
    } else if (ch === '\\') {
      if (i + 1 >= n) throw new RungsInputError(`${where}: the command ends with a lone backslash: ${template}`, where);
      word += template[i + 1];
      i += 2;
    } else {
      word += ch;
      i++;
    }
  }
  if (inWord) words.push(word);
  if (words.length === 0) throw new RungsInputError(`${where}: the command is empty; give the program and its arguments, e.g. "python3 solver.py --n {n} --out {out}"`, where);
  return words;
}

function unclosed(where: string, quote: string, at: number, template: string): RungsInputError {
  return new RungsInputError(`${where}: the ${quote} quote opened at character ${at + 1} is never closed: ${template}`, where);
}
