/** Sumpwise design tokens: a palette of our own (sump-steel blues, amber and oxide for levels), a type
 * scale on a shipped variable font, and large touch targets for gloved hands. */
/** @type {import('tailwindcss').Config} */
module.exports = {
  content: ['./src/**/*.{astro,html,ts,tsx,md}'],
  theme: {
    extend: {
      colors: {
        ink: { DEFAULT: '#16202a', soft: '#3a4a5a', faint: '#56636f' },
        paper: { DEFAULT: '#f7f5f0', raised: '#ffffff', sunk: '#ece8df' },
        steel: {
          50: '#eef4f8',
          100: '#d6e4ee',
          300: '#8fb0c6',
          500: '#3d6f91',
          600: '#2c5a7a',
          700: '#1f4560',
          900: '#0f2536',
        },
        level: {
          steady: '#2f6b3a',
          'steady-bg': '#e3f0e3',
          watch: '#8a5a00',
          'watch-bg': '#fbefd2',
          act: '#a12a1c',
          'act-bg': '#f8e0dc',
        },
        // Safety cautions only: an indigo of its own, so a caution never reads as a watch level.
        safety: { DEFAULT: '#463c8c', bg: '#eeecf8' },
        line: '#d4cec2',
      },
      fontFamily: {
        sans: ['"Atkinson Hyperlegible Next Variable"', 'system-ui', 'sans-serif'],
        mono: ['"JetBrains Mono Variable"', 'ui-monospace', 'monospace'],
      },
      fontSize: {
        xs: ['0.8125rem', '1.15rem'],
        sm: ['0.9375rem', '1.35rem'],
        base: ['1.0625rem', '1.6rem'],
        lg: ['1.25rem', '1.75rem'],
        xl: ['1.5rem', '2rem'],
        '2xl': ['1.875rem', '2.3rem'],
        '3xl': ['2.375rem', '2.7rem'],
      },
      spacing: { tap: '3rem' },
      minHeight: { tap: '3rem' },
      minWidth: { tap: '3rem' },
      borderRadius: { card: '0.625rem' },
      boxShadow: { card: '0 1px 0 rgba(22,32,42,0.06), 0 1px 3px rgba(22,32,42,0.08)' },
    },
  },
  plugins: [],
};
