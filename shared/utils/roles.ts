// Roles within a team and what each may do. The server enforces these; the client only
// uses them to hide controls the server would refuse.
export const ROLES = ['owner', 'editor', 'reviewer', 'producer'] as const
export type Role = (typeof ROLES)[number]

export const ROLE_LABELS: Record<Role, string> = {
  owner: 'Owner',
  editor: 'Editor',
  reviewer: 'QC reviewer',
  producer: 'Producer',
}

export const ROLE_DESCRIPTIONS: Record<Role, string> = {
  owner: 'Everything, including members, roles and delivery specs',
  editor: 'Uploads frames, views scopes and compares sources',
  reviewer: 'Everything an editor can, plus decisions and reel sign-off',
  producer: 'Views results and downloads pass/fail sheets',
}

/** Named permissions → the roles that hold them. */
export const CAN = {
  view: ['owner', 'editor', 'reviewer', 'producer'],
  createProduction: ['owner', 'editor', 'reviewer'],
  upload: ['owner', 'editor', 'reviewer'],
  decide: ['owner', 'reviewer'],
  signOff: ['owner', 'reviewer'],
  downloadSheet: ['owner', 'reviewer', 'producer'],
  /** Undoing a sign-off unlocks a reel the producer may already have sent on: owners only. */
  reopen: ['owner'],
  manageTeam: ['owner'],
  /** Creating and editing delivery specs and choosing a production's spec re-judges frames: owners only. */
  manageSpecs: ['owner'],
} as const satisfies Record<string, readonly Role[]>

export type Permission = keyof typeof CAN

export function can(role: Role | null | undefined, permission: Permission): boolean {
  return !!role && (CAN[permission] as readonly Role[]).includes(role)
}
