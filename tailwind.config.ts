import type { Config } from 'tailwindcss';

/**
 * Kerfwise's visual identity (DEVELOPERS.md, "Look"): basalt greys for surfaces and text, ember
 * for the one action that matters on a screen, with signal colours kept apart from the accent.
 * Sizes start larger than usual: the app is read on tablets in dim, dirty places.
 */
export default {
  content: ['./index.html', './src/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        basalt: {
          50: '#f4f5f3',
          100: '#e6e8e4',
          200: '#cdd1ca',
          300: '#aab0a5',
          400: '#838b7e',
          500: '#656d60',
          600: '#4f564b',
          700: '#3e443b',
          800: '#2c302a',
          900: '#1d201c',
          950: '#121411',
        },
        ember: {
          50: '#fff5ec',
          100: '#ffe6cf',
          200: '#ffc99b',
          300: '#fca35e',
          400: '#f58330',
          500: '#e0660f',
          600: '#bd4f09',
          700: '#973d0c',
          800: '#7a3311',
          900: '#642c12',
        },
        moss: { 100: '#e3f0d9', 500: '#4d7f2c', 700: '#355a1d' },
        alarm: { 100: '#fbe0dc', 500: '#c0321f', 700: '#8e2214' },
        caution: { 100: '#fff3c4', 500: '#b88a00', 700: '#7a5b00' },
      },
      fontFamily: {
        sans: ['Barlow', 'system-ui', 'sans-serif'],
      },
      fontSize: {
        caption: ['0.875rem', { lineHeight: '1.25rem' }],
        body: ['1.0625rem', { lineHeight: '1.6rem' }],
        lead: ['1.25rem', { lineHeight: '1.75rem' }],
        title: ['1.625rem', { lineHeight: '2rem', fontWeight: '600' }],
        display: ['2.25rem', { lineHeight: '2.5rem', fontWeight: '700' }],
      },
      minHeight: { touch: '2.75rem' },
      minWidth: { touch: '2.75rem' },
    },
  },
} satisfies Config;
