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
    databaseUrl: '',
    session: { name: 'boothbeat-session', cookie: { sameSite: 'lax' } },
  },
  nitro: {
    experimental: { tasks: false },
  },
  typescript: { strict: true },
})
