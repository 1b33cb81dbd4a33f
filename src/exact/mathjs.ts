/** mathjs as rungs uses it: the same package and version, loaded from its one-file build (lib/browser/math.js, which
 *  the package exports for this use) instead of its 1,262 ES modules. Node resolves, reads and links each of those
 *  separately, which took most of the time of a small `rungs run`; the one file loads several times faster
 *  (test/bench/startup.bench.ts). Every value import of mathjs in src/ goes through here, so one mathjs instance
 *  serves the library; test/package/mathjs-build.test.ts checks that both builds parse, simplify and differentiate
 *  alike. Types still come from 'mathjs' itself. */
import { createRequire } from 'node:module';
import type * as MathJs from 'mathjs';

const math = createRequire(import.meta.url)('mathjs/lib/browser/math.js') as typeof MathJs;

export const { parse, simplify, simplifyConstant, simplifyCore, derivative } = math;
export const { ConstantNode, FunctionNode, OperatorNode, SymbolNode } = math;
/** The version of the loaded build (the same package as the module build's, test/package/mathjs-build.test.ts). */
export const { version } = math;
