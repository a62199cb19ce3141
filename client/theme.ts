// Fluxwright look: dark ink on warm paper, one copper accent (the colour of a bonded
// sample-holder), hairline rules instead of shadows. Numbers with units use the mono face.
export const colors = {
  paper: '#F3F0E8',
  sheet: '#FBFAF6',
  ink: '#1B2430',
  inkSoft: '#4A5563',
  inkFaint: '#7A8391',
  rule: '#D8D2C4',
  ruleStrong: '#B9B1A0',
  accent: '#B4532A',
  accentInk: '#FFFFFF',
  accentWash: '#F4E3D9',
  danger: '#9E2B25',
  dangerWash: '#F6DEDB',
  ok: '#2F6B4F',
  okWash: '#DDEBE2',
  pending: '#8A6A12',
  pendingWash: '#F3EACB',
} as const;

export const fonts = {
  sans: 'IBMPlexSans_400Regular',
  sansMedium: 'IBMPlexSans_500Medium',
  sansSemiBold: 'IBMPlexSans_600SemiBold',
  mono: 'IBMPlexMono_400Regular',
  monoMedium: 'IBMPlexMono_500Medium',
} as const;

export const space = { xs: 4, sm: 8, md: 12, lg: 16, xl: 24, xxl: 32 } as const;
export const radius = { sm: 4, md: 8, lg: 12 } as const;

/** Width at which the shell switches from bottom tabs to a left rail with two panes. */
export const WIDE_BREAKPOINT = 768;
