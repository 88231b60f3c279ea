import { fileURLToPath } from 'node:url'

// Nuxt configuration. srcDir is explicit so a stray app/ folder never moves the source root.
export default defineNuxtConfig({
  compatibilityDate: '2025-07-15',
  srcDir: '.',
  modules: ['@pinia/nuxt', '@nuxtjs/tailwindcss', 'nuxt-auth-utils'],
  css: ['@fontsource-variable/inter', '~/assets/css/main.css'],
  devtools: { enabled: false },
  telemetry: false,
  tailwindcss: { cssPath: false, viewer: false },
  app: {
    head: {
      title: 'Boothbeat',
      htmlAttrs: { lang: 'en' },
      meta: [{ name: 'viewport', content: 'width=device-width, initial-scale=1' }],
    },
  },
  runtimeConfig: {
    session: {
      name: 'boothbeat-session',
      maxAge: 60 * 60 * 12,
      cookie: { sameSite: 'lax', secure: false, httpOnly: true },
    },
  },
  nitro: {
    experimental: { tasks: false },
  },
  typescript: { strict: true },
  hooks: {
    // Our API error shape first; pages still get Nuxt's own error handling after it.
    'nitro:config'(config) {
      const ours = fileURLToPath(new URL('./server/error-handler.ts', import.meta.url))
      const rest = config.errorHandler ? (Array.isArray(config.errorHandler) ? config.errorHandler : [config.errorHandler]) : []
      config.errorHandler = [ours, ...rest.filter((h) => h !== ours)]
    },
  },
})
