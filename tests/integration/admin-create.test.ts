import { spawnSync } from 'node:child_process'
import { afterAll, describe, expect, it } from 'vitest'
import { createDb } from '~/.server/db'
import { tempDbPath } from '#tests/setup/temp-db'

const file = tempDbPath()
afterAll(() => file.cleanup())

const run = (...args: string[]) => {
  const r = spawnSync('node_modules/.bin/tsx', ['scripts/admin-create.ts', ...args], { env: { ...process.env, DATABASE_PATH: file.path }, encoding: 'utf8' })
  return { code: r.status, out: r.stdout + r.stderr }
}

describe('npm run admin:create', () => {
  it('provisions the first administrator of an empty database, audited, and refuses a duplicate', () => {
    const made = run('--email', ' First.Admin@Example.TEST ', '--name', 'Rowan Ashdown')
    expect(made.out).toContain('Administrator Rowan Ashdown <first.admin@example.test> created')
    expect(made.code).toBe(0)
    const db = createDb(file.path)
    try {
      expect(db.$client.prepare('select email, name, role, active from users').all()).toEqual([{ email: 'first.admin@example.test', name: 'Rowan Ashdown', role: 'admin', active: 1 }])
      const audit = db.$client.prepare("select actor_id as actorId, action, after from audit_log where entity = 'user'").all() as { actorId: number | null; action: string; after: string }[]
      expect(audit).toHaveLength(1)
      expect(audit[0]).toMatchObject({ actorId: null, action: 'user.invite' })
      expect(JSON.parse(audit[0].after)).toMatchObject({ role: 'admin', via: 'shell' })

      const again = run('--email', 'first.admin@example.test', '--name', 'Someone Else')
      expect(again.code).toBe(1)
      expect(again.out).toContain('first.admin@example.test already has an account')
      expect((db.$client.prepare('select count(*) as n from users').get() as { n: number }).n).toBe(1)
    } finally {
      db.$client.close()
    }
  })

  it('refuses a bad address or a missing name with the usage', () => {
    const bad = run('--email', 'not-an-address', '--name', 'R')
    expect(bad.code).toBe(2)
    expect(bad.out).toContain('--email: not an e-mail address')
    expect(bad.out).toContain('--name: at least 2 characters')
    expect(run('--email', 'a@example.test').out).toContain('--name: required')
  })
})
