/**
 * Trimout's design tokens: our own palette, type scale and spacing, in one place.
 * Palette: deep spruce for structure, warm paper for ground, signal ochre for attention.
 */
export const colors = {
  ink: '#1A1F1C',
  inkMuted: '#56605A',
  /** Quiet text (a zero count, a placeholder): still 4.5:1 on paper, the lowest contrast text may have (WCAG 1.4.3). */
  inkFaint: '#646C67',
  paper: '#F4F1EA',
  surface: '#FFFFFF',
  line: '#DAD5C9',
  spruce: '#1E3B34',
  spruceSoft: '#DCE7E2',
  ochre: '#E0A23B',
  ochreSoft: '#F7E7C8',
  danger: '#A4341F',
  dangerSoft: '#F5DCD5',
  good: '#2F6B3F',
  goodSoft: '#DCEBDD',
  focus: '#2B63A8',
} as const;

/** Severity and status colours are paired with a label or shape, never colour alone. */
export const severityColors = {
  critical: { fg: '#FFFFFF', bg: '#8E2A17' },
  major: { fg: '#3A2600', bg: '#E9B25A' },
  minor: { fg: '#1E3B34', bg: '#CFDDD7' },
} as const;

export const fonts = {
  regular: 'AtkinsonHyperlegible_400Regular',
  bold: 'AtkinsonHyperlegible_700Bold',
} as const;

export const type = {
  display: { fontFamily: fonts.bold, fontSize: 28, lineHeight: 34 },
  title: { fontFamily: fonts.bold, fontSize: 21, lineHeight: 27 },
  heading: { fontFamily: fonts.bold, fontSize: 17, lineHeight: 23 },
  body: { fontFamily: fonts.regular, fontSize: 16, lineHeight: 23 },
  small: { fontFamily: fonts.regular, fontSize: 14, lineHeight: 19 },
  label: { fontFamily: fonts.bold, fontSize: 14, lineHeight: 19 },
} as const;

export const space = { xs: 4, sm: 8, md: 12, lg: 16, xl: 24, xxl: 36 } as const;
export const radius = { sm: 6, md: 10, lg: 16 } as const;

/** Reading width on a wide screen: content never stretches past this. */
export const contentMaxWidth = 980;
/** Minimum touch target (WCAG 2.2 target size, enhanced). */
export const touchTarget = 44;

/**
 * A choice shown as a rounded chip (filters, jump bar, multi-choices): one look and one touch
 * size wherever a chip is tapped. Screens add their own "on" colours.
 */
export const choiceChip = {
  minHeight: touchTarget,
  justifyContent: 'center',
  paddingHorizontal: space.md,
  borderRadius: radius.lg,
  borderWidth: 1.5,
  borderColor: colors.line,
  backgroundColor: colors.surface,
} as const;

/**
 * A text link standing alone (back links, "Plan of Level 3"): at least a touch target in both
 * directions. On the web a Link is an inline element, which takes no height: flex makes it a box.
 */
export const linkTarget = {
  alignSelf: 'flex-start',
  minHeight: touchTarget,
  minWidth: touchTarget,
  paddingVertical: space.sm,
  display: 'flex',
  alignItems: 'center',
} as const;
