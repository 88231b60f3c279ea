import type { Config } from 'tailwindcss'

export default {
  content: ['./components/**/*.vue', './layouts/**/*.vue', './pages/**/*.vue', './app.vue', './composables/**/*.ts'],
} satisfies Config
