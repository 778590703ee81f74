// The scaffolding every page of one team's thing shares: the id from the address (a malformed
// one is a 404), the keyed fetch, a miss (or another team's row) as a 404 page with the
// page's own words, and switching the top bar to the team the thing belongs to.
import type { NitroFetchRequest } from 'nitropack'
import { IdSchema } from '#shared/utils/validation'

interface Options<T> {
  /** The route parameter holding the id (`id`, `reelId`). */
  param?: string
  /** What the thing is called in the 404 messages ("reel", "frame"). */
  noun: string
  /** The API path for an id. */
  url: (id: number) => NitroFetchRequest
  /** The team the loaded thing belongs to. */
  teamOf: (data: T) => number
  /** The key prefix for useFetch (`reel` → `reel-12`). */
  key?: string
}

export async function useTeamResource<T>(opts: Options<T>) {
  const route = useRoute()
  const team = useTeamStore()
  const check = IdSchema.safeParse(route.params[opts.param ?? 'id'])
  if (!check.success) throw createError({ statusCode: 404, statusMessage: `There is no ${opts.noun} at this address.`, fatal: true })
  const id = check.data
  const fetched = await useFetch<T>(opts.url(id) as string, { key: `${opts.key ?? opts.noun}-${id}` })
  if (errorStatus(fetched.error.value) === 404) {
    throw createError({ statusCode: 404, statusMessage: `This ${opts.noun} does not exist, or it belongs to a team you are not in.`, fatal: true })
  }
  // A link can lead into another of the user's teams; the top bar then shows that team and role.
  const follow = (d: T | null | undefined) => {
    if (d) {
      const teamId = opts.teamOf(d)
      if (teamId !== team.currentId) team.select(teamId)
    }
  }
  follow(fetched.data.value as T | null)
  watch(fetched.data, (d) => follow(d as T | null))
  return { id, ...fetched }
}
