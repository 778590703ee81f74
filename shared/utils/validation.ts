import { z } from 'zod'
import { ROLES } from './roles'
import { cleanName } from './text'

// Schemas shared by the forms in app/ and the routes in server/, so both agree on what is valid.
export const EmailSchema = z.string().trim().toLowerCase().pipe(z.email({ message: 'Enter a valid e-mail address' })).pipe(z.string().max(254))
export const PasswordSchema = z.string().min(10, 'Use at least 10 characters').max(200, 'Use at most 200 characters')
/** A one-line name as people see it: NFC, no control, bidi-override or zero-width characters. */
export const nameField = (max: number, empty = 'Enter a name') => z.string().transform(cleanName).pipe(z.string().min(1, empty).max(max, `Use at most ${max} characters`))
export const NameSchema = nameField(120)
export const RoleSchema = z.enum(ROLES)
export const IdSchema = z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER)
export const TokenSchema = z.string().regex(/^[A-Za-z0-9_-]{32,64}$/, 'This link is not valid')

export const LoginBody = z.object({ email: EmailSchema, password: z.string().min(1, 'Enter your password').max(200) })
export const InviteBody = z.object({ email: EmailSchema, role: RoleSchema })
export const AcceptInvitationBody = z.object({ token: TokenSchema, name: NameSchema.optional(), password: PasswordSchema.optional() })
export const ResetRequestBody = z.object({ email: EmailSchema })
export const ResetConfirmBody = z.object({ token: TokenSchema, password: PasswordSchema })
export const RoleChangeBody = z.object({ role: RoleSchema })
export const ProductionBody = z.object({
  name: nameField(160, 'Enter a production name'),
  client: z.string().transform(cleanName).pipe(z.string().max(160, 'Use at most 160 characters')).default(''),
  /** One of the team's delivery specs; the team's first built-in when left out. */
  specId: z.coerce.number().int().positive().optional(),
})
export const TeamParams = z.object({ teamId: IdSchema })
export const IdParams = z.object({ id: IdSchema })
