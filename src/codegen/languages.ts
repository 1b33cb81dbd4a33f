import { RungsInputError } from '../errors.ts';

/** The languages rungs writes manufactured data in: the one list, with the file names of each. */
export const LANGUAGES = ['c', 'cpp', 'fortran', 'python', 'julia', 'typescript', 'javascript'] as const;
export type Language = (typeof LANGUAGES)[number];

/** Name of the generated data file and of its self-test program, per language. */
export const FILE_NAMES: Readonly<Record<Language, { data: string; selfTest: string }>> = {
  c: { data: 'rungs_data.h', selfTest: 'rungs_data_selftest.c' },
  cpp: { data: 'rungs_data.hpp', selfTest: 'rungs_data_selftest.cpp' },
  fortran: { data: 'rungs_data.f90', selfTest: 'rungs_data_selftest.f90' },
  python: { data: 'rungs_data.py', selfTest: 'rungs_data_selftest.py' },
  julia: { data: 'rungs_data.jl', selfTest: 'rungs_data_selftest.jl' },
  typescript: { data: 'rungs_data.ts', selfTest: 'rungs_data_selftest.ts' },
  javascript: { data: 'rungs_data.mjs', selfTest: 'rungs_data_selftest.mjs' },
};

/** Narrow a user-given language name, refusing anything not offered. */
export function checkLanguage(language: unknown, where = 'codegen'): Language {
  if (typeof language === 'string' && (LANGUAGES as readonly string[]).includes(language)) return language as Language;
  const given = typeof language === 'string' ? `"${language}"` : String(language);
  throw new RungsInputError(`${where}: language ${given} is not offered; valid: ${LANGUAGES.join(', ')}`, where);
}
