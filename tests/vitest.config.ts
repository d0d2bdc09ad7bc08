import { fileURLToPath } from 'node:url'
import { defineConfig } from 'vitest/config'

const root = fileURLToPath(new URL('..', import.meta.url))

// Two projects: pure unit tests (shared/utils, audio engine) and server tests that
// build the app once per file with @nuxt/test-utils and talk to it over HTTP.
export default defineConfig({
  test: {
    root,
    projects: [
      {
        test: {
          name: 'unit',
          root,
          environment: 'node',
          include: ['tests/unit/**/*.test.ts'],
          testTimeout: 30_000,
        },
      },
      {
        test: {
          name: 'server',
          root,
          environment: 'node',
          include: ['tests/server/**/*.test.ts'],
          testTimeout: 120_000,
          hookTimeout: 300_000,
          fileParallelism: false,
        },
      },
    ],
  },
})
