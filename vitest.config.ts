import { configDefaults, defineConfig } from 'vitest/config'

// The React Router plugin stays out of tests: they call modules, loaders and the built server directly.
// The stress scale has its own config (vitest.stress.config.ts, `npm run test:stress`), the long
// proof runs theirs (vitest.proof.config.ts, `npm run test:proof`).
export default defineConfig({
  resolve: { tsconfigPaths: true },
  test: {
    include: ['app/**/*.test.ts', 'tests/**/*.test.ts'],
    exclude: [...configDefaults.exclude, 'tests/stress/**', 'tests/proof/**'],
    environment: 'node',
    globalSetup: ['tests/setup/global-setup.ts'],
    setupFiles: ['tests/setup/console-guard.ts'],
    testTimeout: 30_000,
    hookTimeout: 180_000,
    fileParallelism: true,
    maxWorkers: 2,
  },
})
