import type { Config } from 'tailwindcss'
import defaultTheme from 'tailwindcss/defaultTheme'

// Boothbeat design tokens. Every text/background pair used by the components was checked for a
// WCAG 2.x contrast ratio of at least 4.5:1 (muted text: ink-500 or darker on white / ink-50; on
// dark screens ink-400 or lighter on ink-950; state text `DEFAULT` on `soft`, `bright` on ink-950).
// States are never told by colour alone: each badge carries an icon and a word as well.
const ink = {
  50: '#f4f7f7',
  100: '#e6eced',
  200: '#cdd8da',
  300: '#a9b9bc',
  400: '#7d9195',
  500: '#5c7074',
  600: '#475a5e',
  700: '#35464a',
  800: '#243336',
  900: '#162326',
  950: '#0c1618',
}

// One accent: a calm deep teal.
const brand = {
  50: '#eaf6f5',
  100: '#cdebe8',
  200: '#9fd6d1',
  300: '#67bab3',
  400: '#3a9c95',
  500: '#1f807a',
  600: '#146863',
  700: '#105450',
  800: '#0e4441',
  900: '#0c3836',
}

export default {
  content: ['./components/**/*.vue', './layouts/**/*.vue', './pages/**/*.vue', './app.vue', './composables/**/*.ts', './stores/**/*.ts'],
  theme: {
    extend: {
      colors: {
        ink,
        brand,
        // In spec / live.
        ok: { DEFAULT: '#1b6e45', soft: '#e3f4ea', line: '#8fcfa9', bright: '#5fd397' },
        // Needs a look: stale data, drifting, close to a limit.
        attention: { DEFAULT: '#8a4b00', soft: '#fdf0d9', line: '#e8b765', bright: '#f6b74a' },
        // Out of spec.
        fault: { DEFAULT: '#b0241b', soft: '#fbe7e5', line: '#eba29c', bright: '#ff8a80' },
        // No device / no data.
        offline: { DEFAULT: '#4f5a63', soft: '#eceff1', line: '#b7c0c7', bright: '#b4bec6' },
      },
      fontFamily: {
        sans: ['"Inter Variable"', 'Inter', ...defaultTheme.fontFamily.sans],
      },
      fontSize: {
        // Booth screen sizes, meant to be read from about 3 m (cap height ≳ 15 mm on a 24" screen).
        'screen-sm': ['2.25rem', { lineHeight: '2.75rem', fontWeight: '600' }],
        'screen-md': ['3.5rem', { lineHeight: '4rem', fontWeight: '600' }],
        'screen-lg': ['5rem', { lineHeight: '1.05', letterSpacing: '-0.01em', fontWeight: '700' }],
        'screen-xl': ['7.5rem', { lineHeight: '1', letterSpacing: '-0.02em', fontWeight: '700' }],
        'screen-2xl': ['11rem', { lineHeight: '1', letterSpacing: '-0.03em', fontWeight: '700' }],
      },
      spacing: {
        // Smallest touch target (WCAG 2.5.5 asks 44 × 44 CSS px) and a gloved-hand target.
        tap: '2.75rem',
        'tap-lg': '4rem',
        18: '4.5rem',
      },
      minHeight: { tap: '2.75rem', 'tap-lg': '4rem' },
      minWidth: { tap: '2.75rem', 'tap-lg': '4rem' },
      borderRadius: {
        control: '0.5rem',
        card: '0.875rem',
      },
      boxShadow: {
        card: '0 1px 2px rgb(12 22 24 / 0.06), 0 1px 3px rgb(12 22 24 / 0.08)',
        pop: '0 10px 30px rgb(12 22 24 / 0.18)',
      },
    },
  },
} satisfies Config
