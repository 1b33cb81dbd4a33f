import type { LevelResult } from '../study/result.ts';

/** Progress of a run: on a TTY one self-overwriting line with level, dofs, elapsed and an estimate of the time
 *  left (from the growth of cost per level seen so far); otherwise one plain line per finished level. */
export interface Progress {
  levelStart(study: string, index: number, total: number): void;
  levelDone(study: string, level: LevelResult, total: number): void;
  clear(): void;
}

export function makeProgress(stream: NodeJS.WriteStream, quiet: boolean): Progress {
  const tty = !!stream.isTTY && process.env.CI !== 'true' && process.env.CI !== '1';
  const t0 = performance.now();
  const times = new Map<string, number[]>();
  let shown = false;
  const elapsed = () => ((performance.now() - t0) / 1e3).toFixed(1);
  return {
    levelStart(study, index, total) {
      if (quiet || !tty) return;
      const past = times.get(study) ?? [];
      const eta = estimateRemaining(past, index, total);
      stream.write(`\r\x1b[2K${study}: level ${index + 1} of ${total} running · ${elapsed()} s elapsed${eta !== null ? ` · about ${eta.toFixed(1)} s left` : ''}`);
      shown = true;
    },
    levelDone(study, level, total) {
      const past = times.get(study) ?? [];
      past.push(level.seconds.total);
      times.set(study, past);
      if (quiet) return;
      const line = `${study}: level ${level.index + 1} of ${total} done · ${level.dofs} dofs · ${level.seconds.total.toFixed(2)} s · ${elapsed()} s elapsed`;
      if (tty) { stream.write(`\r\x1b[2K${line}`); shown = true; }
      else stream.write(`${line}\n`);
    },
    clear() {
      if (tty && shown) stream.write('\r\x1b[2K');
      shown = false;
    },
  };
}

/** Time left for levels index..total-1, extrapolating the growth ratio of the last two finished levels. */
export function estimateRemaining(past: number[], index: number, total: number): number | null {
  if (past.length === 0) return null;
  const last = past[past.length - 1];
  const growth = past.length >= 2 && past[past.length - 2] > 0 ? Math.min(Math.max(last / past[past.length - 2], 1), 16) : 4;
  let sum = 0, t = last;
  for (let i = index; i < total; i++) { t *= growth; sum += t; }
  return sum;
}
