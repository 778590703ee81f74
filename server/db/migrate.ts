// Applies the committed drizzle-kit migrations in drizzle/ (start and test commands call it).
import { migrate } from 'drizzle-orm/mysql2/migrator'
import { fileURLToPath } from 'node:url'
import { createDb } from './client'

const { db, pool } = createDb(process.env.NUXT_DATABASE_URL ?? '', 1)
try {
  await migrate(db, { migrationsFolder: fileURLToPath(new URL('../../drizzle', import.meta.url)) })
  console.log('[db] migrations applied')
} finally {
  await pool.end()
}
