/**
 * Boardside's visual identity in one place: colours, spacing, type scale, tap sizes and the two
 * observation marks.
 *
 * Designed for cold, bright arenas read at arm's length (and dim ones in the evening): a pale
 * "ice" background, deep navy ink, large type. Every text colour below is paired with the
 * background it sits on and measured at 7:1 or more (WCAG AAA); borders and glyphs that are not
 * text reach at least 3:1. If you add a colour, measure it against its background first.
 */

export const colors = {
  /** Page background: a cool off-white that does not glare under arena lights. */
  background: '#F4F7F9',
  /** Cards, fields, panes. */
  surface: '#FFFFFF',
  /** A quieter surface for rails and selected rows. */
  surfaceSunken: '#E3EEF4',
  /** Body text: 15.9:1 on background, 17.2:1 on surface. */
  ink: '#0B1D2A',
  /** Secondary text: 7.5:1 on background, 8.2:1 on surface. */
  inkMuted: '#42525E',
  /** Brand "deep water" blue: primary buttons (white text 11.9:1), links, focus. */
  primary: '#0E3B52',
  onPrimary: '#FFFFFF',
  /** Field and card borders: 5.7:1 on white, enough to see an input's edge (needs 3:1). */
  border: '#5A6975',
  /** Hairline dividers where a border would be too loud (decorative only). */
  divider: '#C9D3DA',
  /** Focus ring drawn around the focused control. */
  focus: '#1F5FBF',
  /** Errors: 9.3:1 on white, 7.9:1 on errorSurface. */
  error: '#8A1C1C',
  errorSurface: '#FDE8E8',
  /** Information banners: 10.1:1. */
  info: '#0E3B52',
  infoSurface: '#E3EEF4',
  /** Confirmation banners: 8.6:1. */
  success: '#1A4D2E',
  successSurface: '#E3F4E8',
} as const;

/** 4-pt spacing scale; names instead of numbers so layouts read as intent. */
export const spacing = {
  xxs: 4,
  xs: 8,
  sm: 12,
  md: 16,
  lg: 24,
  xl: 32,
  xxl: 48,
} as const;

export const radius = {
  sm: 6,
  md: 10,
  lg: 16,
  pill: 999,
} as const;

/**
 * Font family names as registered with expo-font in app/_layout.tsx. Weights are separate families
 * because a custom font on web and native does not synthesise bold reliably.
 */
export const fonts = {
  regular: 'Atkinson-Regular',
  bold: 'Atkinson-Bold',
  /** Condensed figures for times, splits and speeds: more digits fit across a phone. */
  numbers: 'BarlowCondensed-SemiBold',
} as const;

/**
 * Type scale. Body starts at 18 px (not 16): the coach reads at arm's length, often in gloves
 * with cold eyes. Line heights are generous for scanning.
 */
export const type = {
  caption: { fontSize: 15, lineHeight: 22 },
  body: { fontSize: 18, lineHeight: 26 },
  bodyLarge: { fontSize: 20, lineHeight: 28 },
  title: { fontSize: 24, lineHeight: 30 },
  headline: { fontSize: 30, lineHeight: 36 },
  display: { fontSize: 40, lineHeight: 46 },
  /** The stopwatch's figures: the largest thing on their screen. */
  clock: { fontSize: 88, lineHeight: 92 },
} as const;

export type TypeVariant = keyof typeof type;

/** Minimum tap size (px). 48 is the floor; the board's tiles will be far larger. */
export const tapTarget = 48;

/** Width limits: forms stay narrow and readable; the wide layout caps its content. */
export const layout = {
  wideFrom: 1024,
  formMaxWidth: 480,
  contentMaxWidth: 1200,
  railWidth: 248,
} as const;

/**
 * The two observation marks. Each has a shape, a glyph, a word and a colour pair from a different
 * hue family (orange vs blue), so they stay apart for red-green colour blindness, in greyscale,
 * and for screen readers. Never show a mark by colour alone: always the shape and the word too.
 */
export const marks = {
  needsWork: {
    key: 'needs_work',
    word: 'Needs work',
    /** Upward triangle: "still to climb". */
    shape: 'triangle',
    glyph: '\u25B2',
    ink: '#7A2E00', // 7.9:1 on its surface
    surface: '#FFE6CC',
    /** Fill of the drawn shape (not text): 3.8:1 on its surface, 4.6:1 on white. */
    strong: '#C25400',
  },
  good: {
    key: 'good',
    word: 'Good',
    /** Filled circle with a tick: "fix seen". */
    shape: 'circle',
    glyph: '\u2714',
    ink: '#0A3A7A', // 9.2:1 on its surface
    surface: '#DCEBFF',
    strong: '#1F5FBF',
  },
} as const;

export type MarkKind = keyof typeof marks;

export const theme = { colors, spacing, radius, fonts, type, tapTarget, layout, marks } as const;
export type Theme = typeof theme;
