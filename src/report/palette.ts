/**
 * Colour-blind-safe series colours: the Okabe–Ito palette (Okabe & Ito 2008, "Color Universal Design";
 * reproduced by Wong 2011, Nature Methods 8:441, "Points of view: Color blindness"). Yellow (#F0E442) is left out
 * because it is too light for thin lines on white.
 */
export const OKABE_ITO = {
  blue: '#0072B2',
  vermillion: '#D55E00',
  bluishGreen: '#009E73',
  reddishPurple: '#CC79A7',
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  black: '#000000',
} as const;

export const SERIES_COLORS: readonly string[] = [
  OKABE_ITO.blue,
  OKABE_ITO.vermillion,
  OKABE_ITO.bluishGreen,
  OKABE_ITO.reddishPurple,
  OKABE_ITO.orange,
  OKABE_ITO.skyBlue,
  OKABE_ITO.black,
];

/** Marker shapes, one per series, so that series differ by shape as well as colour. */
export const MARKER_SHAPES = ['circle', 'square', 'triangle', 'diamond', 'triangle-down', 'cross'] as const;
export type MarkerShape = (typeof MARKER_SHAPES)[number];

export function seriesStyle(index: number): { color: string; shape: MarkerShape } {
  return { color: SERIES_COLORS[index % SERIES_COLORS.length], shape: MARKER_SHAPES[index % MARKER_SHAPES.length] };
}
