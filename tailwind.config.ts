import type { Config } from 'tailwindcss';

/**
 * Cristae's design tokens. The palette takes its cue from the inner membrane the product is named after:
 * a deep "matrix" green for structure, a warm copper accent, paper-toned surfaces. Result states are always
 * written in words; colour only supports them.
 */
export default {
  content: ['./index.html', './src/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        matrix: {
          50: '#eef6f4',
          100: '#d5e9e4',
          200: '#a9d2c8',
          300: '#74b3a5',
          400: '#468f80',
          500: '#2c7365',
          600: '#1f5c51',
          700: '#184a42',
          800: '#133a34',
          900: '#0e2a26',
        },
        copper: {
          50: '#fbf3ec',
          100: '#f4e0cd',
          300: '#dea277',
          500: '#b8682f',
          600: '#9a5424',
          700: '#7a421d',
        },
        paper: { DEFAULT: '#f7f5f0', raised: '#ffffff', sunk: '#eeebe3', line: '#dcd7cb' },
        ink: { DEFAULT: '#1e2522', soft: '#4a5550', faint: '#5f6964' },
        below: { DEFAULT: '#9b2c3a', bg: '#f9e9eb' },
        above: { DEFAULT: '#6b4aa0', bg: '#efe9f8' },
        within: { DEFAULT: '#2f6b3a', bg: '#e7f3e8' },
        caution: { DEFAULT: '#7a5a0c', bg: '#fbf4dc', line: '#e6cf84' },
      },
      fontFamily: {
        sans: ['"IBM Plex Sans"', 'system-ui', 'sans-serif'],
        mono: ['"IBM Plex Mono"', 'ui-monospace', 'monospace'],
      },
      fontSize: {
        xs: ['0.75rem', { lineHeight: '1.1rem' }],
        sm: ['0.84rem', { lineHeight: '1.25rem' }],
        base: ['0.95rem', { lineHeight: '1.5rem' }],
        lg: ['1.1rem', { lineHeight: '1.6rem' }],
        xl: ['1.35rem', { lineHeight: '1.8rem' }],
        '2xl': ['1.7rem', { lineHeight: '2.1rem' }],
      },
      spacing: { gutter: '1.5rem', rail: '15rem' },
      borderRadius: { card: '0.6rem' },
      boxShadow: { card: '0 1px 2px rgba(14, 42, 38, 0.06), 0 1px 8px rgba(14, 42, 38, 0.04)' },
    },
  },
} satisfies Config;
