// The verdict per norm that theory predicts for a corpus study, with its reason (author, year, or "common practice,
// no source"). Each study file exports one as `predicted`; corpus.test.ts checks the norms whose predicted verdict
// is the one the study declares in `expect` (for a sound study: every norm it lists).
import type { NormName, StudyDeclaration } from 'rungs';

export type Verdict = NonNullable<StudyDeclaration['expect']>['verdict'];
export type Predicted = Partial<Record<NormName, { verdict: Verdict; why: string }>>;
