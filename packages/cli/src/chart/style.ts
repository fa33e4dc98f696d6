/**
 * The one visual style of twinfet's plots. Series are told apart by lightness, line pattern and
 * marker shape as well as by hue, so a grey-scale print keeps them distinct: light fills for
 * sampled data, a dark solid line for fitted or nominal curves, black dashed lines for limits.
 */

/** Fonts installed on the reader's machine only; nothing is fetched. */
export const FONT_FAMILY = "system-ui, -apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, 'Liberation Sans', 'DejaVu Sans', sans-serif";
/** Tick labels and legend text, px. */
export const FONT_SIZE = 12;
/** Axis labels, px. */
export const LABEL_SIZE = 13;
/** Chart titles, px. */
export const TITLE_SIZE = 15;

/** Text and axis ink. */
export const INK = '#1b1b1b';
/** Secondary text (subtitles, notes). */
export const MUTED = '#555555';
/** Axis lines and tick marks. */
export const FRAME = '#7a7a7a';
/** Dark outline of light markers. */
export const OUTLINE = '#3a3a3a';
/** Grid lines. */
export const GRID = '#e4e4e4';

/**
 * Colours by role; the comment gives each one's approximate CIE lightness L*, which is what a
 * grey-scale print keeps (0 black, 100 white).
 */
export const COLOR = {
  /** Sampled data drawn as fills (histogram bars, budget bars): light blue, L* 76. */
  fill: '#a7bfdb',
  /** Outline of those fills: mid blue, L* 52. */
  fillEdge: '#5b7fa8',
  /** The main series (points, nominal curve): dark blue, L* 33. */
  main: '#24507f',
  /** A fitted or reference curve beside the data: brick red, L* 43. */
  fit: '#b0402a',
  /** A second series of points: amber, L* 70 (drawn with a dark outline). */
  second: '#e0a030',
  /** Limits and targets: near black (L* 10), always dashed. */
  limit: '#1b1b1b',
  /** Wide percentile band: pale blue, L* 89. */
  bandWide: '#d5e2f0',
  /** Narrow band or a highlighted range: L* 82. */
  bandNarrow: '#b9cde4',
} as const;

/** Dash patterns by role. */
export const DASH = {
  /** A specification limit. */
  spec: '7 4',
  /** A target derived from the spec (a sigma or yield target). */
  target: '10 3 2 3',
  /** A textbook law drawn for comparison. */
  law: '2 3',
} as const;
