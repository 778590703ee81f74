// The demo scenario: an invented post house finishing an invented documentary series.
// Any likeness to a real team or programme is accidental.
import type { Role } from '../../shared/utils/roles'

export const DEMO_TEAM = 'Northgate Post'
export const DEMO_PRODUCTION = { name: 'Salt Marsh Ledger — Ep. 104', client: 'Estuary Channel (fictional)' }
export const DEMO_USERS: { email: string; name: string; role: Role; password: string }[] = [
  { email: 'owner@northgate.example', name: 'Ines Carvalho', role: 'owner', password: 'demo-owner-4417' },
  { email: 'editor@northgate.example', name: 'Tomasz Wren', role: 'editor', password: 'demo-editor-4417' },
  { email: 'reviewer@northgate.example', name: 'Priya Oduya', role: 'reviewer', password: 'demo-reviewer-4417' },
  { email: 'producer@northgate.example', name: 'Lena Marsh', role: 'producer', password: 'demo-producer-4417' },
]
