/**
 * Parallax design tokens. Colours are named for what they mean, never for their hue:
 * the two tracks (hardware, classical) are a colour-blind-safe orange/blue pair and always
 * travel with a shape (hardware = filled diamond, classical = hollow circle); an exact
 * reference is a firm ink line, a consensus a soft violet band, a disputed target an open mark.
 */
import type { Config } from 'tailwindcss';

export default {
  content: ['./index.html', './src/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        ink: { DEFAULT: '#1b2130', soft: '#4b5466', faint: '#646c7d' },
        paper: { DEFAULT: '#faf9f6', raised: '#ffffff', sunk: '#f1efe9' },
        rule: { DEFAULT: '#dedad1', strong: '#c3bdb0' },
        hardware: { DEFAULT: '#c25a12', soft: '#fbeadc', ink: '#8a3d08' },
        classical: { DEFAULT: '#2766a3', soft: '#e2edf7', ink: '#1a4a78' },
        exact: { DEFAULT: '#111621', soft: '#e6e7ea' },
        consensus: { DEFAULT: '#7667a8', soft: '#ebe8f4', ink: '#4f4380' },
        disputed: { DEFAULT: '#a1356e', soft: '#f6e4ed', ink: '#7a2251' },
        danger: { DEFAULT: '#b3261e', soft: '#fbe9e7', ink: '#8c1d17' },
        ok: { DEFAULT: '#2b7a4b', soft: '#e3f1e8', ink: '#1d5a36' },
        focus: '#3d63dd',
      },
      fontFamily: {
        sans: ['"Fira Sans"', 'system-ui', 'sans-serif'],
        mono: ['ui-monospace', 'SFMono-Regular', 'Menlo', 'Consolas', 'monospace'],
      },
      fontSize: {
        xs: ['0.75rem', { lineHeight: '1.125rem' }],
        sm: ['0.84375rem', { lineHeight: '1.375rem' }],
        base: ['0.9375rem', { lineHeight: '1.6rem' }],
        lg: ['1.0625rem', { lineHeight: '1.7rem' }],
        xl: ['1.25rem', { lineHeight: '1.875rem' }],
        '2xl': ['1.5625rem', { lineHeight: '2.125rem', letterSpacing: '-0.01em' }],
        '3xl': ['1.953rem', { lineHeight: '2.5rem', letterSpacing: '-0.015em' }],
      },
      maxWidth: { page: '72rem', prose: '40rem' },
      borderRadius: { DEFAULT: '0.25rem', card: '0.375rem' },
    },
  },
} satisfies Config;
