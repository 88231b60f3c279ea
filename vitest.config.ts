import { defineConfig } from 'vitest/config'
import { defineVitestProject } from '@nuxt/test-utils/config'
import { fileURLToPath } from 'node:url'

const shared = fileURLToPath(new URL('./shared', import.meta.url))

// Four projects: pure units, Nuxt-environment component tests, integration against the real
// PostgreSQL / broker / built server, and browser journeys in Debian's Chromium.
export default defineConfig({
  test: {
    projects: [
      {
        resolve: { alias: { '#shared': shared } },
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node', sequence: { groupOrder: 0 } },
      },
      await defineVitestProject({
        test: { name: 'nuxt', include: ['tests/nuxt/**/*.test.ts'], environment: 'nuxt', sequence: { groupOrder: 1 } },
      }),
      {
        resolve: { alias: { '#shared': shared } },
        test: {
          name: 'integration',
          sequence: { groupOrder: 2 },
          include: ['tests/integration/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/support/global-setup.ts'],
          testTimeout: 60_000,
          hookTimeout: 120_000,
          fileParallelism: true,
          maxWorkers: 2,
        },
      },
      {
        resolve: { alias: { '#shared': shared } },
        test: {
          name: 'browser',
          sequence: { groupOrder: 3 },
          include: ['tests/browser/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/support/global-setup.ts'],
          testTimeout: 120_000,
          hookTimeout: 180_000,
          fileParallelism: false,
        },
      },
    ],
  },
})
