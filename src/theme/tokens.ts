/** Spacing scale in px; screens use these names, never raw numbers. */
export const space = { xxs: 2, xs: 4, sm: 8, md: 12, lg: 16, xl: 24, xxl: 32, xxxl: 48 } as const;

/** Wide layout (sidebar + content, extra columns) from this width in px. */
export const WIDE_MIN_WIDTH = 1024;

export const radius = { sm: 6, md: 10, lg: 16, pill: 999 } as const;

// Two weights keep the download small; headings use the semibold face.
export const font = {
  regular: 'Inter_400Regular',
  semibold: 'Inter_600SemiBold',
  bold: 'Inter_600SemiBold',
} as const;

/** Type scale: size and line height in px. */
export const type = {
  caption: { fontSize: 12, lineHeight: 16 },
  small: { fontSize: 14, lineHeight: 20 },
  body: { fontSize: 16, lineHeight: 24 },
  title: { fontSize: 20, lineHeight: 28 },
  headline: { fontSize: 26, lineHeight: 32 },
  figure: { fontSize: 34, lineHeight: 40 },
} as const;

/** Text drawn inside charts (SVG): tick labels, and axis titles. */
export const chartText = { tick: 11, title: type.caption.fontSize } as const;

/** Every chart's drawing height (its width is its container's). */
export const chartHeight = 240;

/** Smallest touch target (WCAG 2.5.5 AAA size, also the common mobile guideline). */
export const touchTarget = 44;

/** Readable line length for text columns on wide screens. */
export const maxContentWidth = 1080;
export const sidebarWidth = 232;
