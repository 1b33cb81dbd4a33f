/** Keeps the last `limit` bytes written to it, so a chatty solver cannot fill memory while its end stays visible. */
export class OutputTail {
  private chunks: Buffer[] = [];
  private size = 0;
  /** Bytes dropped from the front so far. */
  dropped = 0;

  constructor(private readonly limit = 64 * 1024) {}

  push(chunk: Buffer): void {
    this.chunks.push(chunk);
    this.size += chunk.length;
    while (this.size - this.chunks[0]!.length >= this.limit) {
      const first = this.chunks.shift()!;
      this.size -= first.length;
      this.dropped += first.length;
    }
  }

  text(): string {
    const all = Buffer.concat(this.chunks);
    return all.subarray(Math.max(0, all.length - this.limit)).toString('utf8');
  }
}

/** The last `count` non-blank lines of a text, each cut to `width` characters. */
export function lastLines(text: string, count = 8, width = 300): string[] {
  const lines = text.split(/\r?\n/).filter((l) => l.trim() !== '');
  return lines.slice(-count).map((l) => (l.length > width ? `${l.slice(0, width)}…` : l));
}

/** `; last lines of stderr: "a" / "b"` for a one-line message, or '' when there is nothing to show. */
export function tailNote(stderr: string, stdout: string): string {
  const err = lastLines(stderr);
  if (err.length) return `; last lines of stderr: ${err.map((l) => JSON.stringify(l)).join(' / ')}`;
  const out = lastLines(stdout, 4);
  if (out.length) return `; stderr was empty, last lines of stdout: ${out.map((l) => JSON.stringify(l)).join(' / ')}`;
  return '; the solver printed nothing';
}
