import { createDb } from '~/.server/db'

const path = process.env.DATABASE_PATH ?? 'data/ductkeeper.db'
createDb(path).$client.close()
console.log(`Migrated ${path}`)
