import { resolve } from 'node:path';
import { loadStudy } from '../study/load.ts';
import type { StudyResult } from '../study/result.ts';
import type { StudyFacts } from './baseline.ts';
import { declarationHash } from './declaration-hash.ts';

/**
 * The hash of each study's declaration and its declared baseline tolerance. The study files were imported by the run
 * already; importing them again returns the same modules (the module cache), so this reads the very declarations
 * that ran. A study whose file cannot be read again has no facts, and its entry is compared without them.
 */
export async function studyFacts(results: readonly StudyResult[]): Promise<Record<string, StudyFacts>> {
  const facts: Record<string, StudyFacts> = {};
  for (const r of results) {
    try {
      const { declaration } = await loadStudy(resolve(r.file));
      facts[r.study] = { declaration: declarationHash(declaration), relTol: declaration.baselineTolerance };
    } catch {
      // The run loaded this file a moment ago; if it fails now, the comparison goes on without its hash.
    }
  }
  return facts;
}
