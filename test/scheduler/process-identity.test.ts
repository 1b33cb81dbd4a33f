import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import {
  PID_FILE, processIdentity, readProcessIdentity, stillRunning, writeProcessIdentity,
} from '../../src/scheduler/process-identity.ts';

// A local job is found again by its pid only while that pid still names the job's process: the start time since boot
// (/proc/<pid>/stat field 22) and the boot id tell a reused pid apart (Linux proc(5)). Without /proc only the pid
// can be checked, so these tests need Linux.
const dir = mkdtempSync(join(tmpdir(), 'rungs-pid-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe.skipIf(!existsSync('/proc/self/stat'))('the process of a local job', () => {
  it('is this very process while it runs, and not once its start time or boot differ (a reused pid)', () => {
    const me = processIdentity(process.pid);
    expect(me.start).toMatch(/^\d+$/);
    expect(me.boot).toMatch(/^[0-9a-f-]{36}$/);
    expect(stillRunning(me)).toBe(true);
    expect(stillRunning({ ...me, start: String(Number(me.start) + 1) })).toBe(false);
    expect(stillRunning({ ...me, boot: '00000000-0000-0000-0000-000000000000' })).toBe(false);
  });

  it('has ended once its process exits', async () => {
    const child = spawn('sh', ['-c', 'exit 0'], { stdio: 'ignore' });
    const id = processIdentity(child.pid!);
    await new Promise((r) => child.on('exit', r));
    // Reaped by Node on exit; should the pid already name another process, its start time differs.
    expect(stillRunning(id)).toBe(false);
  });

  it('is read back from job.pid as written; a missing or foreign file names none', () => {
    const me = processIdentity(process.pid);
    writeProcessIdentity(dir, me);
    expect(readProcessIdentity(dir)).toEqual(me);
    const other = mkdtempSync(join(dir, 'none-'));
    expect(readProcessIdentity(other)).toBeNull();
    writeFileSync(join(other, PID_FILE), '{"pid": "twelve"}\n');
    expect(readProcessIdentity(other)).toBeNull();
  });
});
