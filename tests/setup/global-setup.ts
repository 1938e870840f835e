import { existsSync } from 'node:fs'
import { prebuildDatabases } from './prebuilt-db'

// The server and browser tests run against the production build, made by tests/run.sh first.
// The small and demo databases are seeded once here; each test file then copies the file it needs.
export default function setup() {
  if (!existsSync('build/server/index.js')) throw new Error('No build found: run `npm test`, which builds first.')
  prebuildDatabases(['small', 'demo'])
}
