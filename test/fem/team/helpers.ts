// Helpers of the tests of the cell team and of the bit-for-bit checks of its results.
import { afterAll, beforeAll } from 'vitest';
import { cellTeam, setTeamThreads, setWorkersFirst, teamThreads } from '../../../src/fem/team/team.ts';

/** Entries whose bits differ (Object.is tells 0 from −0), or −1 for a length mismatch: one assertion per array. */
export function bitDifferences(a: Float64Array, b: Float64Array): number {
  if (a.length !== b.length) return -1;
  let bad = 0;
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) bad++;
  return bad;
}

/** For the tests of a describe block: a team of two threads whose worker is loaded, and jobs that wait until the worker
 *  has claimed its part (setWorkersFirst), so that the worker surely takes part whatever the machine's speed; the
 *  process's own settings are restored after. */
export function useWorkerTeam(): void {
  const before = teamThreads();
  beforeAll(() => {
    setTeamThreads(2);
    setWorkersFirst(true);
    cellTeam().warm();
  });
  afterAll(() => { setWorkersFirst(false); setTeamThreads(before); });
}
