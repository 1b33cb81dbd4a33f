/**
 * Fully symmetric triangle rules as orbits of barycentric coordinates, weights normalised to sum 1
 * (multiply by the area 1/2). Orbit kinds: centroid (1/3,1/3,1/3); s21: (a, a, 1-2a), 3 points;
 * s111: (a, b, 1-a-b), 6 points. Every rule here has positive weights and interior points.
 * Digits are the 15 printed decimals of Dunavant (1985), typed from memory; degrees 1, 2 and 5 use
 * closed forms. The printed tables are refined to full precision before use (polish-symmetric.ts).
 */
export interface SymmetricTriangleTable {
  degree: number;
  source: string;
  /** Values are exact closed forms (not refined further); otherwise 15 printed decimals. */
  closedForm?: boolean;
  centroid?: number;
  s21: ReadonlyArray<readonly [a: number, w: number]>;
  s111: ReadonlyArray<readonly [a: number, b: number, w: number]>;
}

const SQRT15 = Math.sqrt(15);

export const SYMMETRIC_TRIANGLE_TABLES: readonly SymmetricTriangleTable[] = [
  // centroid rule (Dunavant 1985, degree 1)
  { degree: 1, source: 'centroid rule (Dunavant 1985, degree 1)', closedForm: true, centroid: 1, s21: [], s111: [] },
  // interior points (2/3, 1/6, 1/6) (Dunavant 1985, degree 2, closed form)
  { degree: 2, source: 'Dunavant 1985, degree 2, 3 points', closedForm: true, s21: [[1 / 6, 1 / 3]], s111: [] },
  {
    degree: 4,
    source: 'Dunavant 1985, degree 4, 6 points',
    s21: [
      [0.445948490915965, 0.223381589678011],
      [0.091576213509771, 0.109951743655322],
    ],
    s111: [],
  },
  // Radon (1948) 7-point rule in closed form, also Dunavant 1985 degree 5
  {
    degree: 5,
    source: 'Radon 1948 / Dunavant 1985, degree 5, 7 points',
    closedForm: true,
    centroid: 9 / 40,
    s21: [
      [(6 + SQRT15) / 21, (155 + SQRT15) / 1200],
      [(6 - SQRT15) / 21, (155 - SQRT15) / 1200],
    ],
    s111: [],
  },
  {
    degree: 6,
    source: 'Dunavant 1985, degree 6, 12 points',
    s21: [
      [0.249286745170910, 0.116786275726379],
      [0.063089014491502, 0.050844906370207],
    ],
    s111: [[0.053145049844817, 0.310352451033784, 0.082851075618374]],
  },
  {
    degree: 8,
    source: 'Dunavant 1985, degree 8, 16 points',
    centroid: 0.144315607677787,
    s21: [
      [0.459292588292723, 0.095091634267285],
      [0.170569307751760, 0.103217370534718],
      [0.050547228317031, 0.032458497623198],
    ],
    s111: [[0.008394777409958, 0.263112829634638, 0.027230314174435]],
  },
  {
    degree: 9,
    source: 'Dunavant 1985, degree 9, 19 points',
    centroid: 0.097135796282799,
    s21: [
      [0.489682519198738, 0.031334700227139],
      [0.437089591492937, 0.077827541004774],
      [0.188203535619033, 0.079647738927210],
      [0.044729513394453, 0.025577675658698],
    ],
    s111: [[0.036838412054736, 0.221962989160766, 0.043283539377289]],
  },
  {
    degree: 10,
    source: 'Dunavant 1985, degree 10, 25 points',
    centroid: 0.090817990382754,
    s21: [
      [0.485577633383657, 0.036725957756467],
      [0.109481575485037, 0.045321059435528],
    ],
    s111: [
      [0.141707219414880, 0.307939838764121, 0.072757916845420],
      [0.025003534762686, 0.246672560639903, 0.028327242531057],
      [0.009540815400299, 0.066803251012200, 0.009421666963733],
    ],
  },
  {
    degree: 12,
    source: 'Dunavant 1985, degree 12, 33 points',
    s21: [
      [0.488217389773805, 0.025731066440455],
      [0.439724392294460, 0.043692544538038],
      [0.271210385012116, 0.062858224217885],
      [0.127576145541586, 0.034796112930709],
      [0.021317350453210, 0.006166261051559],
    ],
    s111: [
      [0.115343494534698, 0.275713269685514, 0.040371557766381],
      [0.022838332222257, 0.281325580989940, 0.022356773202303],
      [0.025734050548330, 0.116251915907597, 0.017316231108659],
    ],
  },
];
