// Row types come from the Drizzle schema, never written by hand.
import type * as s from '../../server/db/schema'

export type UserRow = typeof s.users.$inferSelect
export type TeamRow = typeof s.teams.$inferSelect
export type MembershipRow = typeof s.memberships.$inferSelect
export type InvitationRow = typeof s.invitations.$inferSelect
export type ProductionRow = typeof s.productions.$inferSelect
export type ReelRow = typeof s.reels.$inferSelect
export type FrameRow = typeof s.frames.$inferSelect
export type AnalysisRow = typeof s.analyses.$inferSelect
export type AuditRow = typeof s.auditLog.$inferSelect

/** A user as the API shows it: never the password hash. */
export type PublicUser = Pick<UserRow, 'id' | 'email' | 'name'>
export type ClipRow = typeof s.clips.$inferSelect
export type ClipEventRow = typeof s.clipEvents.$inferSelect
