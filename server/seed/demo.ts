// The demo scenario: an invented post house finishing an invented documentary series.
// Any likeness to a real team or programme is accidental.
import type { Role } from '../../shared/utils/roles'

export const DEMO_TEAM = 'Quillwater Post (fictional)'
export const DEMO_PRODUCTION = { name: 'Salt Marsh Ledger (fictional) — Ep. 104', client: 'Estuary Channel (fictional)' }
export const DEMO_USERS: { email: string; name: string; role: Role; password: string }[] = [
  { email: 'owner@quillwater.example', name: 'Ines Carvalho', role: 'owner', password: 'demo-owner-4417' },
  { email: 'editor@quillwater.example', name: 'Tomasz Wren', role: 'editor', password: 'demo-editor-4417' },
  { email: 'reviewer@quillwater.example', name: 'Priya Oduya', role: 'reviewer', password: 'demo-reviewer-4417' },
  { email: 'producer@quillwater.example', name: 'Lena Marsh', role: 'producer', password: 'demo-producer-4417' },
]
