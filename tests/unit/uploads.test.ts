// Which matrix a picture size is usually coded with: standard-definition sizes (480/486/576
// lines) BT.601, HD and larger BT.709 — common practice.
import { describe, expect, it } from 'vitest'
import { ReelPatchBody, dropFrameProblem, usualMatrix } from '../../shared/utils/uploads'

describe('usualMatrix (common practice)', () => {
  it('calls SD sizes BT.601', () => {
    for (const [w, h] of [[720, 486], [720, 480], [720, 576], [640, 480], [1024, 576]] as const) expect(usualMatrix(w, h)).toBe('601')
  })
  it('calls HD and larger BT.709', () => {
    for (const [w, h] of [[1280, 720], [1920, 1080], [3840, 2160], [4096, 2160]] as const) expect(usualMatrix(w, h)).toBe('709')
  })
  it('has no habit for sizes between', () => expect(usualMatrix(960, 640)).toBeNull())
})

describe('reel settings', () => {
  it('a partial body names only the fields sent (no defaults fill the others)', () => {
    expect(ReelPatchBody.parse({ name: 'Reel 2' })).toEqual({ name: 'Reel 2' })
    expect(ReelPatchBody.parse({ matrix: '709' })).toEqual({ matrix: '709' })
  })
  it('drop-frame only at 29.97 and 59.94 (SMPTE ST 12-1 — memory)', () => {
    expect(dropFrameProblem('29.97', true)).toBeNull()
    expect(dropFrameProblem('59.94', true)).toBeNull()
    expect(dropFrameProblem('25', true)).toMatch(/29\.97 and 59\.94/)
    expect(dropFrameProblem(null, true)).toMatch(/29\.97 and 59\.94/)
    expect(dropFrameProblem('25', false)).toBeNull()
  })
})
