// The redirect after sign-in (OWASP ASVS v4.0 V5.1.5, number recalled from memory): only
// paths on this site survive, after the normalisation a browser applies (WHATWG URL).
import { describe, expect, it } from 'vitest'
import { safeRedirect } from '../../../app/utils/errors'

describe('safeRedirect', () => {
  it('keeps a same-site path with its query and fragment', () => {
    expect(safeRedirect('/reels/7?verdict=fail#f3')).toBe('/reels/7?verdict=fail#f3')
    expect(safeRedirect('/')).toBe('/')
  })

  it('refuses every form that a browser resolves to another host', () => {
    for (const v of ['//evil.example', '/.//evil.example', '/..//evil.example', '/\t/evil.example', '/\n/evil.example', '/\\evil.example',
      '/\\/evil.example', 'https://evil.example/', 'evil.example', '/././/evil.example', '/%0A/x'.replace('%0A', '\n')]) {
      expect(safeRedirect(v), JSON.stringify(v)).toBe('/')
    }
  })

  it('returns the normalised path, never the raw value', () => {
    expect(safeRedirect('/a/./b/../c')).toBe('/a/c')
  })

  it('refuses what is not a string and keeps the fallback', () => {
    expect(safeRedirect(undefined, '/productions')).toBe('/productions')
    expect(safeRedirect(['/a', '/b'])).toBe('/')
  })
})
