// `rungs run --watch`: run the studies, then again whenever a study file or a file its external command names changes.
// Every run is a fresh `rungs run` process (the same arguments without --watch): a study file imported once stays
// cached in a process, and a fresh process also starts each run with nothing left over from the last. That process
// writes the files it depends on to the file named by RUNGS_WATCH_LIST (watchedFiles below); this one watches them
// with node:fs.watch and starts the next run once changes have settled for DEBOUNCE_MS.
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync, watch, type FSWatcher } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, dirname, isAbsolute, join, relative, resolve } from 'node:path';
import { findStudyFiles, type LoadedStudy } from '../study/load.ts';
import { splitCommandWords } from '../external/words.ts';

/** Environment variable through which a run started by --watch is told where to write the files it depends on. */
export const WATCH_LIST_ENV = 'RUNGS_WATCH_LIST';

/** Changes closer together than this are one change (an editor writes a file in several steps). */
export const DEBOUNCE_MS = 300;

/** The files a study's result depends on beyond rungs itself: the study file, and for an external code every word of
 *  its command and preflight that names an existing file (after ./ and ../ words were resolved against the study's
 *  folder when it was loaded; other relative words against the solver's working folder). Words with placeholders
 *  ({n}, {out}, …) name per-level files and are left out. */
export function watchedFiles(studies: readonly LoadedStudy[]): string[] {
  const out = new Set<string>();
  for (const { file, declaration } of studies) {
    out.add(resolve(file));
    const d = declaration.discretization;
    if (d.kind !== 'external') continue;
    const base = d.cwd ? resolve(d.cwd) : process.cwd();
    for (const cmd of [d.command, d.preflight]) {
      if (cmd === undefined) continue;
      let words: string[];
      try { words = typeof cmd === 'string' ? splitCommandWords(cmd) : cmd; } catch { continue; }
      for (const w of words) {
        if (w.includes('{') || w.startsWith('-')) continue;
        const p = isAbsolute(w) ? w : resolve(base, w);
        try { if (statSync(p).isFile()) out.add(p); } catch { /* not a file */ }
      }
    }
  }
  return [...out].sort();
}

export interface WatchOptions {
  /** The arguments of `rungs run` after "run", --watch among them (it is dropped for each run). */
  args: string[];
  /** Study files or folders given (their study files are watched even when they failed to load). */
  paths: string[];
  quiet?: boolean;
}

/** Runs until SIGINT or SIGTERM; returns the exit status then (130 / 143). */
export async function watchRuns(o: WatchOptions): Promise<number> {
  const say = (line: string) => { if (!o.quiet) process.stderr.write(line + '\n'); };
  const tmp = mkdtempSync(join(tmpdir(), 'rungs-watch-'));
  const listFile = join(tmp, 'files.json');
  const args = o.args.filter((a) => a !== '--watch');
  let child: ChildProcess | null = null;
  let pending = false;
  let timer: NodeJS.Timeout | null = null;
  let watchers: FSWatcher[] = [];
  let stopSignal: NodeJS.Signals | null = null;
  let finish!: (status: number) => void;
  const finished = new Promise<number>((r) => { finish = r; });

  const runOnce = (): void => {
    pending = false;
    rmSync(listFile, { force: true });
    child = spawn(process.execPath, [...process.execArgv, process.argv[1]!, 'run', ...args], {
      stdio: 'inherit', env: { ...process.env, [WATCH_LIST_ENV]: listFile },
    });
    child.on('exit', (code, signal) => {
      child = null;
      if (stopSignal) { stop(); return; }
      say(`rungs: run ended (${signal ?? `exit ${code}`}); watching for changes (Ctrl-C to stop)`);
      rewatch();
      if (pending) runOnce();
    });
  };

  const changed = (file: string): void => {
    if (timer) clearTimeout(timer);
    timer = setTimeout(() => {
      timer = null;
      say(`rungs: ${relative(process.cwd(), file) || file} changed; running again`);
      if (child) pending = true; else runOnce();
    }, DEBOUNCE_MS);
  };

  /** Watches the folders of the files (a folder, not the file: editors often replace a file by renaming a new one
   *  onto it, which ends a watch on the file itself). */
  const rewatch = (): void => {
    // The new watchers are opened before the old ones close, so that no change falls between them.
    const old = watchers;
    watchers = [];
    let files: string[] = [];
    try { files = JSON.parse(readFileSync(listFile, 'utf8')) as string[]; } catch { /* the run ended before writing it */ }
    try { files.push(...findStudyFiles(o.paths)); } catch { /* reported by the run */ }
    const byDir = new Map<string, Set<string>>();
    for (const f of files) {
      const dir = dirname(f);
      if (!existsSync(dir)) continue;
      byDir.set(dir, (byDir.get(dir) ?? new Set()).add(basename(f)));
    }
    for (const [dir, names] of byDir) {
      try {
        watchers.push(watch(dir, (_event, name) => {
          if (name !== null && names.has(name.toString())) changed(join(dir, name.toString()));
        }));
      } catch { /* a folder that cannot be watched: its files are not */ }
    }
    for (const w of old) w.close();
  };

  const stop = (): void => {
    for (const w of watchers) w.close();
    if (timer) clearTimeout(timer);
    rmSync(tmp, { recursive: true, force: true });
    finish(stopSignal === 'SIGTERM' ? 143 : 130);
  };
  const onSignal = (signal: NodeJS.Signals): void => {
    if (stopSignal) return;
    stopSignal = signal;
    // A run in progress stops on the signal too and writes its reports first. Ctrl-C at a terminal reaches it already
    // (the terminal signals the whole process group); sent twice it would stop at once, without its reports.
    if (child) { if (!(signal === 'SIGINT' && process.stdin.isTTY)) child.kill(signal); } else stop();
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  // Watching starts before the first run (its study files; the files it names once it has said which), so that a
  // change made while a run is in progress starts the next one when it ends.
  rewatch();
  runOnce();
  const status = await finished;
  process.removeListener('SIGINT', onSignal);
  process.removeListener('SIGTERM', onSignal);
  return status;
}
