import { existsSync } from 'node:fs'

// The server and browser tests run against the production build, made by tests/run.sh first.
export default function setup() {
  if (!existsSync('build/server/index.js')) throw new Error('No build found: run `npm test`, which builds first.')
}
