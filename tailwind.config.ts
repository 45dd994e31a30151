import type { Config } from 'tailwindcss';

/**
 * Cellarwright's own palette: a warm off-white ground, near-black ink, copper for anything you
 * can act on, hop green for "ready", amber for "due", and red kept for safety and errors only.
 * Contrast (WCAG 2.x): ink on ground 15.5:1, ink-muted on ground 6.6:1, white on copper 4.9:1,
 * copper-strong on ground 6.3:1, hop-strong on hop-soft 6.2:1, due-strong on due-soft 6.0:1,
 * danger on surface 6.5:1. ink-faint (3.7:1) is for rules and icons, never for body text.
 */
export default {
  content: ['./index.html', './frontend/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        ground: { DEFAULT: '#f7f3ec', deep: '#efe8dc' },
        surface: '#fffdf9',
        line: { DEFAULT: '#e3dacb', strong: '#c9bca8' },
        ink: { DEFAULT: '#1d1b18', muted: '#5c564d', faint: '#8a8277' },
        copper: { DEFAULT: '#b0592a', strong: '#8f4520', soft: '#f4e4d7' },
        hop: { DEFAULT: '#6b7f3a', strong: '#4b5a26', soft: '#e6ebd6' },
        due: { DEFAULT: '#c2850f', strong: '#7a4f00', soft: '#f8ebcc' },
        danger: { DEFAULT: '#b42318', strong: '#8e1b12', soft: '#fbe5e1' },
      },
      fontFamily: {
        sans: ['"Roboto Flex"', 'system-ui', 'sans-serif'],
      },
    },
  },
} satisfies Config;
