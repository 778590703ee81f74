import { defineStore } from 'pinia'
import { LEVEL_SCALES, SCALE_LABELS, type LevelScale } from '#shared/engine/scales'

const DEFAULT_SCALE: LevelScale = 'ire'

/**
 * The level scale a person reads values in (IRE with or without setup, mV, %, codes), shared
 * by every page that shows levels. A cookie rather than local storage, so that the server
 * renders the page in the same unit the browser will show and hydration does not flicker.
 */
export const useUnitsStore = defineStore('units', () => {
  const cookie = useCookie<string | null>('lw-scale', { sameSite: 'lax', maxAge: 60 * 60 * 24 * 365, default: () => DEFAULT_SCALE })

  const scale = computed<LevelScale>({
    // An old or hand-edited cookie must never put an unknown scale into the conversions.
    get: () => (LEVEL_SCALES as readonly string[]).includes(cookie.value ?? '') ? (cookie.value as LevelScale) : DEFAULT_SCALE,
    set: (v) => { cookie.value = v },
  })
  const label = computed(() => SCALE_LABELS[scale.value])
  const options = LEVEL_SCALES.map((s) => ({ value: s, label: SCALE_LABELS[s] }))

  return { scale, label, options }
})
