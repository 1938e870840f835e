import { defineConfig } from 'vitest/config'

// The React Router plugin stays out of tests: they call modules, loaders and the built server directly.
export default defineConfig({
  resolve: { tsconfigPaths: true },
  test: {
    include: ['app/**/*.test.ts', 'tests/**/*.test.ts'],
    environment: 'node',
    globalSetup: ['tests/setup/global-setup.ts'],
    testTimeout: 30_000,
    hookTimeout: 180_000,
    fileParallelism: true,
    maxWorkers: 2,
  },
})
