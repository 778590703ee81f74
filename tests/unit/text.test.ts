// Names and notes: Unicode normalisation form C (Unicode Standard Annex #15), bidi
// formatting characters (Unicode Standard Annex #9: U+202A–U+202E, U+2066–U+2069) and
// zero-width characters (U+200B–U+200D, U+2060, U+FEFF) are removed, controls become spaces.
import { describe, expect, it } from 'vitest'
import { cleanName, cleanNote, visibleLength } from '../../shared/utils/text'
import { ReelPatchBody } from '../../shared/utils/uploads'
import { DecisionBody } from '../../shared/utils/decisions'
import { ProductionBody } from '../../shared/utils/validation'

describe('cleanName', () => {
  it('makes one line of a name with CR and LF in it', () => {
    expect(cleanName('Reel 1\r\nSigned: nobody')).toBe('Reel 1 Signed: nobody')
  })

  it('removes bidi overrides and zero-width characters', () => {
    expect(cleanName('report\u202Egnp.exe')).toBe('reportgnp.exe')
    expect(cleanName('Cam\u200B A\u2066\u2069\uFEFF')).toBe('Cam A')
  })

  it('composes to NFC: e + U+0301 becomes U+00E9', () => {
    expect(cleanName('Caf\u0065\u0301')).toBe('Caf\u00e9')
  })

  it('a production name of only invisible characters is refused', () => {
    expect(ProductionBody.safeParse({ name: '\u200B\u200B\u202E' }).success).toBe(false)
  })
})

describe('required notes count visible characters', () => {
  it('three zero-width spaces are not a note', () => {
    expect(visibleLength('\u200B\u200B\u200B')).toBe(0)
    expect(DecisionBody.safeParse({ decision: 'waived', note: '\u200B\u200B\u200B' }).success).toBe(false)
    expect(DecisionBody.safeParse({ decision: 'waived', note: '   \n\t ' }).success).toBe(false)
  })

  it('a short real note passes and keeps its line breaks', () => {
    const r = DecisionBody.safeParse({ decision: 'waived', note: 'ok\r\nfine' })
    expect(r.success && r.data.note).toBe('ok\nfine')
    expect(cleanNote('a\u0000b')).toBe('a b')
  })
})

describe('a partial reel update carries only the fields sent', () => {
  it('{ name } parses to { name } alone, with no defaults added', () => {
    expect(ReelPatchBody.parse({ name: 'Day 2' })).toEqual({ name: 'Day 2' })
  })

  it('an empty update is refused', () => {
    expect(ReelPatchBody.safeParse({}).success).toBe(false)
  })
})
