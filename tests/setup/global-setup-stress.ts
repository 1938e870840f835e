import { existsSync } from 'node:fs'
import { prebuildDatabases } from './prebuilt-db'

// As global-setup.ts, for the stress scale alone; the seeded file is kept between runs while its
// inputs are unchanged, which saves the longest step of a repeated stress run.
export default function setup() {
  if (!existsSync('build/server/index.js')) throw new Error('No build found: run `npm run test:stress`, which builds first.')
  prebuildDatabases(['stress'])
}
