import { RungsInputError } from '../errors.ts';
import { LANGUAGES } from './languages.ts';
import { NORMAL_ARGUMENTS, type Argument, type DataBundle } from './types.ts';
import { TEMP_PREFIX } from './cse.ts';

const words = (text: string): string[] => text.trim().split(/\s+/);

/** Words a generated function may not be called, per language: keywords, and names the generated files use or
 *  include (math functions, which a module-level definition would hide in Fortran and Julia; the C library's; the
 *  self-tests' helpers). Compared in lower case, since Fortran ignores case. */
const RESERVED: Readonly<Record<string, readonly string[]>> = {
  C: words(`auto break case char const continue default do double else enum extern float for goto if inline int long
    register restrict return short signed sizeof static struct switch typedef union unsigned void volatile while bool
    true false nullptr alignas alignof static_assert thread_local typeof constexpr main printf fprintf puts exit abs
    fabs labs div free malloc calloc realloc rand srand abort system getenv atof atoi stdout stderr stdin y0 y1 yn j0 j1
    jn gamma lgamma tgamma erf erfc floor ceil round trunc fmod hypot atan2 exp2 log2 log1p expm1 fmin fmax fma ldexp
    frexp modf nan copysign signbit isnan isinf isfinite remainder nextafter rint lrint lround nearbyint scalbn logb
    ilogb fdim significand drem`),
  'C++': words(`and and_eq asm bitand bitor catch char8_t char16_t char32_t class compl concept consteval constinit
    const_cast co_await co_return co_yield decltype delete dynamic_cast explicit export friend mutable namespace new
    noexcept not not_eq operator or or_eq private protected public reinterpret_cast requires static_cast template this
    throw try typeid typename using virtual wchar_t xor xor_eq std array`),
  Fortran: words(`program module submodule end function subroutine real integer logical complex character double
    precision implicit none pure elemental impure recursive result intent in out inout use only contains procedure
    interface type class if then else elseif do while select case where forall call return stop exit cycle goto data
    parameter dimension allocatable pointer target save common equivalence external intrinsic optional value private
    public protected entry include format print read write open close block associate critical sync concurrent import
    abstract enum enumerator bind kind len iso_fortran_env real64 int32 max min huge tiny epsilon merge size shape
    reshape sum product any all transfer error`),
  Python: words(`false none true and as assert async await break class continue def del elif else except finally for
    from global if import in is lambda nonlocal not or pass raise return try while with yield np numpy sys float print
    len range zip tuple`),
  Julia: words(`baremodule begin break catch const continue do else elseif end export false finally for function global
    if import let local macro module quote return struct true try using while abstract mutable primitive in isa where
    outer println exit include length float64 nan inf`),
  'TypeScript/JavaScript': words(`break case catch class const continue debugger default delete do else enum export
    extends false finally for function if import in instanceof new null return super switch this throw true try typeof
    var void while with yield let static implements interface package private protected public await arguments eval
    math process console undefined infinity`),
  'every language (math functions)': words(`sin cos tan sec csc cot asin acos atan acot asec acsc sinh cosh tanh sech
    csch coth asinh acosh atanh acoth asech acsch exp log log10 sqrt cbrt abs sign pow arcsin arccos arctan arcsinh
    arccosh arctanh power pi e`),
  'the generated code (argument, output and temporary names)': words(`x y z t nx ny nz out res`),
};

const RESERVED_BY = new Map<string, string[]>();
for (const [language, list] of Object.entries(RESERVED)) {
  for (const w of list) RESERVED_BY.set(w, [...(RESERVED_BY.get(w) ?? []), language]);
}

/** Fortran's limit on names; C, Python, Julia and JavaScript take any length. */
const MAX_NAME = 63;
const IDENTIFIER = /^[A-Za-z][A-Za-z0-9_]*$/;
const TEMP = new RegExp(`^${TEMP_PREFIX}[0-9]+$`, 'i');

const VALID_NAME =
  `valid: a letter, then letters, digits or underscores (at most ${MAX_NAME} characters), unique ignoring case, ` +
  `not starting with "rungs_", not a temporary name (${TEMP_PREFIX}0, ${TEMP_PREFIX}1, …) and not a reserved word of ` +
  `${LANGUAGES.join(', ')}`;

/** Why `name` cannot name a generated function in every language, or undefined when it can. */
export function nameProblem(name: string): string | undefined {
  if (typeof name !== 'string' || !IDENTIFIER.test(name)) return 'is not an identifier in every target language';
  if (name.length > MAX_NAME) return `is longer than ${MAX_NAME} characters (Fortran's limit)`;
  const lower = name.toLowerCase();
  if (lower.startsWith('rungs_')) return 'starts with "rungs_", which the generated helpers use';
  if (TEMP.test(name)) return 'has the form of a generated temporary';
  const by = RESERVED_BY.get(lower);
  if (by) return `is reserved in ${by.join('; ')}`;
  return undefined;
}

const ARGUMENT_ORDER: readonly Argument[] = NORMAL_ARGUMENTS;

/** Refuse a bundle whose functions cannot be generated in every language: bad or repeated names, unknown or
 *  repeated arguments, outputs and names of different counts. */
export function checkBundle(bundle: DataBundle): void {
  const where = `study ${bundle.study}`;
  const seen = new Map<string, string>();
  for (const f of bundle.functions) {
    const problem = nameProblem(f.name);
    if (problem) throw new RungsInputError(`${where}: function name "${f.name}" ${problem}; ${VALID_NAME}`, where);
    const other = seen.get(f.name.toLowerCase());
    if (other !== undefined) {
      throw new RungsInputError(`${where}: function names "${other}" and "${f.name}" are the same ignoring case ` +
        `(Fortran ignores case); ${VALID_NAME}`, where);
    }
    seen.set(f.name.toLowerCase(), f.name);
    const order = f.args.map((a) => ARGUMENT_ORDER.indexOf(a));
    if (order.some((k, i) => k < 0 || (i > 0 && k <= order[i - 1]))) {
      throw new RungsInputError(`${where}: function ${f.name} has arguments (${f.args.join(', ')}); valid: distinct ` +
        `arguments from ${ARGUMENT_ORDER.join(', ')}, in that order`, where);
    }
    if (f.outputs.length === 0 || f.outputs.length !== f.outputNames.length) {
      throw new RungsInputError(`${where}: function ${f.name} has ${f.outputs.length} output(s) and ` +
        `${f.outputNames.length} output name(s); valid: at least one output, one name each`, where);
    }
  }
}
