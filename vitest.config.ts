/// <reference types="vitest/config" />
import { fileURLToPath, URL } from 'node:url'
import { defineConfig } from 'vitest/config'
import vue from '@vitejs/plugin-vue'

const alias = {
  '@': fileURLToPath(new URL('./src', import.meta.url)),
  '@shared': fileURLToPath(new URL('./shared', import.meta.url)),
}

// Three suites: pure unit tests (engine, schemas, components), API tests against the real
// PostgreSQL test database, and browser tests driving Debian's chromium against a served build.
export default defineConfig({
  plugins: [vue()],
  resolve: { alias },
  test: {
    projects: [
      { extends: true, test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node' } },
      {
        extends: true,
        test: {
          name: 'api', include: ['tests/api/**/*.test.ts'], environment: 'node',
          globalSetup: ['tests/support/global-setup.ts'], fileParallelism: false, testTimeout: 20000, hookTimeout: 30000,
        },
      },
      {
        extends: true,
        test: {
          name: 'e2e', include: ['tests/e2e/**/*.test.ts'], environment: 'node',
          globalSetup: ['tests/support/global-setup.ts'], fileParallelism: false, testTimeout: 60000, hookTimeout: 60000,
        },
      },
    ],
  },
})
