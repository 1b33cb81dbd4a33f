import { cData, cSelfTest } from './c.ts';
import { cppData } from './cpp.ts';
import { planFunction } from './cse.ts';
import { lower } from './expr.ts';
import { fortranData, fortranSelfTest } from './fortran.ts';
import { javaScriptData, javaScriptSelfTest } from './javascript.ts';
import { juliaData, juliaSelfTest } from './julia.ts';
import { checkLanguage, FILE_NAMES, type Language } from './languages.ts';
import { checkBundle } from './names.ts';
import type { Prepared } from './prepared.ts';
import { pythonData, pythonSelfTest } from './python.ts';
import { expectedValues, outputScales, samplePointsOf, type CodegenOptions } from './samples.ts';
import type { DataBundle } from './types.ts';

/** One generated file: its name (no folder) and its text. */
export interface GeneratedFile {
  name: string;
  text: string;
}

/** Check the bundle, lower and share each function's outputs, and compute the self-test values. */
export function prepareBundle(bundle: DataBundle, options: CodegenOptions = {}): Prepared {
  checkBundle(bundle);
  const points = samplePointsOf(bundle, options);
  const functions = bundle.functions.map((fn) => {
    const exprs = fn.outputs.map((node, k) => lower(node, fn.args, `study ${bundle.study}: ${fn.name} output ${k + 1} (${fn.outputNames[k]})`));
    const expected = expectedValues(bundle, fn.name, exprs, points);
    return { fn, exprs, plan: planFunction(exprs), expected, scales: outputScales(expected, exprs.length) };
  });
  return { bundle, functions, points };
}

/** The manufactured data of a study as code in `language`: the data file, then its self-test program. */
export function generateCode(bundle: DataBundle, language: Language, options: CodegenOptions = {}): GeneratedFile[] {
  const lang = checkLanguage(language, `study ${bundle?.study}`);
  return generatePrepared(prepareBundle(bundle, options), lang);
}

/** The same from a bundle prepared once (several languages share its shared-subexpression plan and self-test values). */
export function generatePrepared(p: Prepared, language: Language): GeneratedFile[] {
  const lang = checkLanguage(language, `study ${p.bundle.study}`);
  const { data, selfTest } = FILE_NAMES[lang];
  const text = (d: string, s: string): GeneratedFile[] => [{ name: data, text: d }, { name: selfTest, text: s }];
  switch (lang) {
    case 'c': return text(cData(p, data), cSelfTest(p, selfTest, data, false));
    case 'cpp': return text(cppData(p, data), cSelfTest(p, selfTest, data, true));
    case 'fortran': return text(fortranData(p, data), fortranSelfTest(p, selfTest, data));
    case 'python': return text(pythonData(p, data), pythonSelfTest(p, selfTest, data));
    case 'julia': return text(juliaData(p, data), juliaSelfTest(p, selfTest, data));
    case 'typescript': return text(javaScriptData(p, data, true), javaScriptSelfTest(p, selfTest, data, true));
    case 'javascript': return text(javaScriptData(p, data, false), javaScriptSelfTest(p, selfTest, data, false));
  }
}
