import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import Tinypool from 'tinypool';
import { RungsInputError, RungsNumericalError } from '../errors.ts';
import type { LevelResult } from '../study/result.ts';
import type { LevelReply, LevelTask } from './worker.ts';

/** Default number of parallel jobs: the cores this process may use. */
export function defaultJobs(): number {
  return Math.max(1, availableParallelism());
}

export interface LevelPool {
  run(task: LevelTask): Promise<LevelResult>;
  close(): Promise<void>;
}

/** A pool of worker threads (tinypool) that run levels. Each worker registers tsx's loader itself (worker-entry.mjs),
 *  since loader hooks of the parent thread do not reach worker threads on Node 20. */
export function makeLevelPool(jobs: number): LevelPool {
  const pool = new Tinypool({
    filename: fileURLToPath(new URL('./worker-entry.mjs', import.meta.url)),
    minThreads: 1,
    maxThreads: jobs,
    // Levels hold large meshes and matrices; let finished workers go idle rather than be recycled each task.
    isolateWorkers: false,
  });
  return {
    async run(task) {
      const reply = (await pool.run(task)) as LevelReply;
      if (reply.ok) return reply.level;
      const { kind, message, where } = reply.error;
      if (kind === 'input') throw new RungsInputError(message, where);
      if (kind === 'numerical') throw new RungsNumericalError(message, where);
      throw new Error(message);
    },
    close: () => pool.destroy(),
  };
}
