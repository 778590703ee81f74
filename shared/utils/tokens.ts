import { z } from 'zod'
import { ROLES, CAN, type Role } from './roles'
import { nameField } from './validation'

/** Every API token starts with this, so a leaked one is easy to recognise in logs and code. */
export const API_TOKEN_PREFIX = 'lwt_'

export const CreateTokenBody = z.object({
  name: nameField(80, 'Name the token after the script or system that uses it'),
  role: z.enum(ROLES),
  /** Days until it stops working; absent means until revoked. */
  expiresInDays: z.number().int().min(1).max(366).nullable().optional(),
})

/** True when every permission of `a` is also one of `b`: a token may be given at most its maker's role. */
export function roleWithin(a: Role, b: Role): boolean {
  return Object.values(CAN).every((roles) => !(roles as readonly Role[]).includes(a) || (roles as readonly Role[]).includes(b))
}
