import { defineStore } from 'pinia'
import type { Permission, Role } from '#shared/utils/roles'
import { can as roleCan } from '#shared/utils/roles'

export interface TeamSummary { id: number; name: string; role: Role }

/** The teams of the signed-in user and the one they are working in, shared by every page. */
export const useTeamStore = defineStore('team', () => {
  const teams = ref<TeamSummary[]>([])
  // Whose teams are loaded, so a sign-in as someone else in the same tab reloads them.
  const loadedFor = ref<number | null>(null)
  const error = ref<string | null>(null)
  // The choice of team survives reloads and new tabs; the server still checks membership.
  const cookie = useCookie<number | null>('lw-team', { sameSite: 'lax', maxAge: 60 * 60 * 24 * 365, default: () => null })

  const current = computed<TeamSummary | null>(() =>
    teams.value.find((t) => t.id === Number(cookie.value)) ?? teams.value[0] ?? null)
  const currentId = computed(() => current.value?.id ?? null)
  const role = computed<Role | null>(() => current.value?.role ?? null)

  function can(permission: Permission) {
    return roleCan(role.value, permission)
  }

  async function load() {
    // useRequestFetch forwards the session cookie when this runs during server rendering.
    const me = await useRequestFetch()('/api/me')
    teams.value = me.teams as TeamSummary[]
    loadedFor.value = me.user.id
    error.value = null
    if (current.value && Number(cookie.value) !== current.value.id) cookie.value = current.value.id
  }

  /** Loads once per signed-in user; later calls are free. */
  async function ensure(userId: number) {
    if (loadedFor.value !== userId) await load()
  }

  function select(teamId: number) {
    if (teams.value.some((t) => t.id === teamId)) cookie.value = teamId
  }

  function reset() {
    teams.value = []
    loadedFor.value = null
  }

  return { teams, loadedFor, error, current, currentId, role, can, load, ensure, select, reset }
})
