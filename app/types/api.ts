import type { Role } from '#shared/utils/roles'

// Shapes of the JSON the routes answer with; dates arrive as ISO strings.
export interface ProductionRow { id: number; name: string; client: string; reelCount: number; createdAt: string; updatedAt: string }
export interface ReelRow { id: number; name: string; sourceLabel: string; sourceRange: 'full' | 'studio'; matrix: '601' | '709'; createdAt: string; updatedAt: string }
export interface ProductionDetail { id: number; teamId: number; name: string; client: string; createdAt: string; updatedAt: string; role: Role; reels: ReelRow[] }
export interface MemberRow { userId: number; name: string; email: string; role: Role; since: string }
export interface InvitationRow { id: number; email: string; role: Role; expiresAt: string; createdAt: string }
