import { createDb, firstId, type Db } from '../db/client'

export * as tables from '../db/schema'

let instance: Db | undefined

/** The drizzle instance of this server process (one mysql2 pool, created on first use). */
export function useDb(): Db {
  instance ??= createDb(useRuntimeConfig().databaseUrl).db
  return instance
}

export { firstId }
